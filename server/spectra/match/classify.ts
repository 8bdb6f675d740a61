import { DEFAULT_CLASSIFICATION_REGION } from '../../../shared/grid'
import { formatMK, formatTypeCode, parseMK, typeFromCode } from '../../../shared/mk'
import type { LineMeasurement } from '../measure/types'
import { depthScaledChiSquareRows, depthScaledChiSquareSelected, depthScaledPairChiSquare, parabolaVertex, smoothPairChiSquare } from './chi2'
import { CRITERIA, criterionNoise, criterionValue, lowerBound } from './criteria'
import { nearestLevel, type LibraryLevel, type PreparedMatchLibrary } from './library'

/** Quality flags a suggestion can carry. */
export type SuggestionFlag = 'low-snr' | 'emission' | 'poor-fit' | 'outside-grid' | 'possible-composite' | 'not-mk'

/** What the matcher needs of a prepared spectrum (see analyseSpectrum's `prepared`). */
export interface MatchInput {
  /** Continuum-normalised flux on the library grid; NaN where masked. */
  rectified: ArrayLike<number>
  /** Its 1σ error, when known. */
  rectifiedError?: ArrayLike<number>
  /** 1 = pixel not usable. */
  mask?: ArrayLike<number>
  /** S/N per pixel, used for the weights when no errors are given. */
  snr: number | null
  /** Resolution of the spectrum, FWHM Å; when unknown every level is tried and the best kept. */
  fwhm?: number
  /** Line measurements (for the emission flag). */
  lines?: readonly LineMeasurement[]
}

export interface MatchOptions {
  /** Classification region, Å. @default DEFAULT_CLASSIFICATION_REGION (3850–5000) */
  region?: readonly [number, number]
  /**
   * Fractional model error added in quadrature to each pixel's noise, so that at high S/N the
   * fit is not ruled by the standards' own imperfections. @default 0.01
   */
  modelError?: number
  /**
   * Weight factor for pixels in the inner Balmer wings (see `balmerHalfWidth`): the model
   * standards' Balmer lines are too strong (templates/README.md), so letting them rule the
   * fit would push A stars away from their type. @default 0.35
   */
  balmerWeight?: number
  /** Half width of the down-weighted zone around each Balmer line, Å. @default 25 */
  balmerHalfWidth?: number
  /**
   * Weight of the line criteria's log-likelihood in the class posterior; 1 is the plain product
   * of likelihoods, each criterion a Gaussian of width √(noise² + scatter²) (criteria.ts).
   * Off by default: on the tuning set of bench/tune.ts the product lowered the exact-class rate
   * (S/N ≥ 50: 94.8 % at 0, 91.7 % at 0.5, 90.8 % at 1), as the criteria's lines are already
   * in the smooth-mix χ² and their tails are wider than Gaussian. Their votes are still
   * measured and reported. @default 0
   */
  criteriaWeight?: number
  /**
   * Factor on the temperature of the χ² class probability: χ² differences between classes
   * carry model mismatch (between-type interpolation, continuum placement) beyond the photon
   * noise, so they are widened by this factor before the product with the criteria.
   * Calibrated on the tuning set of bench/tune.ts. @default 1
   */
  classTemperature?: number
  /** S/N below which 'low-snr' is set. @default 20 */
  lowSnr?: number
  /** Reduced χ² (noise plus model error) above which 'poor-fit' is set. @default 4 */
  poorFit?: number
  /**
   * Full χ² for every standard instead of the two-stage search (coarse screening on every
   * `coarseStep`-th pixel, then the full χ² for the plausible standards). @default false
   */
  exhaustive?: boolean
  /** Standards always refined with the full χ² in the two-stage search. @default 32 */
  refineCount?: number
  /** Screened log-probability margin within which standards are refined. @default 30 */
  refineMargin?: number
  /**
   * How the χ² class probability is formed. 'smooth-mix': for each class the least χ² over
   * mixes of the standard at the class's best point with each neighbour along type, with a level
   * and depth scale that vary smoothly across the region (see smoothPairChiSquare), so a star
   * between grid types is compared with its class's sequence rather than with whichever grid
   * point lies nearest, and a continuum fitted to the spectrum is not mistaken for a change of
   * line strengths; 'mix': the same with a constant level and depth scale
   * (depthScaledPairChiSquare); 'points': the sum of the grid-point probabilities of the class.
   * @default 'smooth-mix'
   */
  classFit?: 'mix' | 'smooth-mix' | 'points'
}

export interface Candidate {
  standardId: number
  spectralType: string
  source: 'model' | 'observed'
  chi2: number
  reducedChi2: number
  scale: number
  probability: number
}

export interface Vote {
  criterion: string
  name: string
  /** Value measured on the spectrum. */
  value: number | null
  /** Class this criterion prefers, or null when it does not apply or cannot be measured. */
  vote: string | null
  /** Value each class's standards have at the suggested type. */
  standards?: Record<string, number>
  note?: string
}

export interface MatchResult {
  spectralType: string
  letter: string
  subtype: number
  typeCode: number
  luminosityClass: string
  classCode: number
  uncertainty: { subtypes: number; classes: number }
  bestStandardId: number
  candidates: Candidate[]
  votes: Vote[]
  flags: SuggestionFlag[]
  /** Probability of each (type, class) point of the grid, summing to 1 (points with p < 1e-4 left out). */
  probabilities: { typeCode: number; classCode: number; luminosityClass: string; p: number }[]
  libraryVersion: { id: number; name: string }
  /** Resolution level used, FWHM Å. */
  levelFwhm: number
  reducedChi2: number
}

const BALMER = [4861.33, 4340.47, 4101.74, 3970.07, 3889.05, 3835.38]
const CLASS_TEXT: Record<number, string> = { 1: 'Ia', 1.5: 'Iab', 2: 'Ib', 3: 'II', 4: 'III', 5: 'IV', 6: 'V' }
const classText = (code: number) => CLASS_TEXT[code] ?? String(code)

/** Scratch arrays reused across calls of the same library (one spectrum at a time per thread). */
interface Scratch {
  flux: Float64Array
  weights: Float64Array
  chi2: Float64Array
  scale: Float64Array
  used: Float64Array
  /** Decimated flux and weights for the coarse pass. */
  coarseFlux: Float64Array
  coarseWeights: Float64Array
  /** Standards to refine, and which have an exact χ². */
  list: Int32Array
  exact: Uint8Array
  sorted: Float64Array
  /** Balmer weight factor per span pixel, for the settings in `balmerKey`. */
  balmer: Float64Array
  balmerKey: string
}
const scratchByLibrary = new WeakMap<PreparedMatchLibrary, Scratch>()

function scratchFor(library: PreparedMatchLibrary): Scratch {
  let s = scratchByLibrary.get(library)
  if (!s) {
    const n = library.standards.length
    s = {
      flux: new Float64Array(library.pixels),
      weights: new Float64Array(library.pixels),
      chi2: new Float64Array(n),
      scale: new Float64Array(n),
      used: new Float64Array(n),
      coarseFlux: new Float64Array(library.coarsePixels),
      coarseWeights: new Float64Array(library.coarsePixels),
      list: new Int32Array(n),
      exact: new Uint8Array(n),
      sorted: new Float64Array(n),
      balmer: new Float64Array(library.pixels),
      balmerKey: '',
    }
    scratchByLibrary.set(library, s)
  }
  return s
}

/**
 * Fills the scratch flux and weights over the library span: w = 1/(σ² + (modelError·f)²),
 * σ from the errors or 1/S/N, times `balmerWeight` near Balmer lines, 0 outside the region or
 * where masked. Returns the region's [from, to) column range.
 */
function fillWeights(library: PreparedMatchLibrary, input: MatchInput, options: Required<Pick<MatchOptions, 'modelError' | 'balmerWeight' | 'balmerHalfWidth'>> & { region: readonly [number, number] }, s: Scratch): [number, number] {
  const { wavelength, offset, pixels } = library
  const from = lowerBound(wavelength, options.region[0])
  const to = lowerBound(wavelength, options.region[1])
  const key = `${options.balmerWeight}|${options.balmerHalfWidth}`
  if (s.balmerKey !== key) {
    // Depends only on the settings, so it is filled once per library and settings.
    for (let i = 0; i < pixels; i++) {
      const lambda = wavelength[i]!
      s.balmer[i] = BALMER.some((c) => Math.abs(lambda - c) < options.balmerHalfWidth) ? options.balmerWeight : 1
    }
    s.balmerKey = key
  }
  const snrSigma = input.snr !== null && input.snr > 0 ? 1 / input.snr : 0.02
  const m2 = options.modelError * options.modelError
  for (let i = 0; i < pixels; i++) {
    const g = i + offset
    const f = input.rectified[g]!
    const bad = (input.mask !== undefined && input.mask[g] !== 0) || !Number.isFinite(f)
    s.flux[i] = bad ? 0 : f
    if (bad || i < from || i >= to) {
      s.weights[i] = 0
      continue
    }
    const e = input.rectifiedError?.[g]
    const sigma = e !== undefined && Number.isFinite(e) && e > 0 ? e : snrSigma
    const f2 = f * f
    s.weights[i] = s.balmer[i]! / (sigma * sigma + m2 * (f2 > 0.01 ? f2 : 0.01))
  }
  return [from, to]
}

interface LevelFit {
  level: LibraryLevel
  chi2: Float64Array
  scale: Float64Array
  used: Float64Array
  best: number
}

/** Search settings of {@link fitLevel}. */
interface SearchSettings {
  exhaustive: boolean
  refineCount: number
  refineMargin: number
}

/**
 * χ² of every standard at one level. Exhaustive: the full χ² of each. Otherwise in two stages:
 * the χ² on every `coarseStep`-th pixel (scaled to the full pixel count) screens all standards,
 * then the full χ² is computed for the best `refineCount`, for every standard whose screened
 * log-probability lies within `refineMargin` of the best (so every standard with a
 * non-negligible probability, p > e^−margin, is exact), and for the best point of each class
 * with its neighbours along type (which the subtype parabola reads). Standards left out keep
 * their screened χ²: their probabilities are below e^−margin either way.
 */
function fitLevel(library: PreparedMatchLibrary, level: LibraryLevel, s: Scratch, from: number, to: number, good: number, pixelsPerElement: number, search: SearchSettings): LevelFit {
  const n = library.standards.length
  const { list, exact, chi2 } = s
  if (search.exhaustive || n <= 2 * search.refineCount) {
    depthScaledChiSquareRows(s.flux, s.weights, level.flux, library.pixels, from, to, s.chi2, s.scale, s.used)
  } else {
    const step = library.coarseStep
    const cp = library.coarsePixels
    for (let j = 0; j < cp; j++) {
      s.coarseFlux[j] = s.flux[j * step]!
      s.coarseWeights[j] = s.weights[j * step]!
    }
    depthScaledChiSquareRows(s.coarseFlux, s.coarseWeights, level.coarse, cp, Math.ceil(from / step), Math.ceil(to / step), chi2, s.scale, s.used)
    for (let k = 0; k < n; k++) {
      const u = s.used[k]!
      chi2[k] = u > 0 ? (chi2[k]! * good) / u : Infinity
      s.used[k] = good
      s.sorted[k] = chi2[k]!
      exact[k] = 0
    }
    s.sorted.sort()
    const least = s.sorted[0]!
    const temperature = Math.max(1, least / pixelsPerElement / Math.max(1, good / pixelsPerElement - 1))
    const threshold = Math.max(s.sorted[search.refineCount - 1]!, least + 2 * search.refineMargin * pixelsPerElement * temperature)
    let count = 0
    for (let k = 0; k < n; k++) {
      if (chi2[k]! <= threshold) {
        list[count++] = k
        exact[k] = 1
      }
    }
    count = addClassMinima(library, chi2, exact, list, count)
    depthScaledChiSquareSelected(s.flux, s.weights, level.flux, library.pixels, from, to, list, count, chi2, s.scale, s.used)
    // The exact values can move a class minimum to a point whose neighbours are still screened.
    for (let round = 0; round < 3; round++) {
      const more = addClassMinima(library, chi2, exact, list, 0)
      if (more === 0) break
      depthScaledChiSquareSelected(s.flux, s.weights, level.flux, library.pixels, from, to, list, more, chi2, s.scale, s.used)
    }
  }
  let best = 0
  for (let k = 1; k < n; k++) if (chi2[k]! < chi2[best]!) best = k
  return { level, chi2: chi2.slice(), scale: s.scale.slice(), used: s.used.slice(), best }
}

/**
 * Appends to `list` (from `count`) every standard not yet exact at the best point of each class
 * and at that point's neighbours along type; marks them exact. Returns the new count.
 */
function addClassMinima(library: PreparedMatchLibrary, chi2: Float64Array, exact: Uint8Array, list: Int32Array, count: number): number {
  const { points } = library
  const np = points.typeCode.length
  const add = (p: number) => {
    if (p < 0) return
    for (let q = points.start[p]!; q < points.start[p + 1]!; q++) {
      const k = points.members[q]!
      if (exact[k] === 0) {
        exact[k] = 1
        list[count++] = k
      }
    }
  }
  let p = 0
  while (p < np) {
    // Points of one class are contiguous.
    const cc = points.classCode[p]!
    let bestPoint = p
    let bestValue = Infinity
    for (; p < np && points.classCode[p] === cc; p++) {
      for (let q = points.start[p]!; q < points.start[p + 1]!; q++) {
        const v = chi2[points.members[q]!]!
        if (v < bestValue) {
          bestValue = v
          bestPoint = p
        }
      }
    }
    add(bestPoint)
    add(points.earlier[bestPoint]!)
    add(points.later[bestPoint]!)
  }
  return count
}

/**
 * Classifies a prepared spectrum against a prepared library version.
 *
 * 1. χ² with a free line-depth scale and level (see depthScaledChiSquareRows) against every standard over the classification region, at the library
 *    level nearest the spectrum's resolution (every level when the resolution is unknown; the
 *    lowest χ² wins). Weights from the errors or the S/N with a model-error floor. Unless
 *    `exhaustive`, the standards are first screened on every 4th pixel and the full χ² is
 *    computed for the plausible ones (see fitLevel): the result is the same to rounding.
 * 2. Probabilities over the (type, class) grid, P ∝ exp(−Δχ²/(2T)), where χ² is divided by the
 *    pixels per resolution element (neighbouring pixels are not independent) and the temperature
 *    T = max(1, χ²_min/dof) widens the distribution when even the best standard fits badly
 *    (the usual rescaling of errors by √χ²_ν, e.g. Press et al., *Numerical Recipes*, §15.1).
 * 3. Luminosity class: per class, the least χ² of mixes of its best standard with each
 *    neighbour along type (`classFit`, default a smooth level and depth scale, see
 *    smoothPairChiSquare), as P ∝ exp(−Δχ²/(2T·classTemperature)); times the Gaussian
 *    likelihoods of the line criteria of criteria.ts read off the standards at the suggested
 *    type, to the power `criteriaWeight` (0 by default: see that option). Each criterion's vote
 *    is recorded.
 * 4. Fractional subtype: vertex of the parabola through the χ² minimum along type within the
 *    chosen class and its two neighbours; reported to 0.5 subtype where the grid steps by ≤ 1
 *    subtype, else to whole subtypes.
 * 5. Uncertainties: the standard deviations of type code and class code under the distribution
 *    (at least 0.5 subtype and 0.25 class).
 * Flags: 'low-snr' (S/N < lowSnr), 'emission' (a Balmer line measured with a significant negative
 * equivalent width and no absorption core; "e" is appended to the type), 'poor-fit' (χ²_ν > poorFit), 'outside-grid' (the
 * minimum lies at the hot or cool end of the grid), 'possible-composite' (a second, separate
 * minimum along type nearly as good), 'not-mk' (Balmer wings broader than any dwarf standard's,
 * as in white dwarfs).
 * @throws when the spectrum has no usable pixel in the region
 */
export function matchSpectrum(library: PreparedMatchLibrary, input: MatchInput, options: MatchOptions = {}): MatchResult {
  const {
    region = DEFAULT_CLASSIFICATION_REGION,
    modelError = 0.01,
    balmerWeight = 0.35,
    balmerHalfWidth = 25,
    criteriaWeight = 0,
    classTemperature = 1,
    lowSnr = 20,
    poorFit = 4,
    exhaustive = false,
    refineCount = 32,
    refineMargin = 30,
    classFit = 'smooth-mix',
  } = options
  if (input.rectified.length !== library.grid.length) throw new Error(`spectrum has ${input.rectified.length} pixels, the library grid ${library.grid.length}`)
  const s = scratchFor(library)
  const [from, to] = fillWeights(library, input, { region, modelError, balmerWeight, balmerHalfWidth }, s)
  let good = 0
  for (let i = from; i < to; i++) if (s.weights[i]! > 0) good++
  if (good < 10) throw new Error(`only ${good} usable pixels in the classification region ${region[0]}–${region[1]} Å`)

  // Noise in neighbouring pixels is correlated over about one resolution element.
  const centre = (region[0] + region[1]) / 2
  const elementPixels = (l: LibraryLevel) => Math.max(1, l.fwhm / (centre * library.grid.step))
  const search: SearchSettings = { exhaustive, refineCount: Math.max(1, refineCount), refineMargin }
  let fit: LevelFit
  if (input.fwhm !== undefined && input.fwhm > 0) {
    const l = nearestLevel(library, input.fwhm)
    fit = fitLevel(library, l, s, from, to, good, elementPixels(l), search)
  } else {
    fit = fitLevel(library, library.levels[0]!, s, from, to, good, elementPixels(library.levels[0]!), search)
    for (const level of library.levels.slice(1)) {
      const f = fitLevel(library, level, s, from, to, good, elementPixels(level), search)
      if (f.chi2[f.best]! < fit.chi2[fit.best]!) fit = f
    }
  }
  const { level, chi2, scale, used, best } = fit
  const n = library.standards.length
  const pixelsPerElement = elementPixels(level)
  const dof = Math.max(1, used[best]! / pixelsPerElement - 1)
  const chi2Min = chi2[best]! / pixelsPerElement
  const reducedChi2 = chi2Min / dof
  const temperature = Math.max(1, reducedChi2)

  // Probability per standard, then the best standard per (type, class) point.
  const logP = new Float64Array(n)
  const byPoint = new Map<string, number>()
  for (let k = 0; k < n; k++) {
    logP[k] = Number.isFinite(chi2[k]!) ? -(chi2[k]! / pixelsPerElement - chi2Min) / (2 * temperature) : -Infinity
    const st = library.standards[k]!
    const key = `${st.typeCode}|${st.classCode}`
    const prev = byPoint.get(key)
    if (prev === undefined || logP[k]! > logP[prev]!) byPoint.set(key, k)
  }
  const points = [...byPoint.values()]
  let total = 0
  for (const k of points) total += Math.exp(logP[k]!)
  const prob = new Map<number, number>()
  for (const k of points) prob.set(k, Math.exp(logP[k]!) / total)

  // Class probability from χ², and its logarithm (kept apart so that the product with the criteria does not underflow).
  const classP = new Map<number, number>()
  const classLog = new Map<number, number>()
  if (classFit !== 'points') {
    const mixes = classMixes(library, level, s, from, to, chi2, classFit === 'smooth-mix')
    let least = Infinity
    for (const m of mixes.values()) least = Math.min(least, m.chi2)
    let sum = 0
    for (const [c, m] of mixes) {
      const l = Number.isFinite(m.chi2) ? -(m.chi2 - least) / pixelsPerElement / (2 * temperature * classTemperature) : -Infinity
      classLog.set(c, l)
      sum += Math.exp(l)
    }
    for (const [c, l] of classLog) classP.set(c, Math.exp(l) / sum)
  } else {
    for (const [k, p] of prob) {
      const c = library.standards[k]!.classCode
      classP.set(c, (classP.get(c) ?? 0) + p)
    }
    for (const [c, p] of classP) classLog.set(c, Math.log(Math.max(1e-300, p)))
  }

  // Type from the overall best standard first, to read the criteria at.
  const bestStd = library.standards[best]!
  const provisionalType = typeAlong(library, chi2, bestStd.classCode, pixelsPerElement).typeCode
  const sigmaPix = input.snr !== null && input.snr > 0 ? 1 / input.snr : 0.02
  const pixelsPerAngstrom = 1 / (centre * library.grid.step)
  const spectrumSpan = s.flux.slice()
  for (let i = 0; i < library.pixels; i++) {
    const g = i + library.offset
    const f = input.rectified[g]!
    spectrumSpan[i] = (input.mask !== undefined && input.mask[g] !== 0) || !Number.isFinite(f) ? Number.NaN : f
  }
  const votes: Vote[] = []
  const criteriaLog = new Map<number, number>()
  CRITERIA.forEach((c, ci) => {
    const value = criterionValue(c, spectrumSpan, library.wavelength)
    const vote: Vote = { criterion: c.id, name: c.name, value: Number.isFinite(value) ? value : null, vote: null }
    votes.push(vote)
    if (provisionalType < c.types[0] || provisionalType > c.types[1]) {
      vote.note = `not used for this type (applies to ${formatTypeCode(c.types[0])}–${formatTypeCode(Math.min(69, c.types[1]))})`
      return
    }
    if (!Number.isFinite(value)) {
      vote.note = 'not measurable on this spectrum'
      return
    }
    const standards: Record<string, number> = {}
    const atClass = new Map<number, number>()
    for (const cc of library.classCodes) {
      const v = criterionAtType(library, level, ci, cc, provisionalType)
      if (v !== null) {
        atClass.set(cc, v)
        standards[classText(cc)] = v
      }
    }
    if (atClass.size < 2) {
      vote.note = 'fewer than two classes of standards at this type'
      return
    }
    const sigma = Math.hypot(criterionNoise(c, value, sigmaPix, pixelsPerAngstrom), c.scatter, 1e-3)
    let bestClass = -1
    let bestD = Infinity
    for (const [cc, v] of atClass) {
      const d = (value - v) / sigma
      criteriaLog.set(cc, (criteriaLog.get(cc) ?? 0) - 0.5 * d * d)
      if (Math.abs(d) < bestD) {
        bestD = Math.abs(d)
        bestClass = cc
      }
    }
    vote.standards = standards
    vote.vote = classText(bestClass)
  })

  // χ² vote: the class marginal.
  let chi2Class = bestStd.classCode
  for (const [c, p] of classP) if (p > (classP.get(chi2Class) ?? 0)) chi2Class = c
  votes.unshift({ criterion: 'chi2', name: 'χ² class probability', value: round(classP.get(chi2Class) ?? 0, 5), vote: classText(chi2Class) })

  // Combined class score.
  const score = new Map<number, number>()
  let maxScore = -Infinity
  for (const c of library.classCodes) {
    const v = (classLog.get(c) ?? -Infinity) + criteriaWeight * (criteriaLog.get(c) ?? (criteriaLog.size > 0 ? Math.min(...criteriaLog.values()) : 0))
    score.set(c, v)
    if (v > maxScore) maxScore = v
  }
  let combinedTotal = 0
  for (const v of score.values()) combinedTotal += Math.exp(v - maxScore)
  const classPost = new Map<number, number>()
  for (const [c, v] of score) classPost.set(c, Math.exp(v - maxScore) / combinedTotal)
  let classCode = chi2Class
  for (const [c, p] of classPost) if (p > (classPost.get(classCode) ?? 0)) classCode = c

  // Fractional type within the chosen class.
  const along = typeAlong(library, chi2, classCode, pixelsPerElement)
  const typeCode = along.typeCode

  // Uncertainties from the distribution.
  let varType = 0
  for (const [k, p] of prob) varType += p * (library.standards[k]!.typeCode - typeCode) ** 2
  let varClass = 0
  for (const [c, p] of classPost) varClass += p * (c - classCode) ** 2
  const uncertainty = { subtypes: round(Math.max(0.5, Math.sqrt(varType)), 2), classes: round(Math.max(0.25, Math.sqrt(varClass)), 2) }

  // Intermediate class when the two neighbouring classes are nearly equally likely.
  let luminosityClass = classText(classCode)
  let reportedClassCode = classCode
  const neighbours = library.classCodes.filter((c) => Math.abs(c - classCode) === 1)
  for (const nb of neighbours) {
    if ((classPost.get(nb) ?? 0) > 0.7 * (classPost.get(classCode) ?? 0)) {
      const [a, b] = nb < classCode ? [nb, classCode] : [classCode, nb]
      luminosityClass = `${classText(a)}-${classText(b)}`
      reportedClassCode = (a + b) / 2
    }
  }

  // Flags.
  const flags: SuggestionFlag[] = []
  if (input.snr === null || input.snr < lowSnr) flags.push('low-snr')
  const emission = hasBalmerEmission(input.lines, typeCode)
  if (emission) flags.push('emission')
  if (reducedChi2 > poorFit) flags.push('poor-fit')
  if (along.atEdge) flags.push('outside-grid')
  if (isPossibleComposite(library, chi2, pixelsPerElement, temperature)) flags.push('possible-composite')
  const wings = votes.find((v) => v.criterion === 'balmer-wings')?.value ?? null
  if (wings !== null && isBeyondDwarfs(library, level, wings)) flags.push('not-mk')

  const typeText = formatTypeCode(typeCode)
  const parsed = parseMK(`${typeText} ${luminosityClass}${emission ? ' e' : ''}`)
  const spectralType = parsed.ok ? formatMK(parsed.value) : `${typeText} ${luminosityClass}`
  const { letter, subtype } = typeFromCode(typeCode)

  const order = Array.from({ length: n }, (_, k) => k).sort((a, b) => chi2[a]! - chi2[b]!)
  const candidates: Candidate[] = order.slice(0, 3).map((k) => {
    const st = library.standards[k]!
    return {
      standardId: st.id,
      spectralType: st.spectralType,
      source: st.source,
      chi2: round(chi2[k]!, 2),
      reducedChi2: round(chi2[k]! / pixelsPerElement / Math.max(1, used[k]! / pixelsPerElement - 1), 4),
      scale: round(scale[k]!, 5),
      probability: round(prob.get(k) ?? 0, 5),
    }
  })
  const probabilities = [...prob]
    .filter(([, p]) => p >= 1e-4)
    .sort((a, b) => b[1] - a[1])
    .map(([k, p]) => {
      const st = library.standards[k]!
      return { typeCode: st.typeCode, classCode: st.classCode, luminosityClass: st.luminosityClass, p: round(p, 5) }
    })

  return {
    spectralType,
    letter,
    subtype,
    typeCode,
    luminosityClass,
    classCode: reportedClassCode,
    uncertainty,
    bestStandardId: bestStd.id,
    candidates,
    votes,
    flags,
    probabilities,
    libraryVersion: { id: library.versionId, name: library.versionName },
    levelFwhm: level.fwhm,
    reducedChi2: round(reducedChi2, 4),
  }
}

/**
 * Least χ² per class over its standards and over mixes of the standard at the class's best
 * point with the best standard of each neighbouring point along type (depthScaledPairChiSquare),
 * with the type code of that fit (interpolated for a mix).
 */
function classMixes(library: PreparedMatchLibrary, level: LibraryLevel, s: Scratch, from: number, to: number, chi2: Float64Array, smooth: boolean): Map<number, { chi2: number; typeCode: number }> {
  const { points } = library
  const np = points.typeCode.length
  const out = new Map<number, { chi2: number; typeCode: number }>()
  const bestMember = (p: number) => {
    let k = -1
    for (let q = points.start[p]!; q < points.start[p + 1]!; q++) {
      const m = points.members[q]!
      if (k < 0 || chi2[m]! < chi2[k]!) k = m
    }
    return k
  }
  let p = 0
  while (p < np) {
    const cc = points.classCode[p]!
    let bestPoint = p
    for (; p < np && points.classCode[p] === cc; p++) if (chi2[bestMember(p)]! < chi2[bestMember(bestPoint)]!) bestPoint = p
    const k = bestMember(bestPoint)
    let result = { chi2: smooth ? Infinity : chi2[k]!, typeCode: points.typeCode[bestPoint]! }
    for (const nb of [points.earlier[bestPoint]!, points.later[bestPoint]!]) {
      if (nb < 0) continue
      const mix = smooth
        ? smoothPairChiSquare(s.flux, s.weights, level.flux, library.pixels, k, bestMember(nb), from, to)
        : depthScaledPairChiSquare(s.flux, s.weights, level.flux, library.pixels, k, bestMember(nb), from, to)
      if (mix.chi2 < result.chi2) {
        const t0 = points.typeCode[bestPoint]!
        result = { chi2: mix.chi2, typeCode: t0 + mix.fraction * (points.typeCode[nb]! - t0) }
      }
    }
    out.set(cc, result)
  }
  return out
}

const round = (x: number, digits: number) => (Number.isFinite(x) ? Math.round(x * 10 ** digits) / 10 ** digits : x)

/**
 * Best χ² per type code within one class, sorted by type, with the parabola vertex through the
 * minimum and its neighbours. `atEdge` when the minimum is the first or last type of the grid.
 */
function typeAlong(library: PreparedMatchLibrary, chi2: Float64Array, classCode: number, pixelsPerElement: number): { typeCode: number; atEdge: boolean } {
  const perType = new Map<number, number>()
  library.standards.forEach((st, k) => {
    if (st.classCode !== classCode) return
    const prev = perType.get(st.typeCode)
    if (prev === undefined || chi2[k]! < prev) perType.set(st.typeCode, chi2[k]!)
  })
  const types = [...perType.keys()].sort((a, b) => a - b)
  let j = 0
  for (let i = 1; i < types.length; i++) if (perType.get(types[i]!)! < perType.get(types[j]!)!) j = i
  const x1 = types[j]!
  const gridMin = library.typeCodes[0]!
  const gridMax = library.typeCodes[library.typeCodes.length - 1]!
  const atEdge = (x1 === gridMin && gridMin > 0) || x1 === gridMax
  if (j === 0 || j === types.length - 1) return { typeCode: snapType(x1, types, j), atEdge }
  const x0 = types[j - 1]!
  const x2 = types[j + 1]!
  const v = parabolaVertex(x0, perType.get(x0)! / pixelsPerElement, x1, perType.get(x1)! / pixelsPerElement, x2, perType.get(x2)! / pixelsPerElement)
  // Stay within half a grid step of the minimum: beyond that the neighbour itself would have won.
  const lo = x1 - (x1 - x0) / 2
  const hi = x1 + (x2 - x1) / 2
  return { typeCode: snapType(Math.min(hi, Math.max(lo, v)), types, j), atEdge }
}

/** Rounds to 0.5 subtype where the grid steps by ≤ 1 subtype around index j, else to whole subtypes. */
function snapType(x: number, types: number[], j: number): number {
  const left = j > 0 ? types[j]! - types[j - 1]! : Infinity
  const right = j < types.length - 1 ? types[j + 1]! - types[j]! : Infinity
  const step = Math.min(left, right) <= 1 ? 0.5 : 1
  return Math.min(69.5, Math.max(0, Math.round(x / step) * step))
}

/** A criterion's value for one class at a type code, interpolated linearly between that class's standards; null outside their types. */
export function criterionAtType(library: PreparedMatchLibrary, level: LibraryLevel, ci: number, classCode: number, typeCode: number): number | null {
  const n = library.standards.length
  let below: { t: number; v: number } | null = null
  let above: { t: number; v: number } | null = null
  library.standards.forEach((st, k) => {
    if (st.classCode !== classCode) return
    const v = level.criteria[ci * n + k]!
    if (!Number.isFinite(v)) return
    if (st.typeCode <= typeCode && (below === null || st.typeCode > below.t)) below = { t: st.typeCode, v }
    if (st.typeCode >= typeCode && (above === null || st.typeCode < above.t)) above = { t: st.typeCode, v }
  })
  const b = below as { t: number; v: number } | null
  const a = above as { t: number; v: number } | null
  if (b === null || a === null) return null
  if (a.t === b.t) return b.v
  return b.v + ((a.v - b.v) * (typeCode - b.t)) / (a.t - b.t)
}

/** True when Hα, Hβ or Hγ is measured with a negative equivalent width beyond 3σ and 1 Å and its deepest point above the continuum (depth < −0.05). */
/**
 * Whether the Balmer lines show emission: a line of the table measured with a significantly
 * negative equivalent width and its extreme point above the continuum. Hβ and Hγ count only for
 * types earlier than G0 (type code 40); Hα counts for every type.
 */
export function hasBalmerEmission(lines: readonly LineMeasurement[] | undefined, typeCode: number): boolean {
  if (!lines) return false
  // From G on, the side bands of Hβ and Hγ sit in metal lines and the G band, so their
  // side-band equivalent widths go negative without any emission (the Lick HγA index of a K giant
  // is about −6 Å, common practice); there only Hα speaks for emission.
  const ids = typeCode < 40 ? ['h-alpha', 'h-beta', 'h-gamma'] : ['h-alpha']
  return lines.some(
    (l) =>
      l.measured &&
      ids.includes(l.id) &&
      l.equivalentWidth < -1 &&
      l.depth < -0.05 &&
      (l.equivalentWidthError === null || -l.equivalentWidth > 3 * l.equivalentWidthError),
  )
}

/**
 * True when the profile of χ² along type (best class at each type) has a second local minimum
 * at least 8 subtypes from the global one with Δχ²/T below 2 × the number of types between.
 */
function isPossibleComposite(library: PreparedMatchLibrary, chi2: Float64Array, pixelsPerElement: number, temperature: number): boolean {
  const perType = new Map<number, number>()
  library.standards.forEach((st, k) => {
    const prev = perType.get(st.typeCode)
    if (prev === undefined || chi2[k]! < prev) perType.set(st.typeCode, chi2[k]!)
  })
  const types = [...perType.keys()].sort((a, b) => a - b)
  const y = types.map((t) => perType.get(t)! / pixelsPerElement / temperature)
  let g = 0
  for (let i = 1; i < y.length; i++) if (y[i]! < y[g]!) g = i
  for (let i = 1; i < y.length - 1; i++) {
    if (i === g || Math.abs(types[i]! - types[g]!) < 8) continue
    if (y[i]! < y[i - 1]! && y[i]! < y[i + 1]!) {
      // A real second minimum: the χ² between the two minima rises clearly above both.
      const [a, b] = i < g ? [i, g] : [g, i]
      let barrier = -Infinity
      for (let k = a; k <= b; k++) barrier = Math.max(barrier, y[k]!)
      if (y[i]! - y[g]! < 10 && barrier - y[i]! > 10) return true
    }
  }
  return false
}

/** True when the Balmer wing depth exceeds every standard's at this level (dwarfs have the widest) by 30 % and 0.05. */
function isBeyondDwarfs(library: PreparedMatchLibrary, level: LibraryLevel, wings: number): boolean {
  const ci = CRITERIA.findIndex((c) => c.id === 'balmer-wings')
  const n = library.standards.length
  let max = -Infinity
  library.standards.forEach((st, k) => {
    const v = level.criteria[ci * n + k]!
    if (Number.isFinite(v) && v > max) max = v
  })
  return Number.isFinite(max) && wings > 1.3 * max && wings > max + 0.05
}
