import { DEFAULT_CLASSIFICATION_REGION, LATE_TYPE_FROM, LATE_TYPE_REGION, SPEED_OF_LIGHT_KMS, gridIndex, gridWavelengths, type LogGrid } from '../../shared/grid'
import type { Spectrum1D } from '../../shared/spectrum'
import { analyseAtVelocity, analyseSpectrum, type AnalyseOptions, type AnalysisResult } from './analyse'
import { solveLinearInPlace } from './linear'
import { SortedWindow, kthSmallest, lowerBound } from './prepare/stats'
import { estimateResolution, levelFor, matchSpectrum, mayShowEmission, notStarEvidence, standardOnGrid, type LibraryLevel, type MatchResult, type PreparedMatchLibrary } from './match'
import { fitSpectrumAtLevel, type LevelFit } from './match/classify'
import { maskSpectrumSpikes } from './prepare/mask'
import { libraryForInstrument, standardsUsed, type InstrumentMatchOptions, type StandardsUsed } from './match/instrument'
import { measureSpectrumRadialVelocity, shiftSpectrumToRest, type RadialVelocityResult } from './prepare/rv'
import { estimateSpectrumSnrByWindow } from './prepare/snr'

/** Version of the numeric pipeline; stored with every measurement and suggestion it makes. */
export const PIPELINE_VERSION = '2.4.0'

export interface PipelineInput {
  spectrum: Spectrum1D
  /** Instrumental resolution, FWHM Å, when the observer or the header gave it; estimated from the data otherwise. */
  inputFwhm?: number
  /** Classification region, Å (the campaign's); the default region when absent. */
  region?: readonly [number, number]
  /** Ids of standards left out (every spectrum of the star itself, when measuring accuracy on the library's own stars). */
  exclude?: ReadonlySet<number>
  /** The instrument the spectrum was taken with: its own standards in the library are matched first (match/instrument.ts). */
  instrumentId?: number
  /** How the instrument's standards and the general ones are combined. @default libraryForInstrument's defaults */
  instrumentOptions?: Omit<InstrumentMatchOptions, 'exclude'>
}

/** The resolution the spectrum was classified at, and where it came from. */
export interface PipelineResolution {
  /** The spectrum's own resolution, FWHM Å: as given, or estimated (null without a library to estimate against). */
  fwhm: number | null
  source: 'given' | 'estimated' | 'unknown'
  /** For an estimate: 'sharpest' means at least as sharp as the sharpest standards, 'coarsest' at least as broad as the coarsest level. */
  bound: 'within' | 'sharpest' | 'coarsest' | null
  /** Library level the spectrum was brought to and matched at, FWHM Å. */
  level: number | null
}

export interface PipelineOutput {
  pipelineVersion: string
  analysis: AnalysisResult
  /** The classification against the library, or null when no library was given. */
  suggestion: MatchResult | null
  resolution: PipelineResolution
  /** Which standards decided the suggestion (the instrument's own or the general library's), or null without a library. */
  standards: StandardsUsed | null
  /** Notes on how the suggestion was reached (another level used, not a star). */
  notes: string[]
  seconds: number
  /** Seconds per step: first analysis (with the resolution estimate), the search for the velocity reference, analysis at rest, final match. */
  steps: { analyse: number; match: number; analyseRest: number; matchRest: number }
}

/** Resolution in Å FWHM from what the observer gave: FWHM directly, or R = λ/Δλ at 4500 Å. */
export function resolutionFwhm(fwhm: number | null | undefined, resolvingPower: number | null | undefined): number | undefined {
  if (fwhm && fwhm > 0) return fwhm
  if (resolvingPower && resolvingPower > 0) return 4500 / resolvingPower
  return undefined
}

/** Where emission is looked for, Å. */
const EMISSION_RANGE = [3900, 5500] as const
/** Red end of the span the best standard is fitted over to find emission, Å; redder, the rectified spectrum alone is searched. */
const NOT_STAR_FIT_END = 5600
/** The reddest wavelength a spectrum must reach for LATE_TYPE_REGION to be used, Å: past Hα (6563 Å). */
const LATE_TYPE_NEEDS = 6600
/**
 * Where only the nearest standard is wanted (for the velocity, the S/N and the late-type region),
 * the best this many by the screening get the full χ², not the classification's 48, and the nearest
 * is the least of them (nearestRow): on all 333 reference stars it, and so every suggestion, came
 * out the same.
 */
const NEAREST_REFINE = 6

/** The row of least χ² among those given the full χ² (the others carry only their screening's estimate). */
function nearestRow(fit: LevelFit): number {
  let best = -1
  for (let r = 0; r < fit.chi2.length; r++) if (fit.exact[r] === 1 && (best < 0 || fit.chi2[r]! < fit.chi2[best]!)) best = r
  return best < 0 ? 0 : best
}

/**
 * The values minus their running median over ±`halfWidth` Å (plus 1), sampled every tenth pixel
 * and interpolated: removes what is left of a continuum mismatch on scales wider than the lines.
 */
export function subtractRunningMedian(values: Float64Array, wavelength: Float64Array, halfWidth: number): Float64Array {
  const n = values.length
  const stride = 10
  const anchors: { i: number; m: number }[] = []
  // Every third pixel of the window (j ≡ i mod 3): the median moves slowly. Anchors 30 pixels
  // apart share their pixels' residue, so each residue keeps one sorted window that slides.
  const windows = [0, 1, 2].map((r) => ({ sorted: new SortedWindow(Math.ceil(n / 3) + 2), lo: r, hi: r - 3 }))
  const finite = (j: number) => Number.isFinite(values[j]!)
  for (let i = 0; i < n; i += stride) {
    const w = windows[i % 3]!
    // The window is j = lo, lo+3, … hi with |λj − λi| ≤ halfWidth; both ends only move up.
    while (w.hi + 3 < n && wavelength[w.hi + 3]! - wavelength[i]! <= halfWidth) {
      w.hi += 3
      if (finite(w.hi)) w.sorted.add(values[w.hi]!)
    }
    while (w.lo <= w.hi && wavelength[i]! - wavelength[w.lo]! > halfWidth) {
      if (finite(w.lo)) w.sorted.remove(values[w.lo]!)
      w.lo += 3
    }
    if (!finite(i)) continue
    anchors.push({ i, m: w.sorted.kth(w.sorted.size >> 1) })
  }
  const out = new Float64Array(n).fill(Number.NaN)
  let k = 0
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(values[i]!) || anchors.length === 0) continue
    while (k < anchors.length - 2 && anchors[k + 1]!.i <= i) k++
    const a = anchors[k]!
    const b = anchors[Math.min(anchors.length - 1, k + 1)]!
    const m = b.i === a.i ? a.m : a.m + ((b.m - a.m) * (i - a.i)) / (b.i - a.i)
    out[i] = 1 + values[i]! - m
  }
  return out
}

/**
 * Runs every step of the numeric core on one spectrum; pure, so the CLI, the workers and the
 * benchmarks share it. With a library, every step sees it as the spectrum's instrument does
 * (libraryForInstrument: that instrument's own standards, the general ones where they leave gaps,
 * no other instrument's; `standards` in the output says which decided):
 * 1. Resolution: the observer's, or estimated against the library (estimateResolution); the
 *    spectrum is then brought to the library level at or just above it (levelFor) — the sharper
 *    of spectrum and standards is always brought to the coarser.
 * 2. Prepare at that level (no line measurements; the continuum fitted in ln F, so that reddening
 *    and flux calibration do not change how it is rectified), find the best standard, measure the
 *    radial velocity against it, shift the prepared spectrum to rest on the grid and measure every
 *    line there (analyseAtVelocity): the spectrum is prepared once.
 * 3. Match (matchSpectrum). When the type is within two subtypes of an end of the level's types
 *    and a coarser level has standards beyond it (O stars are only in the 15 Å library), the
 *    spectrum is matched there too and the coarser result kept if it lies beyond.
 * 4. Not a star: emission away from stellar lines or broad emission (notStarEvidence), as the
 *    spectra of galaxies and quasars show: flag 'not-star' and widen the uncertainty.
 */
export function runPipeline(input: PipelineInput, library?: PreparedMatchLibrary): PipelineOutput {
  const started = performance.now()
  const base: AnalyseOptions = input.region ? { snrRegion: input.region } : {}
  const steps = { analyse: 0, match: 0, analyseRest: 0, matchRest: 0 }
  const notes: string[] = []
  let t = performance.now()
  if (!library) {
    const analysis = analyseSpectrum(input.spectrum, { ...base, ...(input.inputFwhm !== undefined ? { inputFwhm: input.inputFwhm } : {}) })
    steps.analyse = (performance.now() - t) / 1000
    const resolution: PipelineResolution = { fwhm: input.inputFwhm ?? null, source: input.inputFwhm !== undefined ? 'given' : 'unknown', bound: null, level: null }
    return { pipelineVersion: PIPELINE_VERSION, analysis, suggestion: null, standards: null, resolution, notes, seconds: (performance.now() - started) / 1000, steps }
  }
  // Spikes once, here, rather than in each of the analyses below.
  const spikes = maskSpectrumSpikes(input.spectrum)
  if (spikes.count > 0) {
    input = { ...input, spectrum: spikes.spectrum }
    notes.push(`${spikes.count} pixel${spikes.count === 1 ? '' : 's'} masked as narrow spikes (cosmic-ray hits): each stood far above its neighbours, narrower than any resolved line.`)
  }
  base.maskSpikes = false
  const reach = coverage(input.spectrum)
  // The instrument's own standards where it has them, the general ones elsewhere, standards of
  // other instruments never; matched rectified over the range the spectrum covers, as it is itself.
  // The resolution estimate fits every level, so it uses the library as it is: a new range costs one level, not all.
  const instrumentOptions = { ...input.instrumentOptions, ...(input.exclude ? { exclude: input.exclude } : {}) }
  const over = library.rectifiedOver(reach)
  const wholeRange = libraryForInstrument(library, input.instrumentId ?? null, instrumentOptions)
  library = over === library ? wholeRange : libraryForInstrument(over, input.instrumentId ?? null, instrumentOptions)
  // Next to the spectrum's own ends its continuum rests on one side only: regions keep clear of them.
  const covered = inset(reach, EDGE_MARGIN)
  const chosen = classificationRegion(library, input.region, reach, notes)
  const region = chosen.region
  // A region other than the default one is also where the velocity and the headline S/N are measured.
  if (chosen.own) {
    base.snrRegion = region
    base.rvRegion = region
  }
  const exclude = input.exclude ? { exclude: input.exclude } : {}
  const matchOptions = { region, ...exclude }
  // An infinite S/N floor skips the line measurements: only the prepared arrays are used before the rest frame.
  const quick = { ...base, snrFloor: Infinity }
  let fwhm = input.inputFwhm
  let resolution: PipelineResolution
  let first: AnalysisResult
  if (fwhm !== undefined && fwhm > 0) {
    const level = levelFor(library, fwhm)
    resolution = { fwhm, source: 'given', bound: null, level }
    first = analyseSpectrum(input.spectrum, atLevel(quick, fwhm, level))
  } else {
    const unsmoothed = analyseSpectrum(input.spectrum, quick)
    // Lines out of place fit broad standards best: estimate at rest (velocity against the best sharp standard).
    const sharp = fitSpectrumAtLevel(library, matchInput(unsmoothed, undefined), library.resolutions[0]!, { region, refineCount: NEAREST_REFINE, ...exclude })
    const nearest = nearestRow(sharp.fit)
    const p0 = unsmoothed.prepared
    const velocity = measureSpectrumRadialVelocity({ wavelength: gridWavelengths(p0.grid), flux: p0.rectified, mask: p0.mask }, standardOnGrid(library, sharp.level, nearest), {
      grid: p0.grid,
      region,
    })
    const atRest = velocity.found && Math.abs(velocity.velocity) > 15 ? analyseSpectrum(shiftSpectrumToRest(input.spectrum, { velocity: velocity.velocity }), quick) : unsmoothed
    const estimate = estimateResolution(wholeRange, matchInput(atRest, undefined), { region, ...exclude })
    fwhm = estimate.fwhm
    const level = levelFor(library, fwhm)
    resolution = { fwhm, source: 'estimated', bound: estimate.bound, level }
    first = level > fwhm * 1.02 ? analyseSpectrum(input.spectrum, atLevel(quick, fwhm, level)) : unsmoothed
  }
  steps.analyse = (performance.now() - t) / 1000
  const options: AnalyseOptions = atLevel(base, fwhm, resolution.level!)

  t = performance.now()
  const located = fitSpectrumAtLevel(library, matchInput(first, resolution.level!), resolution.level!, { region, refineCount: NEAREST_REFINE, ...exclude })
  const bestRow = nearestRow(located.fit)
  steps.match = (performance.now() - t) / 1000

  t = performance.now()
  const velocity = velocityAgainst(input, options, first, standardOnGrid(library, located.level, bestRow))
  const residual = first.snrMethod === 'der-snr' ? residualSnr(library, located.level, bestRow, first, input.spectrum, region, velocity.found ? velocity.velocity : 0) : null
  if (residual !== null) options.residualSnr = residual
  const rest = analyseAtRest(input, options, first, velocity)
  let analysis = rest.analysis
  steps.analyseRest = (performance.now() - t) / 1000

  t = performance.now()
  // Cool stars (the nearest standard G0 or later) that reach Hα are matched over the red as well,
  // unless the campaign chose a region of its own.
  let usedOptions = matchOptions
  const nearestType = library.standards[located.level.rows[bestRow]!]!.typeCode
  const late = overlap(LATE_TYPE_REGION, covered)
  if (chosen.fromDefault && nearestType >= LATE_TYPE_FROM && reach[1] >= LATE_TYPE_NEEDS && late[1] - late[0] > region[1] - region[0]) {
    usedOptions = { ...matchOptions, region: late }
    notes.push(
      `The nearest standard is G or later, so matched over ${Math.round(late[0])}–${Math.round(late[1])} Å rather than ${Math.round(region[0])}–${Math.round(region[1])} Å: Mg b, Na D and Hα carry the temperature of cool stars.`,
    )
  }
  let suggestion = matchSpectrum(library, matchInput(analysis, resolution.level!), usedOptions)
  const types = library.level(resolution.level!).typeCodes
  if (suggestion.typeCode <= types[0]! + 2 || suggestion.typeCode >= types[types.length - 1]! - 2) {
    const beyond = coarserLevelBeyond(library, resolution.level!, suggestion.typeCode)
    if (beyond !== null) {
      // Whether the coarser level serves is decided by the type, which the line measurements do not
      // change (only the emission flag reads them): a look without them first, and the whole
      // analysis at that level only when it does serve (rarely: most stars near an end stay).
      const probe = matchSpectrum(library, matchInput(analyseSpectrum(rest.spectrum, atLevel(quick, fwhm, beyond)), beyond), usedOptions)
      const edge = library.level(resolution.level!).typeCodes
      if (probe.typeCode < edge[0]! || probe.typeCode > edge[edge.length - 1]!) {
        const wide = analyseSpectrum(rest.spectrum, atLevel(base, fwhm, beyond))
        const other = matchSpectrum(library, matchInput(wide, beyond), usedOptions)
        notes.push(`The standards at ${resolution.level} Å end at ${suggestion.spectralType.split(' ')[0]}; matched at ${beyond} Å, where the library reaches further.`)
        suggestion = other
        analysis = { ...wide, rv: analysis.rv }
        resolution = { ...resolution, level: beyond }
      }
    }
  }
  if (suggestion.typeNote) notes.push(suggestion.typeNote)
  const notStar = notStarReason(library, analysis, rest.spectrum, resolution.level!, suggestion)
  if (notStar) {
    notes.push(`Not a star: ${notStar}.`)
    suggestion = {
      ...suggestion,
      flags: [...suggestion.flags, 'not-star'],
      uncertainty: { subtypes: Math.max(suggestion.uncertainty.subtypes, 10), classes: Math.max(suggestion.uncertainty.classes, 2) },
    }
  }
  if (suggestion.flags.includes('not-mk'))
    suggestion = { ...suggestion, uncertainty: { subtypes: Math.max(suggestion.uncertainty.subtypes, 10), classes: Math.max(suggestion.uncertainty.classes, 2) } }
  steps.matchRest = (performance.now() - t) / 1000
  return { pipelineVersion: PIPELINE_VERSION, analysis, suggestion, standards: standardsUsed(library, suggestion), resolution, notes, seconds: (performance.now() - started) / 1000, steps }
}

/**
 * S/N per input pixel from the residual of the best standard's fit over the region: DER_SNR's
 * noise formula (Stoehr et al. 2008) applied to the input pixels themselves, rectified by the
 * prepared continuum, minus a + b · standard + c · its second difference (the standard shifted to
 * the spectrum's velocity). The lines of star and standard cancel, so what DER_SNR reads as noise
 * in a spectrum sampled at a few pixels per resolution element (every line) is gone; the input
 * pixels carry their own noise, where the smoothed and resampled grid would carry less of it.
 * @param velocity the spectrum's radial velocity against the standard, km/s
 */
export function residualSnr(
  library: PreparedMatchLibrary,
  level: LibraryLevel,
  row: number,
  first: AnalysisResult,
  spectrum: Spectrum1D,
  region: readonly [number, number],
  velocity = 0,
): number | null {
  const p = first.prepared
  const { pixels, wavelength: span } = library
  const template = level.flux.subarray(row * pixels, (row + 1) * pixels)
  const doppler = 1 + velocity / SPEED_OF_LIGHT_KMS
  // The standard's second difference over a step well inside its lines' width: fitted with it, a
  // difference of resolution between spectrum and standard (a line a little wider or narrower) cancels too.
  const h = level.fwhm / 2.5
  const spanGrid = { start: span[0]!, step: library.grid.step, length: pixels }
  const at = (values: ArrayLike<number>, grid: LogGrid, lambda: number) => {
    const x = gridIndex(grid, lambda)
    const j = Math.floor(x)
    if (j < 0 || j >= grid.length - 1) return Number.NaN
    return values[j]! + (values[j + 1]! - values[j]!) * (x - j)
  }
  const { wavelength, flux, mask } = spectrum
  const start = lowerBound(wavelength, region[0])
  let end = start
  while (end < wavelength.length && wavelength[end]! <= region[1]) end++
  // Typed arrays of the most pixels the region can hold: plain arrays grown by push, and an array per
  // pixel in the sums, made this the pipeline's largest allocation.
  const y = new Float64Array(end - start)
  const t = new Float64Array(end - start)
  const t2 = new Float64Array(end - start)
  let m = 0
  for (let i = start; i < end; i++) {
    if (mask?.[i] || !Number.isFinite(flux[i]!)) continue
    const c = at(p.continuum, p.grid, wavelength[i]!)
    const x = at(template, spanGrid, wavelength[i]! / doppler)
    const lo = at(template, spanGrid, (wavelength[i]! - h) / doppler)
    const hi = at(template, spanGrid, (wavelength[i]! + h) / doppler)
    if (!(c > 0) || !Number.isFinite(x) || !Number.isFinite(lo) || !Number.isFinite(hi)) continue
    y[m] = flux[i]! / c
    t[m] = x
    t2[m] = lo + hi - 2 * x
    m++
  }
  if (m < 50) return null
  // Least squares for y ≈ a + b·t + c·t2 (normal equations, 3×3).
  const normal = new Float64Array(9)
  const rhs = new Float64Array(3)
  const coef = new Float64Array(3)
  const v = new Float64Array(3)
  v[0] = 1
  for (let k = 0; k < m; k++) {
    v[1] = t[k]!
    v[2] = t2[k]!
    for (let u = 0; u < 3; u++) {
      rhs[u] = rhs[u]! + v[u]! * y[k]!
      for (let w = 0; w < 3; w++) normal[3 * u + w] = normal[3 * u + w]! + v[u]! * v[w]!
    }
  }
  if (!solveLinearInPlace(normal, rhs, coef, 3)) return null
  const r = new Float64Array(m)
  for (let k = 0; k < m; k++) r[k] = y[k]! - (coef[0]! + coef[1]! * t[k]! + coef[2]! * t2[k]!)
  const d = new Float64Array(m - 4)
  for (let k = 2; k < m - 2; k++) d[k - 2] = Math.abs(2 * r[k]! - r[k - 2]! - r[k + 2]!)
  const noise = (1.482602 / Math.sqrt(6)) * medianOf(d)
  return noise > 0 ? medianOf(y.subarray(0, m)) / noise : null
}

/** The upper median of the finite values (the value a sort puts at n/2), by selection. */
function medianOf(values: ArrayLike<number>): number {
  const finite = new Float64Array(values.length)
  let m = 0
  for (let i = 0; i < values.length; i++) if (Number.isFinite(values[i]!)) finite[m++] = values[i]!
  return m === 0 ? Number.NaN : kthSmallest(finite.subarray(0, m), m >> 1)
}

/** Narrowest classification region the matcher accepts, Å. */
const MIN_REGION = 300

/** How far a classification region keeps from the ends of the spectrum, Å. */
const EDGE_MARGIN = 50

/** First and last wavelength with a finite, unmasked flux, Å. */
function coverage(spectrum: Spectrum1D): readonly [number, number] {
  const { wavelength, flux, mask } = spectrum
  let lo = Infinity
  let hi = -Infinity
  for (let i = 0; i < wavelength.length; i++) {
    if (mask?.[i] || !Number.isFinite(flux[i]!)) continue
    lo = Math.min(lo, wavelength[i]!)
    hi = Math.max(hi, wavelength[i]!)
  }
  return [lo, hi]
}

const inset = (r: readonly [number, number], margin: number): readonly [number, number] => [r[0] + margin, r[1] - margin]

function overlap(a: readonly [number, number], b: readonly [number, number]): readonly [number, number] {
  return [Math.max(a[0], b[0]), Math.min(a[1], b[1])]
}

const span = (r: readonly [number, number]) => `${Math.round(r[0])}–${Math.round(r[1])} Å`

/**
 * Where the spectrum is classified: the campaign's region, else the default one, as far as both
 * the standards (their stored span) and the spectrum (EDGE_MARGIN inside its ends) reach, when at
 * least MIN_REGION Å of it is left; otherwise all that the spectrum and the standards share, so
 * that a spectrum of the red alone is still classified (with a note). `own` when that is not the
 * default region; `fromDefault` when no campaign region was used.
 */
function classificationRegion(
  library: PreparedMatchLibrary,
  wanted: readonly [number, number] | undefined,
  reach: readonly [number, number],
  notes: string[],
): { region: readonly [number, number]; own: boolean; fromDefault: boolean } {
  const standards: readonly [number, number] = [library.wavelength[0]!, library.wavelength[library.pixels - 1]!]
  const shared = overlap(standards, inset(reach, EDGE_MARGIN))
  if (wanted) {
    const [lo, hi] = overlap(wanted, shared)
    if (hi - lo >= MIN_REGION) {
      if (lo > wanted[0] || hi < wanted[1]) notes.push(`Classified over ${span([lo, hi])}, the part of the campaign's region ${span(wanted)} that the standards and the spectrum cover.`)
      return { region: [lo, hi], own: true, fromDefault: false }
    }
    notes.push(`The campaign's region ${span(wanted)} lies outside what the standards (${span(standards)}) and the spectrum (${span(reach)}) share; the default region is used.`)
  }
  const fallback = DEFAULT_CLASSIFICATION_REGION
  const [lo, hi] = overlap(fallback, shared)
  if (lo <= fallback[0] && hi >= fallback[1]) return { region: fallback, own: false, fromDefault: true }
  if (hi - lo >= MIN_REGION) {
    notes.push(`The spectrum (${span(reach)}) covers ${span([lo, hi])} of the classification region ${span(fallback)}; classified over that part.`)
    return { region: [lo, hi], own: true, fromDefault: true }
  }
  notes.push(
    `The spectrum (${span(reach)}) does not reach the MK classification region ${span(fallback)}; classified over ${span(shared)}, where it overlaps the standards, from other lines than the MK criteria.`,
  )
  return { region: shared, own: true, fromDefault: true }
}

/** Options that bring a spectrum of resolution `fwhm` to `level` (smoothing only when the level is coarser). */
function atLevel(options: AnalyseOptions, fwhm: number, level: number): AnalyseOptions {
  return level > fwhm * 1.001 ? { ...options, targetFwhm: level, inputFwhm: fwhm } : { ...options, inputFwhm: fwhm }
}

/** The sharpest level coarser than `level` whose standards reach beyond `typeCode`'s end of `level`'s types. */
function coarserLevelBeyond(library: PreparedMatchLibrary, level: number, typeCode: number): number | null {
  // Type codes only: preparing each coarser level to learn its reach costs about a second apiece.
  const types = library.typeCodesAt(level)
  const early = typeCode - types[0]! < types[types.length - 1]! - typeCode
  for (const l of library.resolutions) {
    if (l <= level) continue
    const other = library.typeCodesAt(l)
    if (early ? other[0]! < types[0]! : other[other.length - 1]! > types[types.length - 1]!) return l
  }
  return null
}

/** Width of the stretches whose own S/N sets the not-star threshold, Å. */
const NOISE_BLOCK = 100

/**
 * Noise per grid pixel in continuum units: 1/S/N of the 100 Å stretch of input pixels around it
 * (DER_SNR, on the pixels as observed), where that is worse than `sigma`, the headline S/N's. A cool
 * star's blue end is far noisier than its headline S/N says, and its noise there is not emission.
 */
function localNoise(rest: Spectrum1D, wavelength: Float64Array, sigma: number): Float64Array {
  const start = Math.floor(wavelength[0]! / NOISE_BLOCK) * NOISE_BLOCK
  const windows: [number, number][] = []
  for (let lo = start; lo < wavelength[wavelength.length - 1]!; lo += NOISE_BLOCK) windows.push([lo, lo + NOISE_BLOCK])
  const snrs = estimateSpectrumSnrByWindow(rest, { windows })
  const out = new Float64Array(wavelength.length)
  for (let i = 0; i < out.length; i++) {
    const snr = snrs[Math.floor((wavelength[i]! - start) / NOISE_BLOCK)]
    out[i] = snr !== null && snr !== undefined && snr > 0 ? Math.max(sigma, 1 / snr) : sigma
  }
  return out
}

/**
 * Why the spectrum is not of a star, or null. Emission is looked for in the residual from the best
 * standard (1 + spectrum − fit) rather than in the rectified spectrum, because the fitted continuum
 * of a cool star runs below the true one among its crowded lines and the gaps between lines would
 * pass for emission.
 */
function notStarReason(library: PreparedMatchLibrary, analysis: AnalysisResult, rest: Spectrum1D, level: number, suggestion: MatchResult): string | null {
  const p = analysis.prepared
  const levelData = library.level(level)
  const row = levelData.rows.indexOf(library.standards.findIndex((s) => s.id === suggestion.bestStandardId))
  if (row < 0) return null
  const sigma = analysis.snr !== null && analysis.snr > 0 ? 1 / analysis.snr : 0.02
  const wavelength = gridWavelengths(p.grid)
  let local: Float64Array | null = null
  const noise = () => (local ??= localNoise(rest, wavelength, sigma))
  const { offset, pixels } = library
  const template = levelData.flux.subarray(row * pixels, (row + 1) * pixels)
  let m = 0,
    sx = 0,
    sy = 0,
    sxx = 0,
    sxy = 0
  // The standard is fitted over the blue span only: across the red as well, one level and depth no longer fit both.
  let fitEnd = 0
  while (fitEnd < pixels && library.wavelength[fitEnd]! <= NOT_STAR_FIT_END) fitEnd++
  for (let i = 0; i < fitEnd; i++) {
    const x = template[i]!
    const y = p.rectified[i + offset]!
    if (p.mask[i + offset] !== 0 || !Number.isFinite(x) || !Number.isFinite(y)) continue
    m++
    sx += x
    sy += y
    sxx += x * x
    sxy += x * y
  }
  if (m > 10) {
    const b = (m * sxy - sx * sy) / (m * sxx - sx * sx)
    const a = (sy - b * sx) / m
    const residual = new Float64Array(pixels)
    // 1 + (y − 1) rather than y: the rounding the two steps always had, so results stay bit-identical.
    const ownPlusOne = new Float64Array(pixels)
    for (let i = 0; i < pixels; i++) {
      const x = template[i]!
      const y = p.rectified[i + offset]!
      const lambda = library.wavelength[i]!
      // Outside 3900–5500 Å the continuum fits of spectrum and standard part ways (few points, steep blue ends).
      const used = p.mask[i + offset] === 0 && Number.isFinite(x) && Number.isFinite(y) && lambda >= EMISSION_RANGE[0] && lambda <= EMISSION_RANGE[1]
      residual[i] = used ? y - (a + b * x) : Number.NaN
      ownPlusOne[i] = 1 + (used ? y - 1 : Number.NaN)
    }
    if (mayShowEmission(ownPlusOne, suggestion.typeCode)) {
      const emission = notStarEvidence(library.wavelength, ownPlusOne, subtractRunningMedian(residual, library.wavelength, 150), noise().subarray(offset, offset + pixels), level, suggestion.typeCode)
      if (emission) return emission.reason
    }
  }
  // Beyond the fitted span only the rectified spectrum speaks: strong emission there (Hβ and
  // [O III] of a galaxy at z ≈ 0.1–0.3) away from Hα and He I.
  // A loop: TypedArray.from with a mapping function is many times slower.
  const red = new Float64Array(p.rectified.length)
  const redFrom = library.wavelength[Math.max(0, fitEnd - 1)]!
  for (let i = 0; i < red.length; i++) red[i] = p.mask[i] !== 0 || wavelength[i]! < redFrom ? Number.NaN : p.rectified[i]!
  if (!mayShowEmission(red, suggestion.typeCode)) return null
  const floored = noise()
  for (let i = 0; i < floored.length; i++) floored[i] = Math.max(floored[i]!, 0.05)
  return notStarEvidence(wavelength, red, red, floored, level, suggestion.typeCode)?.reason ?? null
}

/** The radial velocity of an observed-frame preparation against a standard, measured as analyseSpectrum would with it as rvReference. */
function velocityAgainst(input: PipelineInput, options: AnalyseOptions, first: AnalysisResult, reference: Spectrum1D): ReturnType<typeof measureSpectrumRadialVelocity> {
  const p = first.prepared
  return measureSpectrumRadialVelocity({ wavelength: gridWavelengths(p.grid), flux: p.rectified, mask: p.mask }, reference, {
    grid: p.grid,
    region: options.rvRegion ?? input.region ?? DEFAULT_CLASSIFICATION_REGION,
  })
}

/** The spectrum analysed at rest (analyseAtVelocity) from its observed-frame preparation, and its pixels shifted to rest. */
function analyseAtRest(input: PipelineInput, options: AnalyseOptions, first: AnalysisResult, result: RadialVelocityResult): { analysis: AnalysisResult; spectrum: Spectrum1D } {
  const rvRegion = options.rvRegion ?? input.region ?? DEFAULT_CLASSIFICATION_REGION
  const restOptions: AnalyseOptions = { ...options, ...(options.rvRegion || input.region ? { rvRegion } : {}) }
  const analysis = analyseAtVelocity(input.spectrum, first, result, restOptions)
  return { analysis, spectrum: result.found ? shiftSpectrumToRest(input.spectrum, { velocity: result.velocity }) : input.spectrum }
}

function matchInput(analysis: AnalysisResult, fwhm: number | undefined) {
  const p = analysis.prepared
  return {
    rectified: p.rectified,
    ...(p.rectifiedError ? { rectifiedError: p.rectifiedError } : {}),
    mask: p.mask,
    snr: analysis.snr,
    ...(fwhm !== undefined ? { fwhm } : {}),
    lines: analysis.lines,
  }
}
