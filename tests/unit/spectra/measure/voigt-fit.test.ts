import { describe, expect, it } from 'vitest'
import { fitSpectrumVoigtLine } from '../../../../server/spectra/measure/voigt-fit'
import { gridWavelengths, makeLogGrid } from '../../../../shared/grid'
import { findLine } from '../../../../shared/lines'
import { syntheticSpectrum } from '../prepare/synthetic'

const hBeta = findLine('h-beta')!
const wavelength = gridWavelengths(makeLogGrid(4750, 4980, 1e-4))

describe('fitSpectrumVoigtLine', () => {
  it('recovers σ, γ and the EW of a noise-free Voigt line (1e-4 relative)', () => {
    const spectrum = syntheticSpectrum(wavelength, [{ centre: 4861.6, ew: 8, sigma: 2.2, gamma: 3.1 }])
    const result = fitSpectrumVoigtLine(spectrum, hBeta)
    if (!result.ok) throw new Error(result.reason)
    const { fit } = result
    expect(fit.sigma / 2.2).toBeCloseTo(1, 4)
    expect(fit.gamma / 3.1).toBeCloseTo(1, 4)
    expect(fit.centre).toBeCloseTo(4861.6, 4)
    // The fitted profile's full area, not just the part inside the window.
    expect(fit.equivalentWidth / 8).toBeCloseTo(1, 4)
    expect(fit.lorentzianFwhm).toBeCloseTo(6.2, 3)
  })
  it.each([
    [300, 0.03, 0.05],
    [100, 0.08, 0.12],
    [30, 0.25, 0.35],
  ])('at S/N %s recovers γ and the EW within the stated tolerances (%s, %s relative) over 20 seeds, with honest errors', (snr, ewTol, gammaTol) => {
    let pulls = 0
    for (let seed = 1; seed <= 20; seed++) {
      const spectrum = syntheticSpectrum(wavelength, [{ centre: 4861.33, ew: 8, sigma: 2.2, gamma: 3.1 }], { snr, seed })
      const result = fitSpectrumVoigtLine(spectrum, hBeta)
      if (!result.ok) throw new Error(result.reason)
      const { fit } = result
      expect(Math.abs(fit.equivalentWidth / 8 - 1)).toBeLessThan(ewTol)
      expect(Math.abs(fit.gamma / 3.1 - 1)).toBeLessThan(gammaTol)
      pulls += ((fit.gamma - 3.1) / fit.errors.gamma) ** 2 / 20
    }
    // The rms pull of γ should be about 1 (between 0.5 and 1.6 with 20 draws).
    expect(Math.sqrt(pulls)).toBeGreaterThan(0.5)
    expect(Math.sqrt(pulls)).toBeLessThan(1.6)
  })
  it('separates a pure Gaussian (γ ≈ 0) from a pure Lorentzian (σ small)', () => {
    const gaussian = fitSpectrumVoigtLine(syntheticSpectrum(wavelength, [{ centre: 4861.33, ew: 4, sigma: 3, gamma: 0 }]), hBeta)
    const lorentzian = fitSpectrumVoigtLine(syntheticSpectrum(wavelength, [{ centre: 4861.33, ew: 4, sigma: 0.3, gamma: 3 }]), hBeta)
    if (!gaussian.ok || !lorentzian.ok) throw new Error('fit failed')
    expect(gaussian.fit.gamma).toBeLessThan(0.01)
    expect(lorentzian.fit.gamma / 3).toBeCloseTo(1, 3)
  })
  it('declines a window without absorption or without pixels', () => {
    expect(fitSpectrumVoigtLine(syntheticSpectrum(wavelength, []), hBeta)).toEqual({ ok: false, reason: 'no absorption in the fitting window' })
    const far = syntheticSpectrum(gridWavelengths(makeLogGrid(5000, 5100, 1e-4)), [])
    expect(fitSpectrumVoigtLine(far, hBeta)).toEqual({ ok: false, reason: 'only 0 usable pixels in 4801.33–4921.33 Å' })
  })
})
