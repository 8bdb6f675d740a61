/**
 * Interstellar extinction: the mean R_V-dependent law of Cardelli, Clayton & Mathis (1989,
 * ApJ 345, 245; "CCM89"), A(λ)/A(V) = a(x) + b(x)/R_V with x = 1/λ in µm⁻¹.
 */
import type { Spectrum1D } from './spectrum'

/** The Galactic mean ratio of total to selective extinction, A(V)/E(B−V) (CCM89). */
export const DEFAULT_RV = 3.1

/** Shortest and longest wavenumber (µm⁻¹) covered by CCM89: 10 µm⁻¹ (1000 Å) and 0.3 µm⁻¹ (3.33 µm). */
export const CCM89_X_RANGE = [0.3, 10] as const

/**
 * The coefficients a(x), b(x) of CCM89 at wavenumber x (µm⁻¹): the infrared power law
 * (0.3 ≤ x < 1.1, eqs. 2a–b), the optical/near-infrared seventh-order polynomials in y = x − 1.82
 * (1.1 ≤ x < 3.3, eqs. 3a–b), the ultraviolet Drude-like bump with far-UV curvature above
 * x = 5.9 (3.3 ≤ x < 8, eqs. 4a–b), and the far-ultraviolet cubic (8 ≤ x ≤ 10, eqs. 5a–b).
 * @throws RangeError outside 0.3 ≤ x ≤ 10 µm⁻¹
 */
export function ccm89Coefficients(x: number): { a: number; b: number } {
  if (!(x >= CCM89_X_RANGE[0] && x <= CCM89_X_RANGE[1])) {
    throw new RangeError(`wavenumber ${x} µm⁻¹ is outside the CCM89 range 0.3–10 µm⁻¹ (1000 Å–3.33 µm)`)
  }
  if (x < 1.1) {
    const p = x ** 1.61
    return { a: 0.574 * p, b: -0.527 * p }
  }
  if (x < 3.3) {
    const y = x - 1.82
    const a = 1 + y * (0.17699 + y * (-0.50447 + y * (-0.02427 + y * (0.72085 + y * (0.01979 + y * (-0.7753 + y * 0.32999))))))
    const b = y * (1.41338 + y * (2.28305 + y * (1.07233 + y * (-5.38434 + y * (-0.62251 + y * (5.3026 + y * -2.09002))))))
    return { a, b }
  }
  if (x < 8) {
    let fa = 0
    let fb = 0
    if (x >= 5.9) {
      const d = x - 5.9
      fa = -0.04473 * d * d - 0.009779 * d * d * d
      fb = 0.213 * d * d + 0.1207 * d * d * d
    }
    const a = 1.752 - 0.316 * x - 0.104 / ((x - 4.67) ** 2 + 0.341) + fa
    const b = -3.09 + 1.825 * x + 1.206 / ((x - 4.62) ** 2 + 0.263) + fb
    return { a, b }
  }
  const d = x - 8
  return {
    a: -1.073 - 0.628 * d + 0.137 * d * d - 0.07 * d * d * d,
    b: 13.67 + 4.257 * d - 0.42 * d * d + 0.374 * d * d * d,
  }
}

/**
 * A(λ)/A(V) of the CCM89 law at a wavelength in Å (1000 Å – 33 333 Å).
 * @param wavelength Å
 * @param rv R_V = A(V)/E(B−V); @default 3.1
 * @throws RangeError outside the law's range, or for R_V ≤ 0
 */
export function ccm89(wavelength: number, rv: number = DEFAULT_RV): number {
  if (!(rv > 0)) throw new RangeError(`R_V must be > 0, got ${rv}`)
  if (!(wavelength > 0)) throw new RangeError(`wavelength must be > 0 Å, got ${wavelength}`)
  const { a, b } = ccm89Coefficients(1e4 / wavelength)
  return a + b / rv
}

/**
 * Extinction A(λ) in magnitudes at a wavelength in Å, from A(V) or from E(B−V) (A(V) = R_V·E(B−V)).
 * @param options.av A(V) in mag (give this or `ebv`)
 * @param options.ebv E(B−V) in mag
 * @param options.rv R_V; @default 3.1
 */
export function extinctionMagnitudes(wavelength: number, options: { av?: number; ebv?: number; rv?: number }): number {
  const rv = options.rv ?? DEFAULT_RV
  return visualExtinction(options, rv) * ccm89(wavelength, rv)
}

function visualExtinction(options: { av?: number; ebv?: number }, rv: number): number {
  if (options.av !== undefined && options.ebv !== undefined) throw new RangeError('give A(V) or E(B−V), not both')
  if (options.av !== undefined) return options.av
  if (options.ebv !== undefined) return rv * options.ebv
  throw new RangeError('give A(V) or E(B−V)')
}

/**
 * Removes CCM89 extinction from a spectrum: flux and error × 10^(0.4·A(λ)). Returns a new spectrum
 * (wavelength and mask arrays are shared, flux and error are new).
 * @param options.av A(V) in mag (or `ebv`, E(B−V) in mag)
 * @param options.rv R_V; @default 3.1
 */
export function spectrumDeredden(spectrum: Spectrum1D, options: { av?: number; ebv?: number; rv?: number }): Spectrum1D {
  const rv = options.rv ?? DEFAULT_RV
  const av = visualExtinction(options, rv)
  const n = spectrum.wavelength.length
  const flux = new Float64Array(n)
  const error = spectrum.error === undefined ? undefined : new Float64Array(n)
  for (let i = 0; i < n; i++) {
    const factor = 10 ** (0.4 * av * ccm89(spectrum.wavelength[i]!, rv))
    flux[i] = spectrum.flux[i]! * factor
    if (error !== undefined) error[i] = spectrum.error![i]! * factor
  }
  const out: Spectrum1D = { wavelength: spectrum.wavelength, flux }
  if (error !== undefined) out.error = error
  if (spectrum.mask !== undefined) out.mask = spectrum.mask
  return out
}
