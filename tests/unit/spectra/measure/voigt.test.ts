import { describe, expect, it } from 'vitest'
import { faddeeva, gaussianFwhm, voigtFwhmApproximation, voigtFwhmNumeric, voigtProfile, voigtWithDerivatives } from '../../../../server/spectra/measure/voigt'

const slot = () => ({ re: 0, im: 0, dre: 0, dim: 0 })

describe('faddeeva', () => {
  it('equals exp(−x²) on the real axis (an identity of w) to 1e-9', () => {
    const out = slot()
    for (let x = -6; x <= 6; x += 0.05) expect(Math.abs(faddeeva(x, 0, out).re - Math.exp(-x * x))).toBeLessThan(1e-9)
  })
  it('gives Im w(1) = (2/√π)·D(1) with Dawson D(1) = 0.5380795069 (from memory)', () => {
    expect(faddeeva(1, 0, slot()).im).toBeCloseTo((2 / Math.sqrt(Math.PI)) * 0.5380795069, 8)
  })
  it('tends to i/(√π z) far from the origin (the asymptotic series, leading term)', () => {
    const out = faddeeva(0, 100, slot())
    expect(out.re * 100 * Math.sqrt(Math.PI)).toBeCloseTo(1, 4)
  })
  it('has the derivative −2z w + 2i/√π, checked by finite differences', () => {
    const out = slot()
    const h = 1e-6
    for (const [x, y] of [
      [0.3, 0.2],
      [2, 1],
      [-1.5, 0.05],
    ] as const) {
      faddeeva(x, y, out)
      const { dre, dim } = out
      const p = faddeeva(x + h, y, slot())
      const m = faddeeva(x - h, y, slot())
      expect((p.re - m.re) / (2 * h)).toBeCloseTo(dre, 6)
      expect((p.im - m.im) / (2 * h)).toBeCloseTo(dim, 6)
    }
  })
})

describe('voigtProfile', () => {
  it('has unit area (trapezoid over ±2000 widths, 1e-3)', () => {
    const sigma = 1.2
    const gamma = 0.8
    let area = 0
    const step = 0.01
    for (let x = -2000; x <= 2000; x += step) area += voigtProfile(x, sigma, gamma) * step
    expect(area).toBeCloseTo(1, 3)
  })
  it('reduces to a Gaussian when γ → 0 and to a Lorentzian when σ → 0', () => {
    expect(voigtProfile(0.7, 1, 0)).toBeCloseTo(Math.exp(-0.5 * 0.49) / Math.sqrt(2 * Math.PI), 9)
    expect(voigtProfile(0.7, 1e-4, 0.5)).toBeCloseTo(0.5 / Math.PI / (0.49 + 0.25), 6)
  })
  it('has analytic derivatives that match finite differences', () => {
    const d = { value: 0, dx: 0, dSigma: 0, dGamma: 0 }
    const h = 1e-6
    voigtWithDerivatives(0.9, 1.3, 0.6, d)
    expect((voigtProfile(0.9 + h, 1.3, 0.6) - voigtProfile(0.9 - h, 1.3, 0.6)) / (2 * h)).toBeCloseTo(d.dx, 7)
    expect((voigtProfile(0.9, 1.3 + h, 0.6) - voigtProfile(0.9, 1.3 - h, 0.6)) / (2 * h)).toBeCloseTo(d.dSigma, 7)
    expect((voigtProfile(0.9, 1.3, 0.6 + h) - voigtProfile(0.9, 1.3, 0.6 - h)) / (2 * h)).toBeCloseTo(d.dGamma, 7)
  })
})

describe('voigtFwhmNumeric', () => {
  // Olivero & Longbothum (1977): f_V ≈ 0.5346 f_L + √(0.2166 f_L² + f_G²), accurate to about 0.02 %
  // (the accuracy as usually quoted, from memory); tested here to 0.05 %.
  it.each([
    [1, 0.001],
    [1, 0.3],
    [1, 1],
    [0.5, 2],
    [0.05, 1],
  ])('agrees with Olivero & Longbothum for σ = %s, γ = %s', (sigma, gamma) => {
    const exact = voigtFwhmNumeric(sigma, gamma)
    expect(Math.abs(exact / voigtFwhmApproximation(gaussianFwhm(sigma), 2 * gamma) - 1)).toBeLessThan(5e-4)
  })
  it('gives 2√(2 ln 2)σ for a pure Gaussian and 2γ for a near-pure Lorentzian', () => {
    expect(voigtFwhmNumeric(1, 0)).toBeCloseTo(2.3548200450309493, 8)
    expect(voigtFwhmNumeric(1e-5, 1)).toBeCloseTo(2, 4)
  })
})
