import { describe, expect, it } from 'vitest'
import { smoothSpectrumToFwhm } from '../../../../server/spectra/prepare/smooth'
import { measureSpectrumLine } from '../../../../server/spectra/measure/line'
import { gridWavelengths, makeLogGrid } from '../../../../shared/grid'
import type { ClassificationLine } from '../../../../shared/lines'
import { syntheticSpectrum } from './synthetic'

const grid = makeLogGrid(4300, 4700, 1e-4)
const line: ClassificationLine = {
  id: 'test',
  name: 'test line',
  wavelength: 4500,
  wavelengthSource: 'synthetic',
  family: 'metal',
  window: [4470, 4530],
  blue: [4420, 4440],
  red: [4560, 4580],
  windowSource: 'synthetic',
  indicates: ['temperature'],
}

describe('smoothSpectrumToFwhm', () => {
  it('broadens a Gaussian line to the target FWHM in quadrature and keeps its EW (0.5 %)', () => {
    const wavelength = gridWavelengths(grid)
    const sigma = 1 / 2.3548200450309493 // 1 Å FWHM line
    const spectrum = syntheticSpectrum(wavelength, [{ centre: 4500, ew: 1, sigma, gamma: 0 }])
    const out = smoothSpectrumToFwhm({ ...spectrum, mask: new Uint8Array(grid.length) }, { grid, targetFwhm: 4, inputFwhm: 1 })
    const m = measureSpectrumLine(out, line)
    if (!m.measured) throw new Error(m.detail)
    // FWHM of a Gaussian convolved with a Gaussian: √(1² + (4² − 1²)) = 4 Å.
    expect(m.fwhm! / 4).toBeCloseTo(1, 2)
    expect(m.equivalentWidth).toBeCloseTo(1, 2)
  })
  it('returns an unchanged copy when the input is already broader than the target', () => {
    const flux = Float64Array.from({ length: grid.length }, (_, i) => Math.sin(i))
    const out = smoothSpectrumToFwhm({ wavelength: gridWavelengths(grid), flux }, { grid, targetFwhm: 2, inputFwhm: 3 })
    expect(Array.from(out.flux)).toEqual(Array.from(flux))
    expect(out.flux).not.toBe(flux)
  })
  it('lowers the per-pixel error of white noise and masks pixels with too little good weight', () => {
    const wavelength = gridWavelengths(grid)
    const mask = new Uint8Array(grid.length)
    for (let i = 400; i < 500; i++) mask[i] = 1
    const out = smoothSpectrumToFwhm({ wavelength, flux: new Float64Array(grid.length).fill(1), error: new Float64Array(grid.length).fill(0.1), mask }, { grid, targetFwhm: 3, inputFwhm: 0 })
    expect(out.error![200]!).toBeLessThan(0.05)
    expect(out.mask![450]).toBe(1)
    expect(out.mask![200]).toBe(0)
  })
  it('refuses a spectrum that is not on the grid, and a non-positive target', () => {
    const wavelength = gridWavelengths(grid)
    const flux = new Float64Array(grid.length)
    expect(() => smoothSpectrumToFwhm({ wavelength: wavelength.subarray(1), flux: flux.subarray(1) }, { grid, targetFwhm: 3, inputFwhm: 1 })).toThrow(
      `spectrum has ${grid.length - 1} pixels but the grid has ${grid.length}`,
    )
    expect(() => smoothSpectrumToFwhm({ wavelength, flux }, { grid, targetFwhm: 0, inputFwhm: 1 })).toThrow('target FWHM must be positive')
  })
})
