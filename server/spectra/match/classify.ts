import { DEFAULT_CLASSIFICATION_REGION, LATE_TYPE_REGION } from '../../../shared/grid'
import { formatMK, formatTypeCode, parseMK, typeFromCode } from '../../../shared/mk'
import { roundTo as round } from '../../../shared/rounding'
import { depthScaledChiSquareSelected, depthScaledPairChiSquare } from './chi2'
import { lowerBound } from '../prepare/stats'
import { balmerHalfDepthWidth, compositeEvidence, hasBalmerEmission, isBeyondDwarfs, SUPERGIANT_WIDTH_TYPES, supergiantByWidth, typicalResidual, type WidthEvidence } from './flags'
import { levelFor, neighbourResidualsOver, type LibraryLevel, type MatchStandardInfo, type PreparedMatchLibrary } from './library'
import { localModelFit } from './local-model'
import { classText, type Candidate, type MatchInput, type MatchOptions, type MatchResult, type SuggestionFlag, type Vote } from './types'
import { classCounts, criteriaVotes, describeClassChoice, parameterEstimate } from './vote'

/** Scratch arrays reused across calls of the same library and level (one spectrum at a time per thread). */
interface Scratch {
  flux: Float64Array
  weights: Float64Array
  /** Each pixel's noise variance (before the model-error floor). */
  noise: Float64Array
  coarseFlux: Float64Array
  coarseWeights: Float64Array
}
/** Voter weights of the local model, exp(−(χ²/χ²_min − 1)/T): broader than the vote's, as a fit needs spread. */
const LOCAL_MODEL_TEMPERATURE = 3
/** Width in type (subtypes) of the weight that reads the parameters off the voters nearest the model's type. */
const MODEL_PARAMETER_SUBTYPES = 2

const scratchByLibrary = new WeakMap<PreparedMatchLibrary, Scratch>()

function scratchFor(library: PreparedMatchLibrary): Scratch {
  let s = scratchByLibrary.get(library)
  if (!s) {
    s = {
      flux: new Float64Array(library.pixels),
      weights: new Float64Array(library.pixels),
      noise: new Float64Array(library.pixels),
      coarseFlux: new Float64Array(library.coarsePixels),
      coarseWeights: new Float64Array(library.coarsePixels),
    }
    scratchByLibrary.set(library, s)
  }
  return s
}

/**
 * Fills the scratch flux and weights over the library span: w = 1/(σ² + (modelError·f)²), σ from
 * the errors or 1/S/N, 0 outside the region or where masked. Returns the region's [from, to) range.
 */
export function fillWeights(
  library: PreparedMatchLibrary,
  input: MatchInput,
  region: readonly [number, number],
  modelError: number,
  s: { flux: Float64Array; weights: Float64Array; noise?: Float64Array },
): [number, number] {
  const { wavelength, offset, pixels } = library
  const from = lowerBound(wavelength, region[0])
  const to = lowerBound(wavelength, region[1])
  const snrSigma = input.snr !== null && input.snr > 0 ? 1 / input.snr : 0.02
  const m2 = modelError * modelError
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
    s.weights[i] = 1 / (sigma * sigma + m2 * (f2 > 0.01 ? f2 : 0.01))
    if (s.noise) s.noise[i] = sigma * sigma
  }
  return [from, to]
}

/** χ², depth scale and pixel count of every row of a level; rows not refined keep their screened χ² (scaled to the full pixel count). */
export interface LevelFit {
  chi2: Float64Array
  scale: Float64Array
  used: Float64Array
  /** 1 where the χ² is the full one. */
  exact: Uint8Array
}

/**
 * χ² of every standard of a level (see depthScaledChiSquareSelected). Unless `exhaustive`, all rows
 * are first screened on every `coarseStep`-th pixel and the best `refineCount` get the full χ².
 */
export function fitLevel(library: PreparedMatchLibrary, level: LibraryLevel, s: Scratch, from: number, to: number, exhaustive: boolean, refineCount: number, exclude?: ReadonlySet<number>): LevelFit {
  const n = level.rows.length
  const chi2 = new Float64Array(n)
  const scale = new Float64Array(n)
  const used = new Float64Array(n)
  const exact = new Uint8Array(n)
  let good = 0
  for (let i = from; i < to; i++) if (s.weights[i]! > 0) good++
  if (exhaustive || n <= refineCount) {
    const all = Int32Array.from({ length: n }, (_, k) => k)
    depthScaledChiSquareSelected(s.flux, s.weights, level.flux, library.pixels, from, to, all, n, chi2, scale, used)
    exact.fill(1)
    leaveOut(level, library, chi2, exclude)
    removeStandardNoise(level, library, s, from, to, chi2, used, all)
    return { chi2, scale, used, exact }
  }
  const step = library.coarseStep
  const cp = library.coarsePixels
  for (let j = 0; j < cp; j++) {
    s.coarseFlux[j] = s.flux[j * step]!
    s.coarseWeights[j] = s.weights[j * step]!
  }
  const all = Int32Array.from({ length: n }, (_, k) => k)
  depthScaledChiSquareSelected(s.coarseFlux, s.coarseWeights, level.coarse, cp, Math.ceil(from / step), Math.ceil(to / step), all, n, chi2, scale, used)
  for (let k = 0; k < n; k++) {
    const u = used[k]!
    chi2[k] = u > 0 ? (chi2[k]! * good) / u : Infinity
    used[k] = good
  }
  leaveOut(level, library, chi2, exclude)
  removeStandardNoise(level, library, s, from, to, chi2, used, all)
  const list = smallestFinite(chi2, refineCount)
  depthScaledChiSquareSelected(s.flux, s.weights, level.flux, library.pixels, from, to, list, list.length, chi2, scale, used)
  for (const k of list) exact[k] = 1
  removeStandardNoise(level, library, s, from, to, chi2, used, list)
  return { chi2, scale, used, exact }
}

/**
 * Indices of the `count` least finite values, least first, equal values in index order: the head of
 * a stable sort of every index, without sorting them all (the level fits, the vote and the
 * resolution estimate each took the head of such a sort, several times per spectrum).
 */
export function smallestFinite(values: Float64Array, count: number): Int32Array {
  const index = new Int32Array(count)
  const value = new Float64Array(count)
  let m = 0
  for (let k = 0; k < values.length; k++) {
    const v = values[k]!
    if (!Number.isFinite(v) || (m === count && !(v < value[m - 1]!))) continue
    let j = m < count ? m++ : m - 1
    while (j > 0 && value[j - 1]! > v) {
      value[j] = value[j - 1]!
      index[j] = index[j - 1]!
      j--
    }
    value[j] = v
    index[j] = k
  }
  return index.subarray(0, m)
}

/**
 * Takes out of the χ² of `rows` what their standards' own noise adds, where a standard carries its
 * S/N (one made from a team's spectrum, MatchStandardInput.snr): per pixel, its nominal variance
 * 1/S/N² times the pixel's weight, times ν, the share of the nominal variance that is left once
 * spectra are resampled and smoothed to the level. ν is read off the spectrum itself: the χ² per
 * pixel of the best noise-free standard over the spectrum's own Σ w σ² (its noise plus any
 * mismatch, so an upper bound), kept to 0.2–1. The χ² keeps at least a fifth of its value. Without
 * it a noisy standard of the right type ranks below a clean one of the wrong type. Standards
 * without an S/N are unchanged.
 */
function removeStandardNoise(level: LibraryLevel, library: PreparedMatchLibrary, s: Scratch, from: number, to: number, chi2: Float64Array, used: Float64Array, rows: ArrayLike<number>): void {
  const snrOf = (r: number) => library.standards[level.rows[r]!]!.snr ?? 0
  let noisy = false
  for (let r = 0; r < level.rows.length && !noisy; r++) if (snrOf(r) > 0) noisy = true
  if (!noisy) return
  let sw = 0
  let swn = 0
  let m = 0
  for (let i = from; i < to; i++) {
    const w = s.weights[i]!
    if (w > 0) {
      sw += w
      swn += w * s.noise[i]!
      m++
    }
  }
  if (m === 0) return
  let clean = Infinity
  for (let r = 0; r < level.rows.length; r++) if (!(snrOf(r) > 0) && used[r]! > 0 && Number.isFinite(chi2[r]!)) clean = Math.min(clean, chi2[r]! / used[r]!)
  const nu = Number.isFinite(clean) && swn > 0 ? Math.min(1, Math.max(0.2, clean / (swn / m))) : 1
  const meanWeight = sw / m
  for (let q = 0; q < rows.length; q++) {
    const r = rows[q]!
    const snr = snrOf(r)
    const c = chi2[r]!
    if (!(snr > 0) || !Number.isFinite(c)) continue
    chi2[r] = Math.max(c - (nu * used[r]! * meanWeight) / (snr * snr), c / 5)
  }
}

/** Sets χ² to Infinity for the rows of excluded standards. */
function leaveOut(level: LibraryLevel, library: PreparedMatchLibrary, chi2: Float64Array, exclude: ReadonlySet<number> | undefined): void {
  if (!exclude || exclude.size === 0) return
  level.rows.forEach((k, r) => {
    if (exclude.has(library.standards[k]!.id)) chi2[r] = Infinity
  })
}

/**
 * Prepares the weights for a spectrum and fits one level: what both the classification and the
 * resolution estimate start from.
 * @throws when the spectrum has fewer than 10 usable pixels in the region
 */
export function fitSpectrumAtLevel(
  library: PreparedMatchLibrary,
  input: MatchInput,
  fwhm: number,
  options: { region?: readonly [number, number]; modelError?: number; exhaustive?: boolean; refineCount?: number; exclude?: ReadonlySet<number> } = {},
): { level: LibraryLevel; fit: LevelFit; from: number; to: number; scratch: Scratch } {
  const region = options.region ?? DEFAULT_CLASSIFICATION_REGION
  if (input.rectified.length !== library.grid.length) throw new Error(`spectrum has ${input.rectified.length} pixels, the library grid ${library.grid.length}`)
  const s = scratchFor(library)
  const [from, to] = fillWeights(library, input, region, options.modelError ?? 0.01, s)
  let good = 0
  for (let i = from; i < to; i++) if (s.weights[i]! > 0) good++
  if (good < 10) throw new Error(`only ${good} usable pixels in the classification region ${region[0]}–${region[1]} Å`)
  const level = library.level(fwhm)
  return { level, fit: fitLevel(library, level, s, from, to, options.exhaustive ?? false, options.refineCount ?? 48, options.exclude), from, to, scratch: s }
}

/**
 * Among `values` with `weights`, the point t (on a grid of `step` from `lo` to `hi`) that gathers the
 * most weight within ±`half` of it; ties go to the point nearest the weighted mean. This is the
 * estimate that is most often within ±`half` of the truth when the votes are draws from the
 * distribution of the truth.
 */
export function windowMode(values: ArrayLike<number>, weights: ArrayLike<number>, half: number, step: number, lo: number, hi: number): number {
  let sw = 0
  let swx = 0
  for (let q = 0; q < values.length; q++) {
    sw += weights[q]!
    swx += weights[q]! * values[q]!
  }
  const mean = sw > 0 ? swx / sw : (lo + hi) / 2
  let best = -1
  let bestT = mean
  for (let t = lo; t <= hi + 1e-9; t += step) {
    let s = 0
    for (let q = 0; q < values.length; q++) if (Math.abs(values[q]! - t) <= half + 1e-9) s += weights[q]!
    if (s > best + 1e-12 || (Math.abs(s - best) <= 1e-12 && Math.abs(t - mean) < Math.abs(bestT - mean))) {
      best = s
      bestT = t
    }
  }
  return Math.round(bestT / step) * step
}

/**
 * Classifies a prepared spectrum against a prepared library version.
 *
 * 1. χ² with a free level and line-depth scale (depthScaledChiSquareSelected) against every
 *    standard of the library level for the spectrum's resolution (levelFor), over the
 *    classification region; weights from the errors or the S/N with a model-error floor.
 * 2. The best `neighbours` standards vote, each with w = exp(−(χ²/χ²_min − 1)/temperature),
 *    divided by (standards of its class at the level)^classBalance for the class; at levels of
 *    `coarseFwhm` and coarser only the best `coarseTypeNeighbours` of them vote on the type.
 * 3. Spectral type: the type, in half subtypes, that gathers the most vote within ±1 subtype
 *    (windowMode); luminosity class: the class, in half classes, that gathers the most vote within
 *    ±½ class, so that an even split between neighbours gives the intermediate class (IV-V); for
 *    B0–A9, a supergiant class instead when the Balmer lines are as narrow as only supergiants'
 *    are (supergiantByWidth), with a note that says so. The type is instead the local model's
 *    (localModelFit: each pixel among the voters linear in type, class and [Fe/H]) when that differs
 *    from the vote by more than `typeModelLead` subtypes, again with a note.
 * 4. Uncertainties: the vote-weighted spread of the voters' types and classes about the estimate
 *    (at least 0.5 subtype and 0.25 class).
 * 5. Teff, log g and [Fe/H]: the vote-weighted mean and spread of the voters' published values
 *    (weighted toward the shown type when it is the local model's).
 * Flags: 'low-snr', 'emission', 'poor-fit' (best-fit residual beyond what normal stars of the type
 * show against their nearest standard), 'outside-grid' (the type sits at an end of the level's
 * types), 'possible-composite' (flags.ts), 'not-mk' (Balmer wings broader than any dwarf's).
 * @throws when the spectrum has no usable pixel in the region
 */
export function matchSpectrum(library: PreparedMatchLibrary, input: MatchInput, options: MatchOptions = {}): MatchResult {
  const {
    region = DEFAULT_CLASSIFICATION_REGION,
    modelError = 0.01,
    neighbours = 16,
    coarseTypeNeighbours = 5,
    coarseFwhm = 12,
    temperature = 1.5,
    classBalance = 0.5,
    lowSnr = 20,
    typeModelLead = 3,
    exhaustive = false,
    exclude,
  } = options
  const refineCount = Math.max(options.refineCount ?? 48, 2 * neighbours, 5)
  const levelFwhm = levelFor(library, input.fwhm)
  const { level, fit, from, to, scratch: s } = fitSpectrumAtLevel(library, input, levelFwhm, { region, modelError, exhaustive, refineCount, ...(exclude ? { exclude } : {}) })
  const { chi2, scale, used } = fit
  const std = (r: number) => library.standards[level.rows[r]!]!

  // The nearest, least first: the voters and the five candidates shown.
  const order = Array.from(smallestFinite(chi2, Math.max(neighbours, 5)))
  if (order.length === 0) throw new Error('no standard overlaps the spectrum in the classification region')
  const best = order[0]!
  const voters = order.slice(0, Math.min(neighbours, order.length))
  const least = Math.max(chi2[best]!, 1e-12 * used[best]!)
  const classCount = classCounts(library, level)
  const typeVoters = level.fwhm >= coarseFwhm ? Math.min(coarseTypeNeighbours, voters.length) : voters.length
  // Typed arrays: as plain arrays their elements kind changed with the values (whole or fractional
  // type codes, a weight of exactly 1), and each change threw the optimised code away.
  const m = voters.length
  const typeWeights = new Float64Array(m)
  const classWeights = new Float64Array(m)
  const types = new Float64Array(m)
  const classes = new Float64Array(m)
  for (let q = 0; q < m; q++) {
    const st = std(voters[q]!)
    const raw = Math.exp(-(chi2[voters[q]!]! / least - 1) / temperature)
    typeWeights[q] = q < typeVoters ? raw : 0
    classWeights[q] = raw / (classCount.get(st.classCode) ?? 1) ** classBalance
    types[q] = st.typeCode
    classes[q] = st.classCode
  }
  const normalise = (w: Float64Array) => {
    let t = 0
    for (let q = 0; q < w.length; q++) t += w[q]!
    for (let q = 0; q < w.length; q++) w[q] = w[q]! / t
  }
  normalise(typeWeights)
  normalise(classWeights)

  const voted = windowMode(types, typeWeights, 1, 0.5, Math.max(0, Math.floor(Math.min(...types)) - 1), Math.min(69.5, Math.ceil(Math.max(...types)) + 1))
  const step = library.coarseStep
  for (let j = 0; j < library.coarsePixels; j++) {
    s.coarseFlux[j] = s.flux[j * step]!
    s.coarseWeights[j] = s.weights[j * step]!
  }
  const [coarseFrom, coarseTo] = [Math.ceil(from / step), Math.ceil(to / step)]
  const sparse = interpolateSparseType(library, level, s, from, to, voters, chi2, voted)
  // On the coarse pixels (every fourth): as accurate as every pixel in leave-one-out, at a quarter of
  // the cost. Not at coarse levels, where only the best few vote on the type: there it lost a star at 15 Å.
  const model =
    level.fwhm >= coarseFwhm
      ? null
      : localModelFit(
          level.coarse,
          library.coarsePixels,
          s.coarseFlux,
          s.coarseWeights,
          coarseFrom,
          coarseTo,
          voters.map((r) => {
            const st = std(r)
            return { row: r, typeCode: st.typeCode, classCode: st.classCode, feh: st.feh, weight: Math.exp(-(chi2[r]! / least - 1) / LOCAL_MODEL_TEMPERATURE) }
          }),
        )
  const modelLeads = model !== null && Math.abs(model.typeCode - sparse) > typeModelLead
  const typeCode = modelLeads ? Math.round(model.typeCode) : sparse
  const typeNote = modelLeads
    ? `The type comes from a linear model of the ${voters.length} nearest standards in type, class and [Fe/H], which fits the spectrum as ${formatTypeCode(typeCode)} at [Fe/H] ${(Math.round(model.feh * 10) / 10 || 0).toFixed(1)}; their vote alone says ${formatTypeCode(sparse)}.`
    : null
  const votedClass = windowMode(classes, classWeights, 0.5, 0.5, 1, 6)
  const spread = (values: Float64Array, w: Float64Array, centre: number) => {
    let a = 0
    for (let q = 0; q < values.length; q++) a += w[q]! * (values[q]! - centre) ** 2
    return Math.sqrt(a)
  }

  const { classShares, probabilities } = voteShares(voters, std, typeWeights, classWeights)

  const centre = (region[0] + region[1]) / 2
  const pixelsPerElement = Math.max(1, level.fwhm / (centre * library.grid.step))
  const reduced = (r: number) => chi2[r]! / pixelsPerElement / Math.max(1, used[r]! / pixelsPerElement - 1)
  const candidates: Candidate[] = order.slice(0, 5).map((r) => {
    const st = std(r)
    const q = voters.indexOf(r)
    return {
      standardId: st.id,
      spectralType: st.spectralType,
      typeCode: st.typeCode,
      luminosityClass: st.luminosityClass,
      source: st.source,
      star: st.star,
      origin: st.origin,
      chi2: round(chi2[r]!, 2),
      reducedChi2: round(reduced(r), 4),
      scale: round(scale[r]!, 5),
      probability: q >= 0 ? round(typeWeights[q]!, 5) : 0,
    }
  })

  const spectrumSpan = new Float64Array(library.pixels)
  for (let i = 0; i < library.pixels; i++) {
    const g = i + library.offset
    const f = input.rectified[g]!
    spectrumSpan[i] = (input.mask !== undefined && input.mask[g] !== 0) || !Number.isFinite(f) ? Number.NaN : f
  }
  const width = balmerHalfDepthWidth(spectrumSpan, library.wavelength)
  const emission = hasBalmerEmission(input.lines, typeCode)
  // The vote leans to dwarfs and giants, of which the library has most; B–A supergiants show
  // themselves by their narrow Balmer lines (unless emission fills them in).
  const byWidth = emission ? null : supergiantByWidth(level, library.standards, typeCode, width, exclude)
  const overruled = votedClass > 2 && byWidth?.supergiant ? byWidth.supergiant.classCode : null
  const classCode = overruled ?? votedClass
  const uncertainty = { subtypes: round(Math.max(0.5, spread(types, typeWeights, typeCode)), 2), classes: round(Math.max(0.25, spread(classes, classWeights, classCode)), 2) }
  const luminosityClass = classText(classCode)
  const bestStd = std(best)
  const classNote =
    overruled !== null && byWidth ? widthClassNote(width, byWidth, luminosityClass) : describeClassChoice(classCode, bestStd.classCode, bestStd.spectralType, classShares, voters.length)

  // With the model's type shown, the parameters are read off the voters nearest that type, so that Teff agrees with it.
  const parameterWeights = typeWeights.slice(0, typeVoters).map((w, q) => (modelLeads ? w * Math.exp(-0.5 * ((types[q]! - typeCode) / MODEL_PARAMETER_SUBTYPES) ** 2) : w))
  const parameters = parameterEstimate(voters.slice(0, typeVoters).map(std), parameterWeights)

  // Flags.
  const flags: SuggestionFlag[] = []
  if (input.snr === null || input.snr < lowSnr) flags.push('low-snr')
  if (emission) flags.push('emission')
  const rms = bestResidual(s.flux, s.weights, level.flux, library.pixels, best, from, to)
  const noise = input.snr !== null && input.snr > 0 ? 1 / input.snr : 0
  // The default regions are judged against the residuals stored with the level; any other against residuals over itself.
  const standardRegion = [DEFAULT_CLASSIFICATION_REGION, LATE_TYPE_REGION].some((r) => r[0] === region[0] && r[1] === region[1])
  const typical = typicalResidual(level, library.standards, typeCode, standardRegion ? level.neighbourResidual : neighbourResidualsOver(library, level, region))
  if (typical !== null && Math.sqrt(Math.max(0, rms * rms - noise * noise)) > typical) flags.push('poor-fit')
  const earliest = level.typeCodes[0]!
  const latest = level.typeCodes[level.typeCodes.length - 1]!
  if ((typeCode <= earliest + 0.5 && earliest > 0) || typeCode >= latest - 0.5) flags.push('outside-grid')
  if (compositeEvidence(library, level, s.coarseFlux, s.coarseWeights, fit, coarseFrom, coarseTo, best) !== null) flags.push('possible-composite')

  const votes = [
    { criterion: 'neighbours', name: `vote of the ${voters.length} nearest standards`, value: round(classShares[0]?.p ?? 0, 4), vote: classShares[0]?.luminosityClass ?? null },
    ...criteriaVotes(library, level, spectrumSpan, typeCode, input.snr, centre, exclude),
    widthVote(byWidth, typeCode, emission),
  ]
  if (typeCode < 35 && isBeyondDwarfs(level, library.standards, width)) flags.push('not-mk')

  const typeText = formatTypeCode(typeCode)
  const parsed = parseMK(`${typeText} ${luminosityClass}${emission ? ' e' : ''}`)
  const spectralType = parsed.ok ? formatMK(parsed.value) : `${typeText} ${luminosityClass}`
  const { letter, subtype } = typeFromCode(typeCode)
  return {
    spectralType,
    letter,
    subtype,
    typeCode,
    luminosityClass,
    classCode,
    uncertainty,
    bestStandardId: bestStd.id,
    candidates,
    votes,
    flags,
    probabilities,
    classShares,
    classNote,
    typeNote,
    parameters,
    libraryVersion: { id: library.versionId, name: library.versionName },
    levelFwhm: level.fwhm,
    region: [region[0], region[1]],
    reducedChi2: round(reduced(best), 4),
    residual: { rms: round(rms, 5), typical: typical === null ? null : round(typical, 5) },
    voters: voters.map((r, q) => ({ standardId: std(r).id, typeShare: round(typeWeights[q]!, 5), classShare: round(classWeights[q]!, 5) })),
  }
}

/** Shares of a vote per class and per (type, class) point, largest first. */
function voteShares(
  voters: readonly number[],
  std: (row: number) => MatchStandardInfo,
  typeWeights: Float64Array,
  classWeights: Float64Array,
): { classShares: MatchResult['classShares']; probabilities: MatchResult['probabilities'] } {
  // Plain loops over the voters' rows: arrays made by map or spread have one elements kind when
  // made by optimised code and another when not, and each change threw the optimised matchSpectrum
  // away (about a thousand times in 1 400 matches).
  const byClass = new Map<number, number>()
  const byPoint = new Map<string, number>()
  const first = new Map<string, number>()
  for (let q = 0; q < voters.length; q++) {
    const st = std(voters[q]!)
    byClass.set(st.classCode, (byClass.get(st.classCode) ?? 0) + classWeights[q]!)
    const key = `${st.typeCode}|${st.classCode}`
    byPoint.set(key, (byPoint.get(key) ?? 0) + typeWeights[q]!)
    if (!first.has(key)) first.set(key, q)
  }
  const classShares: MatchResult['classShares'] = []
  byClass.forEach((p, classCode) => {
    classShares.push({ luminosityClass: classText(classCode), classCode, p: round(p, 4) })
  })
  classShares.sort((a, b) => b.p - a.p)
  const probabilities: MatchResult['probabilities'] = []
  byPoint.forEach((p, key) => {
    if (!(p >= 1e-4)) return
    const st = std(voters[first.get(key)!]!)
    probabilities.push({ typeCode: st.typeCode, classCode: st.classCode, luminosityClass: st.luminosityClass, p: round(p, 5) })
  })
  probabilities.sort((a, b) => b.p - a.p)
  return { classShares, probabilities }
}

const WIDTH_CRITERION = { criterion: 'balmer-width', name: 'Hδ, Hγ, Hβ width at half depth over the narrowest class II–V standard within 3 subtypes' }

/** The Balmer-width evidence as one of the criteria shown with a suggestion. */
function widthVote(evidence: WidthEvidence | null, typeCode: number, emission: boolean): Vote {
  if (typeCode < SUPERGIANT_WIDTH_TYPES[0] || typeCode >= SUPERGIANT_WIDTH_TYPES[1])
    return { ...WIDTH_CRITERION, value: null, vote: null, note: `not used for this type (applies to ${formatTypeCode(SUPERGIANT_WIDTH_TYPES[0])}–${formatTypeCode(SUPERGIANT_WIDTH_TYPES[1] - 1)})` }
  if (!evidence) return { ...WIDTH_CRITERION, value: null, vote: null, note: emission ? 'not used: emission fills the Balmer lines' : 'not measurable on this spectrum' }
  const note = evidence.threshold === null ? 'the supergiant standards of the library do not stand apart in width' : `supergiants fall below ${round(evidence.threshold, 2)}`
  // Lines as wide as a giant's or dwarf's say only that the star is not a supergiant.
  const vote = evidence.supergiant ? classText(evidence.supergiant.classCode) : evidence.threshold === null ? null : 'II–V'
  return { ...WIDTH_CRITERION, value: round(evidence.ratio, 3), vote, note }
}

/** Why a class comes from the Balmer width rather than from the nearest standards. */
function widthClassNote(width: number, evidence: WidthEvidence, luminosityClass: string): string {
  const st = evidence.supergiant?.standard
  const like = st ? `, as in ${st.star ?? st.spectralType} (${st.spectralType}), the supergiant standard nearest in width` : ''
  return `Class ${luminosityClass} from the Balmer lines: ${round(width, 1)} Å wide at half depth, ${Math.round(100 * evidence.ratio)} % of the narrowest giant's or dwarf's within 3 subtypes, where the standards of this resolution part at ${Math.round(100 * evidence.threshold!)} % between supergiants and the rest${like}. The nearest standards are mostly giants and dwarfs, so their vote is set aside.`
}

/**
 * Where the library is sparse in type (the best standard's nearest voting neighbour in type is 2 or
 * more subtypes away, as among the O stars), the vote can only land on one of them; the spectrum is
 * then fitted as a mix of the two (depthScaledPairChiSquare) and the type interpolated by the mixing
 * fraction, to half a subtype. Kept to the voted type when the mix does not fit clearly better.
 */
function interpolateSparseType(library: PreparedMatchLibrary, level: LibraryLevel, s: Scratch, from: number, to: number, voters: readonly number[], chi2: Float64Array, voted: number): number {
  const typeOf = (r: number) => library.standards[level.rows[r]!]!.typeCode
  const best = voters.find((r) => Math.abs(typeOf(r) - voted) <= 1)
  if (best === undefined) return voted
  const partner = voters.find((r) => Math.abs(typeOf(r) - typeOf(best)) >= 1)
  if (partner === undefined) return voted
  const t1 = typeOf(best)
  const t2 = typeOf(partner)
  if (Math.abs(t2 - t1) < 2 || voters.some((r) => Math.abs(typeOf(r) - t1) >= 0.5 && Math.abs(typeOf(r) - t1) < 2)) return voted
  const mix = depthScaledPairChiSquare(s.flux, s.weights, level.flux, library.pixels, best, partner, from, to)
  if (!(mix.chi2 < 0.9 * chi2[best]!) || mix.fraction <= 0.15 || mix.fraction >= 0.85) return voted
  return Math.round((t1 + mix.fraction * (t2 - t1)) * 2) / 2
}

/** Unweighted rms residual, in continuum units, of the best level-and-depth fit of row `row` over the region. */
function bestResidual(flux: Float64Array, weights: Float64Array, rows: Float32Array, pixels: number, row: number, from: number, to: number): number {
  let m = 0,
    sx = 0,
    sy = 0,
    sxx = 0,
    sxy = 0,
    syy = 0
  const base = row * pixels
  for (let i = from; i < to; i++) {
    if (!(weights[i]! > 0)) continue
    const x = rows[base + i]!
    if (x !== x) continue
    const y = flux[i]!
    m++
    sx += x
    sy += y
    sxx += x * x
    sxy += x * y
    syy += y * y
  }
  if (m < 3) return Number.NaN
  const vx = sxx - (sx * sx) / m
  const cxy = sxy - (sx * sy) / m
  return Math.sqrt(Math.max(0, (syy - (sy * sy) / m - (vx > 0 ? (cxy * cxy) / vx : 0)) / m))
}
