import { describe, expect, it } from 'vitest'
import { countMaskedPixels, maskSpectrumBadPixels, maskSpectrumSpikes } from '../../../../server/spectra/prepare/mask'
import { referenceStars } from '../../../../bench/reference'

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

describe('maskSpectrumSpikes', () => {
  // HD 207130, K0 III (MILES v9.1, 2.5 Å FWHM on 0.9 Å pixels, read from its source file): a line-crowded real spectrum.
  const star = referenceStars().find((s) => s.star === 'HD207130')!
  const keep = Array.from(star.spectrum.wavelength.keys()).filter((i) => Number.isFinite(star.spectrum.flux[i]!))
  const wavelength = Float64Array.from(keep, (i) => star.spectrum.wavelength[i]!)
  const flux = Float64Array.from(keep, (i) => star.spectrum.flux[i]!)
  const level = [...flux].sort((a, b) => a - b)[flux.length >> 1]!

  it('masks one- and two-pixel cosmic-ray hits in a real spectrum and little else', () => {
    const hit = Float64Array.from(flux)
    const single = Array.from({ length: 20 }, (_, k) => 60 + k * 150)
    const pairs = Array.from({ length: 5 }, (_, k) => 130 + k * 500)
    single.forEach((i, k) => (hit[i] = hit[i]! + level * (0.3 + 0.1 * k)))
    for (const i of pairs) {
      hit[i] = hit[i]! + 0.8 * level
      hit[i + 1] = hit[i + 1]! + 0.5 * level
    }
    const { spectrum, count } = maskSpectrumSpikes({ wavelength, flux: hit })
    for (const i of [...single, ...pairs, ...pairs.map((i) => i + 1)]) expect(spectrum.mask![i], `pixel ${i}`).toBe(1)
    // Every hit, and at most 0.2 % of the other pixels.
    expect(count).toBeGreaterThanOrEqual(30)
    expect(count - 30).toBeLessThanOrEqual(0.002 * flux.length)
  })

  it('keeps resolved emission lines and narrow absorption cores', () => {
    const lined = Float64Array.from(flux)
    // Hα in emission as Be stars show it (6 Å FWHM, peak 3 × the level), and a line 2.5 pixels wide at 5000 Å.
    const step = (i: number) => wavelength[i + 1]! - wavelength[i]!
    const at5000 = wavelength.findIndex((w) => w >= 5000)
    for (let i = 0; i < lined.length; i++) {
      lined[i] = lined[i]! + 3 * level * Math.exp(-0.5 * ((wavelength[i]! - 6562.8) / (6 / 2.3548)) ** 2)
      lined[i] = lined[i]! + level * Math.exp(-0.5 * ((wavelength[i]! - wavelength[at5000]!) / ((2.5 * step(at5000)) / 2.3548)) ** 2)
    }
    lined[2000] = 0.1 * lined[2000]!
    const { spectrum, count } = maskSpectrumSpikes({ wavelength, flux: lined })
    const masked = (lo: number, hi: number) => Array.from(wavelength.keys()).filter((i) => wavelength[i]! >= lo && wavelength[i]! <= hi && spectrum.mask?.[i] === 1).length
    expect(masked(6550, 6575)).toBe(0)
    expect(masked(wavelength[at5000]! - 5, wavelength[at5000]! + 5)).toBe(0)
    expect(spectrum.mask?.[2000] ?? 0).toBe(0)
    expect(count).toBeLessThanOrEqual(0.002 * flux.length)
  })
})
