import { describe, expect, it } from 'vitest'
import { countMaskedPixels, maskSpectrumBadPixels } from '../../../../server/spectra/prepare/mask'

describe('maskSpectrumBadPixels', () => {
  const wavelength = Float64Array.from([4000, 4001, 4002, 4003, 4004])
  it('masks non-finite flux, bad errors and flagged pixels, keeping existing bits', () => {
    const out = maskSpectrumBadPixels(
      {
        wavelength,
        flux: Float64Array.from([1, Number.NaN, 1, 1, Infinity]),
        error: Float64Array.from([0.1, 0.1, 0, 0.1, 0.1]),
        mask: Uint8Array.from([1, 0, 0, 0, 0]),
      },
      { flagged: [0, 0, 0, 4, 0] },
    )
    expect(Array.from(out.mask!)).toEqual([1, 1, 1, 1, 1])
  })
  it('keeps zero errors when told to', () => {
    const out = maskSpectrumBadPixels({ wavelength, flux: Float64Array.from([1, 1, 1, 1, 1]), error: Float64Array.from([0, 0.1, 0.1, 0.1, 0.1]) }, { maskNonPositiveError: false })
    expect(countMaskedPixels(out)).toBe(0)
  })
  it('always returns a mask, and does not change the input', () => {
    const flux = Float64Array.from([1, 2, 3, 4, 5])
    const out = maskSpectrumBadPixels({ wavelength, flux })
    expect(out.mask).toBeInstanceOf(Uint8Array)
    expect(countMaskedPixels(out)).toBe(0)
    expect(Array.from(flux)).toEqual([1, 2, 3, 4, 5])
  })
})
