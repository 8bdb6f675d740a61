/**
 * Matching a spectrum against the standards of its own instrument. A team's agreed spectra,
 * promoted as an instrument's standards, share the instrument's resolution, response, sampling
 * and wavelength calibration with every other spectrum it takes; the library's standards do not.
 * For a spectrum of such an instrument the matcher sees the instrument's own standards beside the
 * library's general ones (brought to the spectrum's level like any standard), and the χ² decides:
 * with the own standards' noise taken out of it (classify.ts), an own standard wins where it fits
 * better, and the general ones decide where the instrument's set has gaps. Standards promoted for
 * other instruments never take part. Leaving out the general standards an own standard covers is
 * an option; bench/instrument.ts measures it (slightly worse on the reference stars).
 */
import { CRITERIA, criterionValue } from './criteria'
import type { MatchResult } from './types'
import { balmerHalfDepthWidth } from './flags'
import { fillNeighbourResiduals, type LibraryLevel, type MatchStandardInfo, type PreparedMatchLibrary } from './library'

export interface InstrumentMatchOptions {
  /** Ids of standards left out (the star being classified, when measuring accuracy). @default none */
  exclude?: ReadonlySet<number>
  /**
   * Leave out a general standard where an instrument standard lies within `types` subtypes and
   * `classes` luminosity classes of it (IV-V is half a class from IV and from V). @default null: none left out
   */
  cover?: { types: number; classes: number } | null
  /**
   * Multiply the general standards by a smooth response correction learned from pairs of an
   * instrument standard and a general standard of the same type and class (responseCorrection).
   * @default false (bench/instrument.ts measures both)
   */
  responseCorrection?: boolean
}

/** What an instrument's view of a library holds at one level. */
export interface InstrumentLevelInfo {
  /** The instrument's own standards at the level. */
  instrumentStandards: number
  /** General standards left out because an instrument standard covers their type and class. */
  covered: number
  /** General standards kept (they fill the instrument's gaps). */
  general: number
  /** The response correction applied to the general standards, when one was. */
  correction: { pairs: number; largest: number } | null
}

/** A prepared library as one instrument's spectra are matched against it. */
export interface InstrumentLibrary extends PreparedMatchLibrary {
  /** The instrument, or null for spectra of no instrument with standards of its own. */
  instrumentId: number | null
  /** What the level of resolution `fwhm` holds for the instrument. */
  levelInfo(fwhm: number): InstrumentLevelInfo
}

/** Which standards decided a suggestion: the instrument's own, or the general library's. */
export interface StandardsUsed {
  instrumentId: number | null
  /** The instrument's own standards at the level matched (0 when it has none, or for no instrument). */
  instrumentStandards: number
  /** General standards left out there because the instrument's own cover their type and class. */
  covered: number
  /** Shares of the type vote and of the class vote from the instrument's own standards (0–1). */
  instrumentShare: { type: number; class: number }
  /** 'instrument' when its own standards carry at least 80 % of both votes, 'library' when they carry none, else 'mixed'. */
  decidedBy: 'instrument' | 'library' | 'mixed'
  /** The voting standards with at least 5 % of the type or class vote, largest first. */
  deciding: { standardId: number; spectralType: string; star: string | null; origin: string | null; set: 'instrument' | 'library'; typeShare: number; classShare: number }[]
  /** The response correction applied to the general standards, when one was. */
  correction: { pairs: number; largest: number } | null
}

const cache = new WeakMap<PreparedMatchLibrary, Map<string, InstrumentLibrary>>()
/** Views kept per library: one per instrument in the server; the benchmarks make one per star. */
const CACHE_SIZE = 8

/**
 * The library as a spectrum of `instrumentId` is matched against it (null: a spectrum of no
 * instrument, or of one without standards). At each level, on first use:
 * - the instrument's own standards (MatchStandardInput.instrumentId) take part;
 * - a general standard (no instrument) takes part, unless `cover` is given and an instrument
 *   standard of the level lies that close to it;
 * - standards of other instruments never do; `exclude`d instrument standards cover nothing (the
 *   matcher's own `exclude` keeps every excluded standard out of the vote);
 * - with `responseCorrection`, the general standards are multiplied by responseCorrection's factor.
 * The rows keep their order and the standards array is shared, so ids, `reference` and every
 * per-row measure (criteria, Balmer widths) mean what they mean in the library; the neighbour
 * residuals that judge a poor fit are measured again among the rows kept. A level with nothing to
 * change is the library's own. Views are cached per library, instrument and exclusions.
 */
export function libraryForInstrument(library: PreparedMatchLibrary, instrumentId: number | null, options: InstrumentMatchOptions = {}): InstrumentLibrary {
  const { exclude, cover = null, responseCorrection: correct = false } = options
  // Only exclusions among the instrument's own standards change the view (they no longer cover
  // anything); every other excluded standard keeps its row and is left out by the matcher's own `exclude`.
  const excluded =
    exclude && instrumentId !== null
      ? library.standards
          .filter((s) => exclude.has(s.id) && isOwn(s, instrumentId))
          .map((s) => s.id)
          .sort((a, b) => a - b)
      : []
  const key = `${instrumentId}|${cover ? `${cover.types},${cover.classes}` : '-'}|${correct}|${excluded.join(',')}`
  let views = cache.get(library)
  if (!views) cache.set(library, (views = new Map()))
  const hit = views.get(key)
  if (hit) return hit

  const out = new Set(excluded)
  const levels = new Map<number, { level: LibraryLevel; info: InstrumentLevelInfo }>()
  const derive = (fwhm: number) => {
    let entry = levels.get(fwhm)
    if (!entry) {
      entry = deriveLevel(library, library.level(fwhm), instrumentId, out, cover, correct)
      levels.set(fwhm, entry)
    }
    return entry
  }
  // Without standards of its own, a view holds the library's general standards as they are.
  const hasOwn = instrumentId !== null && library.standards.some((s) => isOwn(s, instrumentId))
  const view: InstrumentLibrary = {
    ...library,
    instrumentId,
    level: (fwhm: number) => derive(fwhm).level,
    standardFlux: (fwhm: number, k: number) => {
      if (!hasOwn && !levels.has(fwhm)) return isGeneral(library.standards[k]!) ? library.standardFlux(fwhm, k) : null
      const { level } = derive(fwhm)
      const r = level.rows.indexOf(k)
      return r < 0 ? null : level.flux.subarray(r * library.pixels, (r + 1) * library.pixels)
    },
    levelInfo: (fwhm: number) => derive(fwhm).info,
  }
  if (views.size >= CACHE_SIZE) views.delete(views.keys().next().value!)
  views.set(key, view)
  return view
}

const isOwn = (s: MatchStandardInfo, instrumentId: number | null) => instrumentId !== null && s.instrumentId === instrumentId
const isGeneral = (s: MatchStandardInfo) => s.instrumentId === null || s.instrumentId === undefined

function deriveLevel(
  library: PreparedMatchLibrary,
  level: LibraryLevel,
  instrumentId: number | null,
  out: ReadonlySet<number>,
  cover: { types: number; classes: number } | null,
  correct: boolean,
): { level: LibraryLevel; info: InstrumentLevelInfo } {
  const std = (k: number) => library.standards[k]!
  const own: number[] = []
  const covering: number[] = []
  const general: number[] = []
  level.rows.forEach((k, r) => {
    const s = std(k)
    if (isOwn(s, instrumentId)) {
      own.push(r)
      if (!out.has(s.id)) covering.push(r)
    } else if (isGeneral(s)) general.push(r)
  })
  const covers = (g: number) =>
    cover !== null &&
    covering.some((r) => {
      const a = std(level.rows[r]!)
      const b = std(level.rows[g]!)
      return Math.abs(a.typeCode - b.typeCode) <= cover.types + 1e-9 && Math.abs(a.classCode - b.classCode) <= cover.classes + 1e-9
    })
  const keptGeneral = general.filter((g) => !covers(g))
  const kept = [...own, ...keptGeneral].sort((a, b) => a - b)
  const correction = correct && covering.length > 0 ? responseCorrection(library, level, covering, general) : null
  const info: InstrumentLevelInfo = {
    instrumentStandards: covering.length,
    covered: general.length - keptGeneral.length,
    general: keptGeneral.length,
    correction: correction ? { pairs: correction.pairs, largest: Math.round(correction.largest * 1e4) / 1e4 } : null,
  }
  if (kept.length === level.rows.length && !correction) return { level, info }
  if (kept.length === 0) throw new Error(`no standard is left at ${level.fwhm} Å`)

  const { pixels, coarseStep, coarsePixels, wavelength } = library
  const n = kept.length
  const derived: LibraryLevel = {
    fwhm: level.fwhm,
    rows: Int32Array.from(kept, (r) => level.rows[r]!),
    flux: new Float32Array(n * pixels),
    criteria: new Float64Array(CRITERIA.length * n),
    coarse: new Float32Array(n * coarsePixels),
    neighbourResidual: new Float64Array(n),
    balmerWidth: new Float64Array(n),
    typeCodes: [...new Set(kept.map((r) => std(level.rows[r]!).typeCode))].sort((a, b) => a - b),
  }
  const m = level.rows.length
  kept.forEach((r, q) => {
    const source = level.flux.subarray(r * pixels, (r + 1) * pixels)
    const corrected = correction !== null && isGeneral(std(level.rows[r]!))
    const flux = derived.flux.subarray(q * pixels, (q + 1) * pixels)
    if (corrected) for (let i = 0; i < pixels; i++) flux[i] = source[i]! * correction.factor[i]!
    else flux.set(source)
    for (let j = 0; j < coarsePixels; j++) derived.coarse[q * coarsePixels + j] = flux[j * coarseStep]!
    CRITERIA.forEach((c, ci) => {
      derived.criteria[ci * n + q] = corrected ? criterionValue(c, flux, wavelength) : level.criteria[ci * m + r]!
    })
    derived.balmerWidth[q] = corrected ? balmerHalfDepthWidth(flux, wavelength) : level.balmerWidth[r]!
  })
  fillNeighbourResiduals(derived, library.standards, wavelength, coarseStep, coarsePixels)
  return { level: derived, info }
}

/**
 * A smooth response correction for the general standards of a level, in rectified units: for each
 * pair of an instrument standard and a general standard of the same type and class (within half a
 * subtype and half a class), their ratio smoothed by a running median over ±`halfWidth` Å (lines
 * the two stars do not share drop out); the correction is the median of the pairs at each pixel,
 * 1 where fewer than `minPairs` pairs have a value. What it takes up is what the continuum fit
 * leaves of the instrument's response and of its different way of rectifying.
 * @param own, general rows of the level
 * @returns the factor over the library span and the number of pairs, or null with fewer than `minPairs` pairs
 */
export function responseCorrection(
  library: PreparedMatchLibrary,
  level: LibraryLevel,
  own: readonly number[],
  general: readonly number[],
  halfWidth = 60,
  minPairs = 3,
): { factor: Float64Array; pairs: number; largest: number } | null {
  const std = (r: number) => library.standards[level.rows[r]!]!
  const pairs: [number, number][] = []
  for (const a of own) {
    for (const b of general) {
      if (Math.abs(std(a).typeCode - std(b).typeCode) <= 0.5 + 1e-9 && Math.abs(std(a).classCode - std(b).classCode) <= 0.5 + 1e-9) pairs.push([a, b])
    }
  }
  if (pairs.length < minPairs) return null
  const { pixels, wavelength } = library
  const stride = 8
  const anchors: number[] = []
  for (let i = 0; i < pixels; i += stride) anchors.push(i)
  if (anchors[anchors.length - 1] !== pixels - 1) anchors.push(pixels - 1)
  // Smoothed ratio of each pair at the anchors.
  const smoothed = pairs.map(([a, b]) => {
    const fa = level.flux.subarray(a * pixels, (a + 1) * pixels)
    const fb = level.flux.subarray(b * pixels, (b + 1) * pixels)
    return anchors.map((i) => {
      const window: number[] = []
      for (let j = i; j >= 0 && wavelength[i]! - wavelength[j]! <= halfWidth; j -= 2) pushRatio(window, fa[j]!, fb[j]!)
      for (let j = i + 2; j < pixels && wavelength[j]! - wavelength[i]! <= halfWidth; j += 2) pushRatio(window, fa[j]!, fb[j]!)
      return window.length >= 10 ? median(window) : Number.NaN
    })
  })
  const atAnchor = anchors.map((_, q) => {
    const values = smoothed.map((s) => s[q]!).filter(Number.isFinite)
    return values.length >= minPairs ? median(values) : 1
  })
  const factor = new Float64Array(pixels)
  let k = 0
  let largest = 0
  for (let i = 0; i < pixels; i++) {
    while (k < anchors.length - 2 && anchors[k + 1]! <= i) k++
    const i0 = anchors[k]!
    const i1 = anchors[k + 1] ?? i0
    const t = i1 === i0 ? 0 : (i - i0) / (i1 - i0)
    factor[i] = atAnchor[k]! + t * ((atAnchor[k + 1] ?? atAnchor[k]!) - atAnchor[k]!)
    largest = Math.max(largest, Math.abs(factor[i]! - 1))
  }
  return { factor, pairs: pairs.length, largest }
}

/** Ratios of continuum pixels only: deep lines make the ratio of two stars unstable. */
function pushRatio(out: number[], a: number, b: number): void {
  if (Number.isFinite(a) && Number.isFinite(b) && b > 0.8 && a > 0.8) out.push(a / b)
}

function median(values: number[]): number {
  values.sort((x, y) => x - y)
  const m = values.length >> 1
  return values.length % 2 ? values[m]! : (values[m - 1]! + values[m]!) / 2
}

/**
 * Which standards decided a suggestion made against `library` (an instrument's view, or the
 * library itself): the instrument's share of the type and class votes, and every voter with at
 * least 5 % of either.
 */
export function standardsUsed(library: PreparedMatchLibrary | InstrumentLibrary, result: MatchResult): StandardsUsed {
  const instrumentId = 'instrumentId' in library ? library.instrumentId : null
  const info = 'levelInfo' in library ? library.levelInfo(result.levelFwhm) : null
  const byId = new Map(library.standards.map((s) => [s.id, s]))
  let typeShare = 0
  let classShare = 0
  const deciding: StandardsUsed['deciding'] = []
  for (const v of result.voters) {
    const s = byId.get(v.standardId)
    if (!s) continue
    const own = isOwn(s, instrumentId)
    if (own) {
      typeShare += v.typeShare
      classShare += v.classShare
    }
    if (v.typeShare >= 0.05 || v.classShare >= 0.05) {
      deciding.push({ standardId: s.id, spectralType: s.spectralType, star: s.star, origin: s.origin, set: own ? 'instrument' : 'library', typeShare: v.typeShare, classShare: v.classShare })
    }
  }
  deciding.sort((a, b) => Math.max(b.typeShare, b.classShare) - Math.max(a.typeShare, a.classShare))
  const round3 = (x: number) => Math.round(x * 1000) / 1000
  const share = { type: round3(typeShare), class: round3(classShare) }
  return {
    instrumentId,
    instrumentStandards: info?.instrumentStandards ?? 0,
    covered: info?.covered ?? 0,
    instrumentShare: share,
    decidedBy: share.type >= 0.8 && share.class >= 0.8 ? 'instrument' : share.type === 0 && share.class === 0 ? 'library' : 'mixed',
    deciding,
    correction: info?.correction ?? null,
  }
}
