import { describe, expect, it } from 'vitest'
import { fitSpectrumContinuum } from '../../../../server/spectra/prepare/continuum'
import { rebinSpectrumToLogGrid } from '../../../../server/spectra/prepare/rebin'
import { measureSpectrumRadialVelocity, shiftSpectrumToRest } from '../../../../server/spectra/prepare/rv'
import { DEFAULT_CLASSIFICATION_REGION, DEFAULT_GRID, SPEED_OF_LIGHT_KMS } from '../../../../shared/grid'
import type { Spectrum1D } from '../../../../shared/spectrum'
import { readA0vStandard } from './synthetic'

const grid = DEFAULT_GRID
function rectify(spectrum: Spectrum1D): Spectrum1D {
  const rebinned = rebinSpectrumToLogGrid(spectrum, { grid })
  const fit = fitSpectrumContinuum(rebinned)
  return { wavelength: rebinned.wavelength, flux: fit.rectified, mask: rebinned.mask! }
}
function redshift(spectrum: Spectrum1D, v: number): Spectrum1D {
  return { ...spectrum, wavelength: Float64Array.from(spectrum.wavelength, (w) => w * (1 + v / SPEED_OF_LIGHT_KMS)) }
}

describe('measureSpectrumRadialVelocity', () => {
  const a0v = readA0vStandard()
  const reference = rectify(a0v)
  it.each([-300, -123.4, -45, 0, 17.5, 88, 250, 300])('recovers a shift of %s km/s applied to the real A0 V spectrum within 3 km/s', (v) => {
    const result = measureSpectrumRadialVelocity(rectify(redshift(a0v, v)), reference, {
      grid,
      region: DEFAULT_CLASSIFICATION_REGION,
    })
    if (!result.found) throw new Error(result.reason)
    expect(Math.abs(result.velocity - v)).toBeLessThan(3)
    expect(result.error).toBeGreaterThan(0)
    expect(result.peak).toBeGreaterThan(0.9)
  })
  it('reports no velocity when the peak lies beyond the search range', () => {
    const result = measureSpectrumRadialVelocity(rectify(redshift(a0v, 900)), reference, { grid, maxVelocity: 300 })
    expect(result).toEqual({ found: false, reason: 'the correlation peak lies at the ±300 km/s search limit' })
  })
  it('refuses spectra that are not on the grid', () => {
    expect(() => measureSpectrumRadialVelocity(a0v, reference, { grid })).toThrow(`spectrum has ${a0v.flux.length} pixels but the grid has ${grid.length}`)
  })
})

describe('shiftSpectrumToRest', () => {
  it('divides wavelengths by 1 + v/c and leaves the flux alone', () => {
    const spectrum = { wavelength: Float64Array.from([4000, 5000]), flux: Float64Array.from([1, 2]) }
    const rest = shiftSpectrumToRest(spectrum, { velocity: 299.792458 })
    expect(rest.wavelength[0]).toBeCloseTo(4000 / 1.001, 9)
    expect(rest.flux).toBe(spectrum.flux)
  })
  it('refuses a velocity at or beyond c', () => {
    const spectrum = { wavelength: Float64Array.from([4000, 5000]), flux: Float64Array.from([1, 2]) }
    expect(() => shiftSpectrumToRest(spectrum, { velocity: -SPEED_OF_LIGHT_KMS })).toThrow('velocity must be finite and below c')
  })
})
