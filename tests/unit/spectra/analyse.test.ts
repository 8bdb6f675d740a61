import { describe, expect, it } from 'vitest'
import { analyseSpectrum } from '../../../server/spectra/analyse'
import { fitSpectrumContinuum } from '../../../server/spectra/prepare/continuum'
import { rebinSpectrumToLogGrid } from '../../../server/spectra/prepare/rebin'
import { DEFAULT_GRID, SPEED_OF_LIGHT_KMS } from '../../../shared/grid'
import { CLASSIFICATION_LINES } from '../../../shared/lines'
import type { Spectrum1D } from '../../../shared/spectrum'
import { readA0vStandard, readReference } from './prepare/synthetic'

const a0v = readA0vStandard()
const measuredLine = (result: ReturnType<typeof analyseSpectrum>, id: string) => {
  const line = result.lines.find((l) => l.id === id)
  if (!line || !line.measured) throw new Error(`${id} not measured`)
  return line
}

describe('analyseSpectrum', () => {
  const result = analyseSpectrum(a0v, { targetFwhm: 6, inputFwhm: 5.5 })
  it("reports the S/N the file's own errors give (STATERROR of the HST table), at least what DER_SNR gives, within the cap", () => {
    // tests/reference/out/der_snr.json holds the reference DER_SNR over 4000–5000 Å (254.1); DER_SNR
    // takes the noise from second differences, which lines inflate, so the errors give more.
    const reference = readReference<{ real: { range: number[]; snr: number }[] }>('der_snr.json')
    expect(reference.real[1]!.range).toEqual([4000, 5000])
    expect(['errors', 'capped']).toContain(result.snrMethod)
    expect(result.snr!).toBeGreaterThan(reference.real[1]!.snr)
    expect(result.snr!).toBeLessThanOrEqual(1000)
  })
  it('measures every line of the table or says why not, and fits the Balmer lines of the A0 V standard', () => {
    expect(result.lines).toHaveLength(CLASSIFICATION_LINES.length)
    for (const line of result.lines) if (!line.measured) expect(line.detail.length).toBeGreaterThan(5)
    for (const id of ['h-beta', 'h-gamma', 'h-delta']) {
      const line = measuredLine(result, id)
      expect(line.equivalentWidth).toBeGreaterThan(5)
      expect(line.voigt?.converged).toBe(true)
      // Hydrogen lines are strongest near A0 (common practice): broad Lorentzian wings of several Å.
      expect(line.voigt!.lorentzianFwhm).toBeGreaterThan(2)
    }
    // Helium lines of an A0 V are weak (common practice): below 0.3 Å.
    expect(Math.abs(measuredLine(result, 'he-i-4471').equivalentWidth)).toBeLessThan(0.3)
  })
  it('gives rectified flux near 1 in the continuum and a continuum on the grid', () => {
    expect(result.prepared.rectified).toHaveLength(DEFAULT_GRID.length)
    expect(result.pseudoContinuum).toBe(false)
    const i = Math.round(Math.log(4600 / DEFAULT_GRID.start) / DEFAULT_GRID.step)
    expect(Math.abs(result.prepared.rectified[i]! - 1)).toBeLessThan(0.03)
    expect(result.ratios.length).toBeGreaterThan(5)
  })
  it('measures and removes a radial velocity against a reference', () => {
    const rebinned = rebinSpectrumToLogGrid(a0v, { grid: DEFAULT_GRID })
    const reference: Spectrum1D = { wavelength: rebinned.wavelength, flux: fitSpectrumContinuum(rebinned).rectified, mask: rebinned.mask! }
    const shifted = { ...a0v, wavelength: Float64Array.from(a0v.wavelength, (w) => w * (1 + 150 / SPEED_OF_LIGHT_KMS)) }
    const moved = analyseSpectrum(shifted, { rvReference: reference })
    expect(Math.abs(moved.rv!.v - 150)).toBeLessThan(3)
    expect(Math.abs(measuredLine(moved, 'h-beta').equivalentWidth / measuredLine(result, 'h-beta').equivalentWidth - 1)).toBeLessThan(0.02)
  })
  it('warns when asked to smooth without knowing the input resolution, or when the input is broader', () => {
    expect(analyseSpectrum(a0v, { targetFwhm: 3 }).warnings).toContain('input resolution unknown: not smoothed to the target')
    expect(analyseSpectrum(a0v, { targetFwhm: 3, inputFwhm: 5.5 }).warnings).toContain('input resolution 5.5 Å FWHM is not sharper than the target 3 Å: not smoothed')
  })
  it('refuses a spectrum that misses the grid, and malformed input', () => {
    const far = { wavelength: Float64Array.from([8000, 8001, 8002, 8003, 8004, 8005]), flux: new Float64Array(6).fill(1) }
    expect(() => analyseSpectrum(far)).toThrow("spectrum covers 8000.0–8005.0 Å, which does not overlap the grid's 3700.0–6999.5 Å")
    expect(() => analyseSpectrum({ wavelength: new Float64Array(), flux: new Float64Array() })).toThrow('spectrum is empty')
    expect(() => analyseSpectrum({ wavelength: Float64Array.from([4000]), flux: Float64Array.from([1]) })).toThrow('spectrum has 1 pixel; at least 5 are needed')
    expect(() => analyseSpectrum({ wavelength: Float64Array.from([4000, 4001]), flux: Float64Array.from([1]) })).toThrow('flux has 1 values but wavelength has 2')
  })
  it('masks NaN flux and says how many pixels it masked', () => {
    const flux = a0v.flux.slice()
    flux[300] = Number.NaN
    expect(analyseSpectrum({ ...a0v, flux }).warnings).toContain(`1 of ${a0v.flux.length} pixels are masked`)
  })
})
