import type { ClassificationLine, WavelengthRange } from '../../../shared/lines'
import type { Spectrum1D } from '../../../shared/spectrum'
import { assertSpectrum } from '../prepare/guards'
import { lowerBound } from '../prepare/stats'
import { fitLevenbergMarquardt } from './lm'
import type { VoigtFit } from './types'
import { gaussianFwhm, voigtFwhmApproximation, voigtProfile, voigtWithDerivatives, type VoigtDerivatives } from './voigt'

export interface VoigtFitOptions {
  /** Range to fit, Å. @default line.profileWindow, else line.window */
  window?: WavelengthRange
  /** Largest shift of the centre from the rest wavelength, Å. @default 5 */
  maxShift?: number
  /** Pixels per independent noise sample; inflates the variance of the fitted parameters. @default 1 */
  noiseCorrelation?: number
  /** Most Levenberg–Marquardt iterations. @default 100 */
  maxIterations?: number
  /**
   * Smallest Gaussian σ allowed, Å: the instrumental σ when the resolution is known, since no line
   * can be sharper than the instrument makes it. @default a quarter of a pixel
   */
  minSigma?: number
}

export type VoigtFitResult = { ok: true; fit: VoigtFit } | { ok: false; reason: string }

/**
 * Fits F(λ) = L − W·V(λ − μ; σ, γ) to a continuum-normalised absorption line, with V the
 * area-normalised Voigt profile (Faddeeva function, Weideman 1994) and W its equivalent width,
 * by Levenberg–Marquardt (analytic derivatives). Free: W, μ, σ, γ and the local level L.
 * Weights are 1/σᵢ² when the spectrum has errors, else uniform (errors then scaled by χ²ᵣ).
 *
 * Starts from the depth and half-depth width of the data, splitting the width evenly between the
 * Gaussian and Lorentzian parts. σ includes the instrumental profile; γ (the Lorentzian HWHM) carries
 * the pressure broadening that separates dwarfs from giants in A–F stars.
 */
export function fitSpectrumVoigtLine(spectrum: Spectrum1D, line: ClassificationLine, options: VoigtFitOptions = {}): VoigtFitResult {
  assertSpectrum(spectrum, 2)
  return fitCheckedSpectrumVoigtLine(spectrum, line, options)
}

/** {@link fitSpectrumVoigtLine} for a spectrum already checked by assertSpectrum. */
export function fitCheckedSpectrumVoigtLine(spectrum: Spectrum1D, line: ClassificationLine, options: VoigtFitOptions = {}): VoigtFitResult {
  const { window = line.profileWindow ?? line.window, maxShift = 5, noiseCorrelation = 1, maxIterations = 100 } = options
  const { wavelength: w, flux, error, mask } = spectrum
  const first = lowerBound(w, window[0])
  const end = lowerBound(w, window[1] + 1e-9)
  let count = 0
  for (let i = first; i < end; i++) {
    if (w[i]! < window[0] || w[i]! > window[1]) continue
    if ((mask && mask[i] !== 0) || !Number.isFinite(flux[i]!)) continue
    count++
  }
  if (count < 12) return { ok: false, reason: `only ${count} usable pixels in ${window[0]}–${window[1]} Å` }
  const x = new Float64Array(count)
  const y = new Float64Array(count)
  const weights = new Float64Array(count)
  let k = 0
  let deepest = 0
  for (let i = first; i < end; i++) {
    if (w[i]! < window[0] || w[i]! > window[1]) continue
    if ((mask && mask[i] !== 0) || !Number.isFinite(flux[i]!)) continue
    x[k] = w[i]!
    y[k] = flux[i]!
    const e = error ? error[i]! : 1
    weights[k] = e > 0 && Number.isFinite(e) ? 1 / (e * e) : 0
    if (y[k]! < y[deepest]!) deepest = k
    k++
  }
  const level0 = Math.max(y[0]!, y[count - 1]!)
  const depth0 = level0 - y[deepest]!
  if (!(depth0 > 0)) return { ok: false, reason: 'no absorption in the fitting window' }
  let left = x[0]!
  for (let j = deepest; j >= 0; j--)
    if (level0 - y[j]! < depth0 / 2) {
      left = x[j]!
      break
    }
  let right = x[count - 1]!
  for (let j = deepest; j < count; j++)
    if (level0 - y[j]! < depth0 / 2) {
      right = x[j]!
      break
    }
  const fwhm0 = Math.max(right - left, 2 * (x[1]! - x[0]!))
  const pixel = (window[1] - window[0]) / count
  const minSigma = Math.max(options.minSigma ?? 0, pixel / 4)
  const sigma0 = Math.max((0.6 * fwhm0) / gaussianFwhm(1), minSigma)
  const gamma0 = 0.25 * fwhm0
  const area0 = depth0 / voigtProfile(0, sigma0, gamma0)
  const span = window[1] - window[0]

  const d: VoigtDerivatives = { value: 0, dx: 0, dSigma: 0, dGamma: 0 }
  const model = (p: Float64Array, values: Float64Array, jac: Float64Array) => {
    const area = p[0]!
    const mu = p[1]!
    const sigma = p[2]!
    const gamma = p[3]!
    const level = p[4]!
    for (let i = 0; i < count; i++) {
      voigtWithDerivatives(x[i]! - mu, sigma, gamma, d)
      values[i] = level - area * d.value
      const r = i * 5
      jac[r] = -d.value
      jac[r + 1] = area * d.dx
      jac[r + 2] = -area * d.dSigma
      jac[r + 3] = -area * d.dGamma
      jac[r + 4] = 1
    }
  }
  const result = fitLevenbergMarquardt(model, y, weights, [area0, line.wavelength, sigma0, gamma0, level0], {
    maxIterations,
    lower: [0, line.wavelength - maxShift, minSigma, 0, 0.3],
    // A window holds 100–300 pixels, so a fall below 1e-5 of χ² is below 0.01 of the reduced χ²:
    // the negligible fall at which Press et al. (Numerical Recipes, §15.5) stop. A third fewer
    // model evaluations than 1e-7.
    tolerance: 1e-5,
    upper: [Infinity, line.wavelength + maxShift, span / 2, span, 1.7],
  })
  const [area, centre, sigma, gamma, level] = result.params as unknown as [number, number, number, number, number]
  const dof = Math.max(1, count - 5)
  const reduced = result.chiSquare / dof
  const scale = (error ? Math.max(1, reduced) : reduced) * noiseCorrelation
  const sd = (j: number) => Math.sqrt(Math.max(0, result.covariance[j * 5 + j]! * scale))
  if (!Number.isFinite(area) || !Number.isFinite(sigma) || !Number.isFinite(gamma)) {
    return { ok: false, reason: 'the fit did not converge to finite values' }
  }
  const fg = gaussianFwhm(sigma)
  return {
    ok: true,
    fit: {
      centre,
      sigma,
      gamma,
      gaussianFwhm: fg,
      lorentzianFwhm: 2 * gamma,
      fwhm: voigtFwhmApproximation(fg, 2 * gamma),
      equivalentWidth: area / level,
      level,
      errors: { centre: sd(1), sigma: sd(2), gamma: sd(3), equivalentWidth: sd(0) / level },
      reducedChiSquare: error ? reduced : Number.NaN,
      converged: result.converged,
      iterations: result.iterations,
      evaluations: result.evaluations,
      window,
    },
  }
}
