/**
 * Physical parameters derived from a decided MK classification: Teff, M_V, BC_V, M_bol, L/L☉,
 * R/R☉ and, with an apparent magnitude or a parallax, the distance. Every value is a
 * calibration estimate: it carries the spread from the classification's own uncertainty
 * (the calibration evaluated at type ± Δtype and class ± Δclass) and an adopted calibration
 * scatter, combined in quadrature.
 *
 * Constants: IAU 2015 Resolution B3 nominal solar values (L☉ = 3.828e26 W, R☉ = 6.957e8 m,
 * Teff☉ = 5772 K), IAU 2015 Resolution B2 absolute bolometric magnitude of the Sun
 * (M_bol☉ = 4.74), CODATA 2018 Stefan–Boltzmann constant.
 */
import { absoluteMagnitudeV, bolometricCorrectionV, calibratedRange, CALIBRATION_SOURCES, effectiveTemperature, type LuminosityClass } from './calibration'
import { DEFAULT_RV } from './extinction'
import type { MKValue } from './mk'

/** IAU 2015 B3 nominal solar luminosity, W. */
export const SOLAR_LUMINOSITY_W = 3.828e26
/** IAU 2015 B3 nominal solar radius, m. */
export const SOLAR_RADIUS_M = 6.957e8
/** IAU 2015 B3 nominal solar effective temperature, K. */
export const SOLAR_TEFF_K = 5772
/** IAU 2015 B2 absolute bolometric magnitude of the Sun (nominal L☉), mag. */
export const SOLAR_MBOL = 4.74
/** CODATA 2018 Stefan–Boltzmann constant, W m⁻² K⁻⁴. */
export const STEFAN_BOLTZMANN = 5.670374419e-8

/**
 * Calibration scatter adopted for each quantity (1σ), common practice for MK calibrations rather
 * than a published figure: Teff 3 % of the value; M_V 0.3 mag for dwarfs, 0.5 mag for
 * subgiants and giants, 0.8 mag for bright giants and supergiants; BC_V 0.05 mag.
 */
export const CALIBRATION_SCATTER = {
  teffFraction: 0.03,
  absoluteMagnitudeV: { V: 0.3, IV: 0.5, III: 0.5, II: 0.8, Ib: 0.8, Ia: 0.8 } as Record<LuminosityClass, number>,
  bolometricCorrectionV: 0.05,
} as const

/** The calibration classes in class-code order (Ia = 1 … V = 6, as in shared/mk.ts). */
const GRID: ReadonlyArray<{ cls: LuminosityClass; code: number }> = [
  { cls: 'Ia', code: 1 },
  { cls: 'Ib', code: 2 },
  { cls: 'II', code: 3 },
  { cls: 'III', code: 4 },
  { cls: 'IV', code: 5 },
  { cls: 'V', code: 6 },
]

import type { DerivedParameters, Estimate } from './api/derived'

export type { DerivedParameters, Estimate }

/** What the observer supplied beside the classification. */
export interface DerivedInput {
  /** Uncertainty of the type, subtypes. @default 0.5 */
  typeUncertainty?: number
  /** Uncertainty of the luminosity class, class steps (III → IV = 1). @default 0.5 */
  classUncertainty?: number
  /** Apparent visual magnitude, mag. */
  apparentMagnitudeV?: number
  /** A(V), mag (give this or `ebv`). @default 0 */
  av?: number
  /** E(B−V), mag; A(V) = R_V·E(B−V). */
  ebv?: number
  /** R_V. @default 3.1 */
  rv?: number
  /** Trigonometric parallax and its 1σ error, mas. */
  parallaxMas?: number
  parallaxErrorMas?: number
}

/** Distance modulus m − M = 5 log₁₀ d − 5 (d in pc), without extinction. */
export function distanceModulus(distancePc: number): number {
  if (!(distancePc > 0)) throw new RangeError(`distance must be > 0 pc, got ${distancePc}`)
  return 5 * Math.log10(distancePc) - 5
}

/**
 * Distance in pc from the apparent and absolute magnitude and the extinction:
 * m − M = 5 log₁₀ d − 5 + A_V, so d = 10^((m − M − A_V + 5)/5).
 * @default av 0
 */
export function distanceFromMagnitudes(apparent: number, absolute: number, av = 0): number {
  return 10 ** ((apparent - absolute - av + 5) / 5)
}

/** Distance in pc as 1/ϖ from a parallax in mas (no bias correction; fine for ϖ/σ ≳ 5). */
export function distanceFromParallax(parallaxMas: number): number {
  if (!(parallaxMas > 0)) throw new RangeError(`parallax must be > 0 mas, got ${parallaxMas}`)
  return 1000 / parallaxMas
}

/** L/L☉ from the absolute bolometric magnitude: 10^(−0.4 (M_bol − 4.74)) (IAU 2015 B2). */
export function luminosityFromBolometricMagnitude(mbol: number): number {
  return 10 ** (-0.4 * (mbol - SOLAR_MBOL))
}

/**
 * Radius R/R☉ from L/L☉ and Teff (K), by L = 4πR²σTeff⁴ in SI units with the IAU 2015 nominal
 * L☉ and R☉ and CODATA 2018 σ.
 */
export function radiusFromLuminosity(luminositySolar: number, teff: number): number {
  if (!(luminositySolar > 0)) throw new RangeError(`luminosity must be > 0, got ${luminositySolar}`)
  if (!(teff > 0)) throw new RangeError(`Teff must be > 0 K, got ${teff}`)
  const metres = Math.sqrt((luminositySolar * SOLAR_LUMINOSITY_W) / (4 * Math.PI * STEFAN_BOLTZMANN * teff ** 4))
  return metres / SOLAR_RADIUS_M
}

/** L/L☉ from R/R☉ and Teff (K), by L = 4πR²σTeff⁴ (the inverse of {@link radiusFromLuminosity}). */
export function luminosityFromRadius(radiusSolar: number, teff: number): number {
  const r = radiusSolar * SOLAR_RADIUS_M
  return (4 * Math.PI * r * r * STEFAN_BOLTZMANN * teff ** 4) / SOLAR_LUMINOSITY_W
}

/** Values of the calibration at one (type code, class code): classes between grid classes are interpolated linearly. */
interface Point {
  teff: number
  mv: number
  mvScatter: number
}

/** The calibration classes on either side of a class code (the same one twice on a grid class), and the weight of the second. */
function neighbours(classCode: number): { lo: (typeof GRID)[number]; hi: (typeof GRID)[number]; f: number } {
  const i = GRID.findIndex((g) => g.code >= classCode)
  const hi = GRID[Math.max(0, i)]!
  if (hi.code === classCode) return { lo: hi, hi, f: 0 }
  const lo = GRID[Math.max(0, i - 1)]!
  return { lo, hi, f: (classCode - lo.code) / (hi.code - lo.code) }
}

function atClass(code: number, classCode: number): Point {
  const { lo, hi, f } = neighbours(classCode)
  const mix = (x: number, y: number) => x + (y - x) * f
  return {
    teff: mix(effectiveTemperature(code, lo.cls), effectiveTemperature(code, hi.cls)),
    mv: mix(absoluteMagnitudeV(code, lo.cls), absoluteMagnitudeV(code, hi.cls)),
    mvScatter: mix(CALIBRATION_SCATTER.absoluteMagnitudeV[lo.cls], CALIBRATION_SCATTER.absoluteMagnitudeV[hi.cls]),
  }
}

function estimate(value: number, fromClassification: number, calibrationScatter: number): Estimate {
  return { value, uncertainty: Math.hypot(fromClassification, calibrationScatter), fromClassification, calibrationScatter }
}

/**
 * Derives Teff, M_V, BC_V, M_bol, L/L☉, R/R☉ and distances from a decided classification,
 * with the calibrations of shared/calibration.ts (Teff and M_V per class, BC_V of Flower 1996 as
 * corrected by Torres 2010). Luminosity classes between the calibrated ones (Iab, IV-V, IIIb)
 * are interpolated linearly in class code between the neighbouring classes.
 *
 * Uncertainties: each quantity is evaluated at type ± `typeUncertainty` and class ±
 * `classUncertainty` (clamped to the calibrated ranges); half of each change, added in
 * quadrature, is the part from the classification. The adopted calibration scatter
 * ({@link CALIBRATION_SCATTER}) is propagated to first order and added in quadrature.
 *
 * White dwarfs, carbon, S and Wolf–Rayet stars, types without a subtype or a class, and classes
 * or types beyond the calibrated grid (0, Ia+, VI; types outside the tables) are flagged
 * "outside the MK grid" and nothing is derived.
 * @default input.typeUncertainty 0.5, input.classUncertainty 0.5, input.av 0, input.rv 3.1
 */
export function deriveParameters(value: MKValue, input: DerivedInput = {}): DerivedParameters {
  const outside = (reason: string): DerivedParameters => ({ ok: false, flag: 'outside the MK grid', reason })
  if (value.kind !== 'mk') return outside(`a ${value.kind} type has no MK calibration`)
  if (value.prefix !== undefined && value.prefix !== 'd' && value.prefix !== 'g' && value.prefix !== 'c') {
    return outside(`the "${value.prefix}" prefix has no MK calibration`)
  }
  const code = value.typeCode
  if (code === undefined) return outside('the type has no subtype')
  const classCode = value.classCode
  if (classCode === undefined) return outside('there is no luminosity class')
  if (classCode < 1 || classCode > 6) return outside(`luminosity class ${value.luminosityClass} is beyond the calibrated classes Ia–V`)
  const dt = input.typeUncertainty ?? 0.5
  const dc = input.classUncertainty ?? 0.5
  if (!(dt >= 0) || !(dc >= 0)) throw new RangeError('uncertainties must be ≥ 0')

  // The type range covered by both neighbouring calibration classes.
  const range = (c: number): [number, number] => {
    const { lo: l, hi: h } = neighbours(c)
    const a = calibratedRange(h.cls)
    const b = calibratedRange(l.cls)
    return [Math.max(a[0], b[0]), Math.min(a[1], b[1])]
  }
  const [lo, hi] = range(classCode)
  if (code < lo || code > hi) return outside(`type code ${code} is outside the calibration (${lo}–${hi}) for class ${value.luminosityClass}`)

  const clampType = (t: number, c: number) => {
    const [a, b] = range(c)
    return Math.min(b, Math.max(a, t))
  }
  const clampClass = (c: number) => Math.min(6, Math.max(1, c))
  const at = (t: number, c: number) => atClass(clampType(t, c), c)

  const rv = input.rv ?? DEFAULT_RV
  if (input.av !== undefined && input.ebv !== undefined) throw new RangeError('give A(V) or E(B−V), not both')
  const av = input.av ?? (input.ebv !== undefined ? rv * input.ebv : 0)

  type Quantities = { teff: number; mv: number; bc: number; mbol: number; lum: number; radius: number; dist?: number }
  const quantities = (p: Point): Quantities => {
    const bc = bolometricCorrectionV(p.teff)
    const mbol = p.mv + bc
    const lum = luminosityFromBolometricMagnitude(mbol)
    const q: Quantities = { teff: p.teff, mv: p.mv, bc, mbol, lum, radius: radiusFromLuminosity(lum, p.teff) }
    if (input.apparentMagnitudeV !== undefined) q.dist = distanceFromMagnitudes(input.apparentMagnitudeV, p.mv, av)
    return q
  }
  const centre = at(code, classCode)
  const q0 = quantities(centre)
  const qt = [quantities(at(code - dt, classCode)), quantities(at(code + dt, classCode))] as const
  const qc = [quantities(at(code, clampClass(classCode - dc))), quantities(at(code, clampClass(classCode + dc)))] as const
  const spread = (key: keyof Quantities) => Math.hypot(((qt[1][key] ?? 0) - (qt[0][key] ?? 0)) / 2, ((qc[1][key] ?? 0) - (qc[0][key] ?? 0)) / 2)

  // Calibration scatter, first order: σ_T = 3 % T; σ_BC from the BC scale plus its slope in Teff;
  // σ_Mbol² = σ_MV² + σ_BC²; σ_L/L = 0.4 ln10 σ_Mbol; σ_R/R = ½ σ_L/L + 2 σ_T/T.
  const sT = CALIBRATION_SCATTER.teffFraction * q0.teff
  const slope = (bolometricCorrectionV(q0.teff * 1.01) - bolometricCorrectionV(q0.teff * 0.99)) / (0.02 * q0.teff)
  const sBC = Math.hypot(CALIBRATION_SCATTER.bolometricCorrectionV, slope * sT)
  const sMV = centre.mvScatter
  const sMbol = Math.hypot(sMV, sBC)
  const sLrel = 0.4 * Math.LN10 * sMbol
  const sRrel = Math.hypot(0.5 * sLrel, 2 * CALIBRATION_SCATTER.teffFraction)

  const result: DerivedParameters = {
    ok: true,
    sources: {
      teff: CALIBRATION_SOURCES.teff[atClassName(classCode)],
      absoluteMagnitudeV: CALIBRATION_SOURCES.absoluteMagnitudeV[atClassName(classCode)],
      bolometricCorrectionV: CALIBRATION_SOURCES.bolometricCorrectionV,
    },
    teff: estimate(q0.teff, spread('teff'), sT),
    absoluteMagnitudeV: estimate(q0.mv, spread('mv'), sMV),
    bolometricCorrectionV: estimate(q0.bc, spread('bc'), sBC),
    absoluteBolometricMagnitude: estimate(q0.mbol, spread('mbol'), sMbol),
    luminositySolar: estimate(q0.lum, spread('lum'), sLrel * q0.lum),
    radiusSolar: estimate(q0.radius, spread('radius'), sRrel * q0.radius),
    av,
  }
  if (q0.dist !== undefined) {
    // σ_d/d = (ln10/5) σ_MV.
    result.spectroscopicDistancePc = estimate(q0.dist, spread('dist'), (Math.LN10 / 5) * sMV * q0.dist)
  }
  if (input.parallaxMas !== undefined) {
    const d = distanceFromParallax(input.parallaxMas)
    const e = input.parallaxErrorMas ?? 0
    result.parallaxDistancePc = { value: d, uncertainty: (1000 * e) / (input.parallaxMas * input.parallaxMas) }
  }
  return result
}

/** The calibration class nearest a class code, for naming the source. */
function atClassName(classCode: number): LuminosityClass {
  let best = GRID[0]!
  for (const g of GRID) if (Math.abs(g.code - classCode) < Math.abs(best.code - classCode)) best = g
  return best.cls
}
