/**
 * MK spectral type and luminosity class → effective temperature, surface gravity, absolute
 * visual magnitude and bolometric correction.
 *
 * Every table below is keyed by the numeric type code (O0 = 0 … O9 = 9, B0 = 10, A0 = 20,
 * F0 = 30, G0 = 40, K0 = 50, M0 = 60; "K1.5" = 51.5) and interpolated linearly in it, so
 * fractional subtypes work everywhere inside a table's range. Outside it a lookup throws:
 * extrapolating a calibration hides a classification that the calibration never covered.
 *
 * Sources (all values typed in from memory, rounded; confirm against the papers before
 * quoting a number in print):
 * - Teff, class V: Pecaut & Mamajek (2013, ApJS 208, 9), the dwarf colour–Teff sequence as
 *   updated online; the check values in the project's reference sheet are used where given.
 * - Teff, O stars of classes III and I: Martins, Schaerer & Hillier (2005, A&A 436, 1049),
 *   observational scale.
 * - Teff, classes III and I for B–M: Schmidt-Kaler (1982, Landolt–Börnstein VI/2b);
 *   M supergiants after Levesque et al. (2005, ApJ 628, 973).
 * - Teff, class IV: between V and III, after Straižys & Kuriliene (1981, Ap&SS 80, 353).
 * - Teff, class II: the mean of the III and I scales (no separate table is in common use).
 * - log g: Straižys & Kuriliene (1981) and Martins et al. (2005) for O stars.
 * - M_V: Schmidt-Kaler (1982).
 * - BC_V: Flower (1996, ApJ 469, 355), polynomial in log Teff with the coefficients as
 *   corrected by Torres (2010, AJ 140, 1158).
 */

/** MK spectral letters covered by the calibrations, hottest first. */
export const SPECTRAL_LETTERS = ['O', 'B', 'A', 'F', 'G', 'K', 'M'] as const
export type SpectralLetter = (typeof SPECTRAL_LETTERS)[number]

/** MK luminosity classes covered by the calibrations, brightest first. */
export const LUMINOSITY_CLASSES = ['Ia', 'Ib', 'II', 'III', 'IV', 'V'] as const
export type LuminosityClass = (typeof LUMINOSITY_CLASSES)[number]

/** A spectral type split into letter and (possibly fractional) subtype, e.g. K 1.5. */
export interface SpectralTypeParts {
  letter: SpectralLetter
  subtype: number
}

/**
 * Numeric type code of a spectral type: O0 = 0 … O9 = 9, B0 = 10, A0 = 20, F0 = 30, G0 = 40,
 * K0 = 50, M0 = 60; fractional subtypes carry over ("K1.5" = 51.5). Convention of this project.
 * @param letter MK letter O, B, A, F, G, K or M
 * @param subtype 0 ≤ subtype < 10
 */
export function typeCode(letter: SpectralLetter, subtype: number): number {
  const index = SPECTRAL_LETTERS.indexOf(letter)
  if (index < 0) throw new RangeError(`unknown spectral letter: ${String(letter)}`)
  if (!Number.isFinite(subtype) || subtype < 0 || subtype >= 10) {
    throw new RangeError(`subtype must satisfy 0 ≤ subtype < 10, got ${subtype}`)
  }
  return index * 10 + subtype
}

/**
 * Inverse of {@link typeCode}: 51.5 → { letter: 'K', subtype: 1.5 }.
 * @param code 0 ≤ code < 70
 */
export function spectralTypeFromCode(code: number): SpectralTypeParts {
  if (!Number.isFinite(code) || code < 0 || code >= 70) {
    throw new RangeError(`type code must satisfy 0 ≤ code < 70, got ${code}`)
  }
  const index = Math.floor(code / 10)
  const letter = SPECTRAL_LETTERS[index]!
  // Round away binary noise such as 51.49999999 from arithmetic on codes.
  const subtype = Math.round((code - index * 10) * 1e9) / 1e9
  return { letter, subtype }
}

/** "K1.5" style label of a type code. */
export function spectralTypeLabel(code: number): string {
  const { letter, subtype } = spectralTypeFromCode(code)
  return `${letter}${subtype}`
}

/** One calibration: anchor points (type code, value) in ascending code order. */
interface CalibrationTable {
  source: string
  points: ReadonlyArray<readonly [number, number]>
}

type ClassTables = Record<LuminosityClass, CalibrationTable>

// Letters → codes for readability of the tables below.
const O = 0
const B = 10
const A = 20
const F = 30
const G = 40
const K = 50
const M = 60

// prettier-ignore
const TEFF_DWARFS: CalibrationTable = {
  source: 'Pecaut & Mamajek (2013), dwarf sequence (from memory)',
  points: [
    [O + 3, 44900], [O + 4, 42900], [O + 5, 41400], [O + 6, 39500], [O + 7, 37100], [O + 8, 35100],
    [O + 9, 33300], [O + 9.5, 31900], [B + 0, 31400], [B + 0.5, 29000], [B + 1, 26000],
    [B + 1.5, 24500], [B + 2, 20600], [B + 2.5, 18500], [B + 3, 17000], [B + 4, 16700],
    [B + 5, 15700], [B + 6, 14500], [B + 7, 14000], [B + 8, 12500], [B + 9, 10700],
    [B + 9.5, 10400], [A + 0, 9700], [A + 1, 9300], [A + 2, 8800], [A + 3, 8600], [A + 4, 8250],
    [A + 5, 8180], [A + 6, 7920], [A + 7, 7760], [A + 8, 7590], [A + 9, 7400], [F + 0, 7220],
    [F + 1, 7020], [F + 2, 6820], [F + 3, 6750], [F + 4, 6670], [F + 5, 6510], [F + 6, 6340],
    [F + 7, 6280], [F + 8, 6180], [F + 9, 6040], [G + 0, 5920], [G + 1, 5860], [G + 2, 5770],
    [G + 3, 5720], [G + 4, 5680], [G + 5, 5660], [G + 6, 5600], [G + 7, 5550], [G + 8, 5480],
    [G + 9, 5380], [K + 0, 5270], [K + 1, 5170], [K + 2, 5100], [K + 3, 4830], [K + 4, 4600],
    [K + 5, 4440], [K + 6, 4300], [K + 7, 4100], [K + 8, 3990], [K + 9, 3930], [M + 0, 3850],
    [M + 0.5, 3770], [M + 1, 3660], [M + 1.5, 3620], [M + 2, 3560], [M + 2.5, 3470],
    [M + 3, 3430], [M + 3.5, 3270], [M + 4, 3210], [M + 4.5, 3110], [M + 5, 3060],
  ],
}

// prettier-ignore
const TEFF_SUBGIANTS: CalibrationTable = {
  source: 'after Straižys & Kuriliene (1981), between the V and III scales (from memory)',
  points: [
    [B + 0, 30500], [B + 2, 20300], [B + 5, 15300], [B + 8, 12300], [A + 0, 9750], [A + 5, 8150],
    [F + 0, 7170], [F + 5, 6420], [G + 0, 5800], [G + 5, 5350], [G + 8, 5100], [K + 0, 4950],
    [K + 1, 4800], [K + 2, 4680], [K + 3, 4550],
  ],
}

// prettier-ignore
const TEFF_GIANTS: CalibrationTable = {
  source: 'Martins et al. (2005) for O; Schmidt-Kaler (1982) for B–M (from memory)',
  points: [
    [O + 3, 42940], [O + 4, 41490], [O + 5, 40060], [O + 6, 37650], [O + 7, 35720], [O + 8, 33750],
    [O + 9, 31810], [O + 9.5, 30830], [B + 0, 29000], [B + 1, 24000], [B + 2, 20300],
    [B + 3, 17100], [B + 5, 15000], [B + 7, 13000], [B + 8, 12400], [B + 9, 10900], [A + 0, 10100],
    [A + 2, 9000], [A + 5, 8100], [A + 7, 7650], [F + 0, 7150], [F + 2, 6870], [F + 5, 6470],
    [F + 8, 6070], [G + 0, 5850], [G + 2, 5500], [G + 5, 5150], [G + 8, 4800], [K + 0, 4660],
    [K + 1, 4500], [K + 2, 4390], [K + 3, 4250], [K + 4, 4150], [K + 5, 4050], [M + 0, 3850],
    [M + 1, 3750], [M + 2, 3660], [M + 3, 3560], [M + 4, 3460], [M + 5, 3380],
  ],
}

// prettier-ignore
const TEFF_SUPERGIANTS: CalibrationTable = {
  source:
    'Martins et al. (2005) for O; Schmidt-Kaler (1982) for B–K; Levesque et al. (2005) for M (from memory)',
  points: [
    [O + 3, 42550], [O + 4, 40700], [O + 5, 38520], [O + 6, 36160], [O + 7, 33940], [O + 8, 31720],
    [O + 9, 29510], [O + 9.5, 28400], [B + 0, 26000], [B + 1, 20800], [B + 2, 17600],
    [B + 3, 16000], [B + 5, 13600], [B + 7, 12200], [B + 8, 11100], [B + 9, 10500], [A + 0, 9980],
    [A + 2, 9380], [A + 5, 8610], [F + 0, 7460], [F + 2, 7030], [F + 5, 6370], [F + 8, 5750],
    [G + 0, 5370], [G + 2, 5190], [G + 5, 4930], [G + 8, 4700], [K + 0, 4550], [K + 2, 4310],
    [K + 3, 4100], [K + 5, 3900], [M + 0, 3790], [M + 1, 3745], [M + 2, 3660], [M + 3, 3605],
    [M + 4, 3535], [M + 5, 3450],
  ],
}

/** Class II has no table of its own in common use: the mean of the III and I scales. */
function meanTable(a: CalibrationTable, b: CalibrationTable, source: string): CalibrationTable {
  const lo = Math.max(a.points[0]![0], b.points[0]![0])
  const hi = Math.min(a.points[a.points.length - 1]![0], b.points[b.points.length - 1]![0])
  const codes = [...new Set([...a.points, ...b.points].map(([c]) => c))].filter((c) => c >= lo && c <= hi).sort((x, y) => x - y)
  return {
    source,
    points: codes.map((c) => [c, Math.round((interpolate(a, c) + interpolate(b, c)) / 2)] as const),
  }
}

const TEFF: ClassTables = {
  Ia: TEFF_SUPERGIANTS,
  Ib: TEFF_SUPERGIANTS,
  II: meanTable(TEFF_GIANTS, TEFF_SUPERGIANTS, 'mean of the III and I scales: Martins et al. (2005), Schmidt-Kaler (1982), Levesque et al. (2005) (from memory)'),
  III: TEFF_GIANTS,
  IV: TEFF_SUBGIANTS,
  V: TEFF_DWARFS,
}

const LOGG_SOURCE = 'Straižys & Kuriliene (1981); Martins et al. (2005) for O stars (from memory)'
// prettier-ignore
const LOGG: ClassTables = {
  Ia: {
    source: LOGG_SOURCE,
    points: [[O + 3, 3.7], [O + 5, 3.55], [O + 9, 3.15], [B + 0, 2.9], [B + 5, 2.1], [A + 0, 1.8],
      [F + 0, 1.3], [G + 0, 1.0], [K + 0, 0.6], [M + 0, 0.1], [M + 5, -0.2]],
  },
  Ib: {
    source: LOGG_SOURCE,
    points: [[O + 3, 3.75], [O + 5, 3.6], [O + 9, 3.3], [B + 0, 3.0], [B + 5, 2.5], [A + 0, 2.2],
      [F + 0, 1.8], [G + 0, 1.5], [K + 0, 1.1], [M + 0, 0.6], [M + 5, 0.2]],
  },
  II: {
    source: LOGG_SOURCE,
    points: [[O + 3, 3.8], [O + 5, 3.65], [O + 9, 3.4], [B + 0, 3.2], [B + 5, 3.0], [A + 0, 2.8],
      [F + 0, 2.5], [G + 0, 2.1], [K + 0, 1.7], [K + 5, 1.2], [M + 0, 1.0], [M + 5, 0.5]],
  },
  III: {
    source: LOGG_SOURCE,
    points: [[O + 3, 3.85], [O + 5, 3.73], [O + 9, 3.57], [B + 0, 3.5], [B + 5, 3.6], [A + 0, 3.7],
      [F + 0, 3.5], [G + 0, 3.0], [G + 5, 2.7], [K + 0, 2.5], [K + 5, 1.7], [M + 0, 1.5],
      [M + 5, 0.8]],
  },
  IV: {
    source: LOGG_SOURCE,
    points: [[B + 0, 3.8], [A + 0, 3.9], [F + 0, 3.9], [G + 0, 3.9], [K + 0, 3.6], [K + 3, 3.4]],
  },
  V: {
    source: LOGG_SOURCE,
    points: [[O + 3, 3.92], [O + 5, 3.92], [O + 9, 3.95], [B + 0, 4.0], [B + 5, 4.1], [A + 0, 4.2],
      [F + 0, 4.3], [G + 0, 4.4], [K + 0, 4.55], [K + 5, 4.6], [M + 0, 4.65], [M + 5, 4.95]],
  },
}

const MV_SOURCE = 'Schmidt-Kaler (1982), Landolt–Börnstein VI/2b (from memory, rounded)'
// prettier-ignore
const ABSOLUTE_MAGNITUDE_V: ClassTables = {
  Ia: {
    source: MV_SOURCE,
    points: [[O + 5, -6.6], [B + 0, -6.9], [B + 5, -7.0], [A + 0, -7.1], [F + 0, -8.0],
      [G + 0, -8.0], [K + 0, -7.5], [M + 0, -7.0], [M + 5, -7.0]],
  },
  Ib: {
    source: MV_SOURCE,
    points: [[O + 5, -6.3], [B + 0, -5.8], [B + 5, -5.4], [A + 0, -5.0], [F + 0, -4.7],
      [G + 0, -4.5], [K + 0, -4.5], [M + 0, -4.5], [M + 5, -4.5]],
  },
  II: {
    source: MV_SOURCE,
    points: [[O + 5, -6.1], [B + 0, -5.4], [B + 5, -4.0], [A + 0, -3.0], [F + 0, -2.5],
      [G + 0, -2.2], [K + 0, -2.1], [K + 5, -2.2], [M + 0, -2.4], [M + 5, -2.4]],
  },
  III: {
    source: MV_SOURCE,
    points: [[O + 5, -5.9], [O + 9, -5.3], [B + 0, -5.1], [B + 5, -2.2], [A + 0, 0.0],
      [A + 5, 0.7], [F + 0, 1.5], [F + 5, 1.6], [G + 0, 1.0], [G + 5, 0.9], [K + 0, 0.7],
      [K + 5, -0.2], [M + 0, -0.4], [M + 5, -0.3]],
  },
  IV: {
    source: MV_SOURCE,
    points: [[B + 0, -4.6], [A + 0, 0.2], [F + 0, 2.0], [G + 0, 3.0], [G + 5, 3.1], [K + 0, 3.1],
      [K + 3, 3.4]],
  },
  V: {
    source: MV_SOURCE,
    points: [[O + 5, -5.7], [O + 6, -5.5], [O + 7, -5.2], [O + 8, -4.9], [O + 9, -4.5],
      [B + 0, -4.0], [B + 1, -3.2], [B + 2, -2.45], [B + 3, -1.6], [B + 5, -1.2], [B + 6, -0.9],
      [B + 7, -0.6], [B + 8, -0.25], [B + 9, 0.2], [A + 0, 0.65], [A + 2, 1.3], [A + 3, 1.5],
      [A + 5, 1.95], [A + 7, 2.2], [F + 0, 2.7], [F + 2, 3.1], [F + 5, 3.5], [F + 8, 4.0],
      [G + 0, 4.4], [G + 2, 4.7], [G + 5, 5.1], [G + 8, 5.5], [K + 0, 5.9], [K + 2, 6.4],
      [K + 5, 7.35], [K + 7, 8.1], [M + 0, 8.8], [M + 1, 9.3], [M + 2, 9.9], [M + 3, 10.4],
      [M + 4, 11.3], [M + 5, 12.3]],
  },
}

/** Names the published calibration behind each quantity, per class. */
export const CALIBRATION_SOURCES: Readonly<Record<'teff' | 'logg' | 'absoluteMagnitudeV', Record<LuminosityClass, string>> & { bolometricCorrectionV: string }> = {
  teff: mapClasses(TEFF),
  logg: mapClasses(LOGG),
  absoluteMagnitudeV: mapClasses(ABSOLUTE_MAGNITUDE_V),
  bolometricCorrectionV: 'Flower (1996) with the coefficients corrected by Torres (2010) (from memory)',
}

function mapClasses(tables: ClassTables): Record<LuminosityClass, string> {
  const out = {} as Record<LuminosityClass, string>
  for (const c of LUMINOSITY_CLASSES) out[c] = tables[c].source
  return out
}

function interpolate(table: CalibrationTable, code: number): number {
  const p = table.points
  for (let i = 1; i < p.length; i++) {
    const [c1, v1] = p[i]!
    if (code <= c1) {
      const [c0, v0] = p[i - 1]!
      return v0 + ((v1 - v0) * (code - c0)) / (c1 - c0)
    }
  }
  return p[p.length - 1]![1]
}

function lookUp(tables: ClassTables, quantity: string, code: number, luminosityClass: LuminosityClass): number {
  const table = tables[luminosityClass]
  if (!table) throw new RangeError(`unknown luminosity class: ${String(luminosityClass)}`)
  const [lo, hi] = rangeOf(table)
  if (!(code >= lo && code <= hi)) {
    const label = Number.isFinite(code) && code >= 0 && code < 70 ? spectralTypeLabel(code) : String(code)
    throw new RangeError(`no ${quantity} calibration for ${label} ${luminosityClass} (defined ${spectralTypeLabel(lo)}–${spectralTypeLabel(hi)})`)
  }
  return interpolate(table, code)
}

function rangeOf(table: CalibrationTable): [number, number] {
  return [table.points[0]![0], table.points[table.points.length - 1]![0]]
}

/**
 * Type-code range over which Teff, log g and M_V are all defined for a class
 * (the intersection of the three tables).
 */
export function calibratedRange(luminosityClass: LuminosityClass): readonly [number, number] {
  const ranges = [TEFF, LOGG, ABSOLUTE_MAGNITUDE_V].map((t) => rangeOf(t[luminosityClass]))
  return [Math.max(...ranges.map((r) => r[0])), Math.min(...ranges.map((r) => r[1]))]
}

/** True when {@link stellarParameters} can answer for this type code and class. */
export function isCalibrated(code: number, luminosityClass: LuminosityClass): boolean {
  const [lo, hi] = calibratedRange(luminosityClass)
  return code >= lo && code <= hi
}

/**
 * Effective temperature, K, linearly interpolated in type code in the class's table
 * (sources in {@link CALIBRATION_SOURCES}). Throws a RangeError outside the table.
 */
export function effectiveTemperature(code: number, luminosityClass: LuminosityClass): number {
  return lookUp(TEFF, 'Teff', code, luminosityClass)
}

/** Surface gravity log10(g / cm s⁻²), interpolated as {@link effectiveTemperature}. */
export function surfaceGravity(code: number, luminosityClass: LuminosityClass): number {
  return lookUp(LOGG, 'log g', code, luminosityClass)
}

/** Absolute visual magnitude M_V, mag, after Schmidt-Kaler (1982), interpolated in type code. */
export function absoluteMagnitudeV(code: number, luminosityClass: LuminosityClass): number {
  return lookUp(ABSOLUTE_MAGNITUDE_V, 'M_V', code, luminosityClass)
}

// Flower (1996) Table 6 polynomial in log Teff, coefficients as corrected by Torres (2010, Table 1).
const BC_COEFFICIENTS: ReadonlyArray<{ below: number; c: readonly number[] }> = [
  { below: 3.7, c: [-0.190537291496456e5, 0.155144866764412e5, -0.421278819301717e4, 0.381476328422343e3] },
  {
    below: 3.9,
    c: [-0.370510203809015e5, 0.385672629965804e5, -0.150651486316025e5, 0.261724637119416e4, -0.170623810323864e3],
  },
  {
    below: Infinity,
    c: [-0.118115450538963e6, 0.137145973583929e6, -0.636233812100225e5, 0.147412923562646e5, -0.170587278406872e4, 0.78873172180499e2],
  },
]

/**
 * Bolometric correction in V, mag, as a function of Teff alone: the polynomial in log Teff of
 * Flower (1996) with the coefficients corrected by Torres (2010). On this scale M_bol,☉ = 4.73
 * (Torres 2010). Defined here for 2500 K ≤ Teff ≤ 60000 K; Flower's sample holds few stars
 * below ~3300 K, where the polynomial is more negative than dwarf-specific scales.
 * @param teff effective temperature, K
 */
export function bolometricCorrectionV(teff: number): number {
  if (!(teff >= 2500 && teff <= 60000)) throw new RangeError(`no BC_V calibration for Teff = ${teff} K (defined 2500–60000 K)`)
  const x = Math.log10(teff)
  const set = BC_COEFFICIENTS.find((s) => x < s.below)!
  let bc = 0
  for (let k = set.c.length - 1; k >= 0; k--) bc = bc * x + set.c[k]!
  return bc
}

/** The solar bolometric magnitude on the BC scale of {@link bolometricCorrectionV} (Torres 2010). */
export const SOLAR_BOLOMETRIC_MAGNITUDE = 4.73

/** Calibrated parameters of one MK type and class. */
export interface StellarParameters {
  /** Effective temperature, K. */
  teff: number
  /** log10 surface gravity, cgs. */
  logg: number
  /** Absolute visual magnitude, mag. */
  absoluteMagnitudeV: number
  /** Bolometric correction in V at this Teff, mag. */
  bolometricCorrectionV: number
  /** M_V + BC_V, mag. */
  absoluteBolometricMagnitude: number
  /** L/L☉ from M_bol with M_bol,☉ = 4.73. */
  luminositySolar: number
}

/**
 * All calibrated parameters for a type code and class. Throws a RangeError where any of the
 * tables does not cover the type (see {@link isCalibrated}).
 */
export function stellarParameters(code: number, luminosityClass: LuminosityClass): StellarParameters {
  const teff = effectiveTemperature(code, luminosityClass)
  const logg = surfaceGravity(code, luminosityClass)
  const mv = absoluteMagnitudeV(code, luminosityClass)
  const bc = bolometricCorrectionV(teff)
  const mbol = mv + bc
  return {
    teff,
    logg,
    absoluteMagnitudeV: mv,
    bolometricCorrectionV: bc,
    absoluteBolometricMagnitude: mbol,
    luminositySolar: 10 ** ((SOLAR_BOLOMETRIC_MAGNITUDE - mbol) / 2.5),
  }
}
