/**
 * The quality flags of a suggestion that need more than one number: emission, a fit worse than
 * normal stars get, two stars in one spectrum, Balmer wings no normal star has, and spectra that
 * are not of a star at all; and the Balmer width that marks B–A supergiants.
 */
import type { LineMeasurement } from '../measure/types'
import { smoothPairChiSquare } from './chi2'
import { lowerBound } from '../prepare/stats'
import type { LevelFit } from './classify'
import type { LibraryLevel, MatchStandardInfo, PreparedMatchLibrary } from './library'

/**
 * Whether the Balmer lines show emission: a line of the table measured with a significantly
 * negative equivalent width (beyond −1 Å and 3σ). Before G0 (type code 40) Hα, Hβ and Hγ count,
 * and an emission core inside broad absorption wings (as Be stars show) is enough; from G0 on only
 * Hα counts, and its extreme point must stand above the continuum.
 */
export function hasBalmerEmission(lines: readonly LineMeasurement[] | undefined, typeCode: number): boolean {
  if (!lines) return false
  // From G on, the side bands of Hβ and Hγ sit in metal lines and the G band, so their
  // side-band equivalent widths go negative without any emission (the Lick HγA index of a K giant
  // is about −6 Å, common practice); there only Hα speaks for emission, and only with its peak up.
  const hot = typeCode < 40
  const ids = hot ? ['h-alpha', 'h-beta', 'h-gamma'] : ['h-alpha']
  return lines.some(
    (l) => l.measured && ids.includes(l.id) && l.equivalentWidth < -1 && (hot || l.depth < -0.05) && (l.equivalentWidthError === null || -l.equivalentWidth > 3 * l.equivalentWidthError),
  )
}

/**
 * The residual beyond which a fit counts as poor for a star of `typeCode`: 1.15 × the 95th
 * percentile of the standards' residuals against their nearest neighbour (LibraryLevel
 * neighbourResidual, or `residuals` measured over another region) within ±4 subtypes (±8, then
 * the whole level, where fewer than five standards are that close), and at least 0.005 of the
 * continuum, so that a library of near-identical standards does not call every small difference
 * poor. Null when the level has fewer than five standards.
 */
export function typicalResidual(level: LibraryLevel, standards: readonly MatchStandardInfo[], typeCode: number, residuals: Float64Array = level.neighbourResidual): number | null {
  for (const width of [4, 8, Infinity]) {
    const values: number[] = []
    level.rows.forEach((k, r) => {
      const v = residuals[r]!
      if (Math.abs(standards[k]!.typeCode - typeCode) <= width && Number.isFinite(v)) values.push(v)
    })
    if (values.length >= 5) {
      values.sort((a, b) => a - b)
      return Math.max(0.005, 1.15 * values[Math.min(values.length - 1, Math.floor(0.95 * values.length))]!)
    }
  }
  return null
}

/** Hδ, Hγ, Hβ (air, Å; NIST ASD, shared/lines.ts). */
const BALMER_CENTRES = [4101.74, 4340.47, 4861.33]

/**
 * Mean full width at half depth of Hδ, Hγ and Hβ in a rectified spectrum, Å: from the deepest point
 * within ±4 Å of each centre, outward on both sides to where the flux climbs back above half the
 * depth (at most 200 Å each way). Lines shallower than 0.1 are left out; NaN when none is deep enough.
 * Pressure broadening makes these lines widest in A-type dwarfs, and far wider still in white dwarfs.
 */
export function balmerHalfDepthWidth(flux: ArrayLike<number>, wavelength: ArrayLike<number>): number {
  const widths: number[] = []
  for (const c of BALMER_CENTRES) {
    const i0 = lowerBound(wavelength, c - 4)
    const i1 = lowerBound(wavelength, c + 4)
    if (i0 <= 0 || i1 >= wavelength.length) continue
    let core = -1
    for (let i = i0; i < i1; i++) if (Number.isFinite(flux[i]!) && (core < 0 || flux[i]! < flux[core]!)) core = i
    if (core < 0) continue
    const depth = 1 - flux[core]!
    if (!(depth > 0.1)) continue
    const half = 1 - depth / 2
    const edge = (dir: 1 | -1): number | null => {
      for (let i = core; i >= 0 && i < wavelength.length && Math.abs(wavelength[i]! - c) <= 200; i += dir) {
        const f = flux[i]!
        if (!Number.isFinite(f)) return null
        if (f >= half) return wavelength[i]!
      }
      return null
    }
    const lo = edge(-1)
    const hi = edge(1)
    if (lo !== null && hi !== null) widths.push(hi - lo)
  }
  return widths.length > 0 ? widths.reduce((a, b) => a + b, 0) / widths.length : Number.NaN
}

/**
 * True when the Balmer lines are wider at half depth than those of every O–A dwarf or subgiant standard at this level
 * (A dwarfs have the widest) by more than 30 %. Cooler standards are left out: among their
 * crowded metal lines the flux never climbs back to half the Balmer depth.
 */
export function isBeyondDwarfs(level: LibraryLevel, standards: readonly MatchStandardInfo[], width: number): boolean {
  let max = -Infinity
  level.rows.forEach((k, r) => {
    const v = level.balmerWidth[r]!
    if (standards[k]!.typeCode < 30 && standards[k]!.classCode >= 5 && Number.isFinite(v) && v > max) max = v
  })
  return Number.isFinite(max) && width > 1.3 * max
}

/** Type codes where the Balmer line width carries luminosity (B0 up to F0). */
export const SUPERGIANT_WIDTH_TYPES: readonly [number, number] = [10, 30]

/**
 * A Balmer half-depth width over the narrowest of the class II–V standards within ±3 subtypes of
 * `typeCode` (leaving out row `self`, every row of its star, and `exclude`); below 1 the lines are
 * narrower than any giant's or dwarf's of that type. NaN with fewer than three such standards.
 */
export function balmerWidthRatio(level: LibraryLevel, standards: readonly MatchStandardInfo[], typeCode: number, width: number, exclude?: ReadonlySet<number>, self = -1): number {
  const star = self >= 0 ? standards[level.rows[self]!]!.star : null
  let narrowest = Infinity
  let count = 0
  level.rows.forEach((k, r) => {
    const st = standards[k]!
    const v = level.balmerWidth[r]!
    if (r === self || (star !== null && st.star === star) || exclude?.has(st.id) || st.classCode < 3 || Math.abs(st.typeCode - typeCode) > 3 || !Number.isFinite(v)) return
    count++
    narrowest = Math.min(narrowest, v)
  })
  return count >= 3 && Number.isFinite(width) ? width / narrowest : Number.NaN
}

const thresholdByLevel = new WeakMap<LibraryLevel, number | null>()

/**
 * The width ratio (balmerWidthRatio) below which a B–A spectrum is a supergiant's, learnt from the
 * level itself: midway between the largest ratio of a supergiant standard (Ib or brighter) and the
 * smallest of any class II–V standard, each measured at its own type against the rest. Null when
 * the two overlap or either is missing. Standards in `exclude` take no part.
 */
export function supergiantWidthThreshold(level: LibraryLevel, standards: readonly MatchStandardInfo[], exclude?: ReadonlySet<number>): number | null {
  const cached = exclude && exclude.size > 0 ? undefined : thresholdByLevel.get(level)
  if (cached !== undefined) return cached
  let supergiants = -Infinity
  let others = Infinity
  level.rows.forEach((k, r) => {
    const st = standards[k]!
    if (exclude?.has(st.id) || st.typeCode < SUPERGIANT_WIDTH_TYPES[0] || st.typeCode >= SUPERGIANT_WIDTH_TYPES[1] || (st.classCode > 2 && st.classCode < 3)) return
    const ratio = balmerWidthRatio(level, standards, st.typeCode, level.balmerWidth[r]!, exclude, r)
    if (!Number.isFinite(ratio)) return
    if (st.classCode <= 2) supergiants = Math.max(supergiants, ratio)
    else others = Math.min(others, ratio)
  })
  const threshold = Number.isFinite(supergiants) && Number.isFinite(others) && supergiants < others ? (supergiants + others) / 2 : null
  if (!exclude || exclude.size === 0) thresholdByLevel.set(level, threshold)
  return threshold
}

/** What the Balmer width says of a B–A spectrum's luminosity (supergiantByWidth). */
export interface WidthEvidence {
  /** balmerWidthRatio of the spectrum, and the level's supergiantWidthThreshold. */
  ratio: number
  threshold: number | null
  /** When the ratio is below the threshold: the class of the supergiant standard within ±5 subtypes whose width is nearest (Iab when there is none), and that standard. */
  supergiant: { classCode: number; standard: MatchStandardInfo | null } | null
}

/**
 * Luminosity from the width of the Balmer lines at half depth, for types in SUPERGIANT_WIDTH_TYPES:
 * the lines of B–A supergiants are far narrower than those of giants and dwarfs, whose
 * pressure-broadened wings widen them (common practice in MK classification). Null outside those
 * types or when the width cannot be compared.
 */
export function supergiantByWidth(level: LibraryLevel, standards: readonly MatchStandardInfo[], typeCode: number, width: number, exclude?: ReadonlySet<number>): WidthEvidence | null {
  if (typeCode < SUPERGIANT_WIDTH_TYPES[0] || typeCode >= SUPERGIANT_WIDTH_TYPES[1]) return null
  const ratio = balmerWidthRatio(level, standards, typeCode, width, exclude)
  if (!Number.isFinite(ratio)) return null
  const threshold = supergiantWidthThreshold(level, standards, exclude)
  if (threshold === null || ratio >= threshold) return { ratio, threshold, supergiant: null }
  let nearest: MatchStandardInfo | null = null
  let distance = Infinity
  level.rows.forEach((k, r) => {
    const st = standards[k]!
    const v = level.balmerWidth[r]!
    if (exclude?.has(st.id) || st.classCode > 2 || Math.abs(st.typeCode - typeCode) > 5 || !Number.isFinite(v)) return
    if (Math.abs(v - width) < distance) {
      distance = Math.abs(v - width)
      nearest = st
    }
  })
  const found = nearest as MatchStandardInfo | null
  return { ratio, threshold, supergiant: { classCode: found?.classCode ?? 1.5, standard: found } }
}

/** Type bins from which one standard each enters the two-star fits. */
const COMPOSITE_BINS: readonly [number, number][] = [
  [0, 15],
  [15, 25],
  [25, 35],
  [35, 45],
  [45, 55],
  [55, 70],
]

export interface CompositeEvidence {
  /** Rows (level indices) of the two standards. */
  rows: [number, number]
  /** Fraction of the second in the mix. */
  fraction: number
  /** χ² of the best mix of two clearly different types over χ² of the best mix of the best standard with a neighbour in type. */
  ratio: number
}

/**
 * Evidence that the spectrum is the sum of two stars of clearly different type. The best standard
 * of each type bin is mixed with the best of every bin at least 12 subtypes away
 * (smoothPairChiSquare: a mix whose fraction and depth vary smoothly across the region, as the
 * flux ratio of two stars does). Any star is fitted a little better by a mix than by one standard
 * (the mix has more freedom), so the test compares like with like: the best such mix against the
 * best mix of the nearest standard with one of its neighbours within 6 subtypes. Returned when the
 * distant mix lowers that χ² by more than 20 % with each star giving at least 7 % of the light;
 * null otherwise. The mixes are fitted on the coarse pixels (every `coarseStep`-th): a two-star
 * sum changes whole bands and line groups, not single pixels.
 * @param flux, weights the spectrum and its weights on the coarse pixels; from, to their range
 */
export function compositeEvidence(
  library: PreparedMatchLibrary,
  level: LibraryLevel,
  flux: Float64Array,
  weights: Float64Array,
  fit: LevelFit,
  from: number,
  to: number,
  best: number,
): CompositeEvidence | null {
  const rows = level.coarse
  const pixels = library.coarsePixels
  const typeOf = (r: number) => library.standards[level.rows[r]!]!.typeCode
  const finite = Array.from(fit.chi2.keys()).filter((r) => Number.isFinite(fit.chi2[r]!))
  const bestOf = COMPOSITE_BINS.map(([lo, hi]) => {
    let k = -1
    for (const r of finite) if (typeOf(r) >= lo && typeOf(r) < hi && (k < 0 || fit.chi2[r]! < fit.chi2[k]!)) k = r
    return k
  }).filter((k) => k >= 0)
  const nearby = finite
    .filter((r) => r !== best && Math.abs(typeOf(r) - typeOf(best)) <= 6)
    .sort((a, b) => fit.chi2[a]! - fit.chi2[b]!)
    .slice(0, 6)
  let near = smoothPairChiSquare(flux, weights, rows, pixels, best, best, from, to, 1).chi2
  for (const r of nearby) near = Math.min(near, smoothPairChiSquare(flux, weights, rows, pixels, best, r, from, to).chi2)
  if (!(near > 0) || !Number.isFinite(near)) return null
  let found: CompositeEvidence | null = null
  for (let a = 0; a < bestOf.length; a++) {
    for (let b = a + 1; b < bestOf.length; b++) {
      const r1 = bestOf[a]!
      const r2 = bestOf[b]!
      if (Math.abs(typeOf(r1) - typeOf(r2)) < 12) continue
      const mix = smoothPairChiSquare(flux, weights, rows, pixels, r1, r2, from, to)
      const ratio = mix.chi2 / near
      if (mix.fraction >= 0.07 && mix.fraction <= 0.93 && ratio < 0.8 && (found === null || ratio < found.ratio)) {
        found = { rows: [r1, r2], fraction: mix.fraction, ratio }
      }
    }
  }
  return found
}

/** Rest wavelengths (air, Å) where stars show emission of their own: Balmer lines, Ca II H and K, He I (NIST ASD values, shared/lines.ts). */
const STELLAR_EMISSION = [6562.8, 4861.33, 4340.47, 4101.74, 3970.07, 3889.05, 3933.66, 3968.47, 5875.6, 6678.2, 4471.48]

export interface NotStarEvidence {
  /** Emission features away from the stellar lines, Å (observed wavelength), with their width (FWHM, Å) and height. */
  emission: { wavelength: number; fwhm: number; height: number }[]
  /** Why the spectrum does not look like a star. */
  reason: string
}

/**
 * Evidence that a spectrum is not of a star (a galaxy or a quasar): emission features that are
 * broad (FWHM > 40 Å, as the lines of quasars) or that sit away from every line where stars show
 * emission. A feature is a run of pixels, at least as wide as 0.8 × the resolution, where both the
 * rectified spectrum stands above the continuum and the spectrum stands above the best standard's
 * fit by more than max(0.2, 8σ): above the continuum alone would take the gaps between the
 * crowded lines of cool stars for emission, above the fit alone a line weaker than the standard's.
 * Null when there is none.
 * @param wavelength wavelengths, Å; @param rectified flux / continuum, high-passed (NaN where not used)
 * @param residual 1 + spectrum − best fit, high-passed, on the same pixels
 * @param sigma noise per pixel in continuum units: one value, or one per pixel where it varies along the spectrum
 * @param resolution FWHM Å (features narrower are noise)
 * @param typeCode the type the spectrum matched
 */
export function notStarEvidence(
  wavelength: Float64Array,
  rectified: ArrayLike<number>,
  residual: ArrayLike<number>,
  sigma: number | ArrayLike<number>,
  resolution: number,
  typeCode: number,
): NotStarEvidence | null {
  const floor = emissionFloor(typeCode)
  const threshold = (i: number) => Math.max(floor, 8 * (typeof sigma === 'number' ? sigma : sigma[i]!))
  const above = (i: number) => {
    const t = threshold(i)
    return rectified[i]! - 1 > t && residual[i]! - 1 > t
  }
  const features: NotStarEvidence['emission'] = []
  let i = 0
  const n = wavelength.length
  while (i < n) {
    if (!above(i)) {
      i++
      continue
    }
    let j = i
    let peak = i
    while (j < n && above(j)) {
      if (rectified[j]! > rectified[peak]!) peak = j
      j++
    }
    // Width at half the peak height above the continuum.
    const half = 1 + (rectified[peak]! - 1) / 2
    let lo = peak
    while (lo > 0 && rectified[lo - 1]! > half) lo--
    let hi = peak
    while (hi < n - 1 && rectified[hi + 1]! > half) hi++
    const fwhm = wavelength[hi]! - wavelength[lo]!
    // A run cut by the end of the searched range (NaN beyond) is the edge of a fit, not a line.
    const cut = !Number.isFinite(residual[i - 1] ?? Number.NaN) || !Number.isFinite(residual[j] ?? Number.NaN)
    if (!cut && fwhm >= Math.max(1, 0.8 * resolution)) features.push({ wavelength: round1(wavelength[peak]!), fwhm: round1(fwhm), height: Math.round((rectified[peak]! - 1) * 1000) / 1000 })
    i = j
  }
  const broad = features.filter((f) => f.fwhm > 40)
  if (broad.length > 0) return { emission: features, reason: `broad emission (${broad.map((f) => `${f.wavelength} Å, ${f.fwhm} Å wide`).join('; ')}), as quasars show` }
  const foreign = features.filter((f) => STELLAR_EMISSION.every((c) => Math.abs(f.wavelength - c) > Math.max(8, 2 * resolution)))
  if (foreign.length >= 3 || foreign.some((f) => f.height > 0.3)) {
    return { emission: features, reason: `emission away from every stellar line (${foreign.map((f) => `${f.wavelength} Å`).join(', ')}), as galaxies and quasars show at their redshift` }
  }
  return null
}

/** The least height above the continuum of an emission feature of a spectrum of this type (continuum units). */
function emissionFloor(typeCode: number): number {
  // The heads of the TiO bands of M stars rise steeply out of the band before them: only strong features count there.
  return typeCode >= 58 ? 0.5 : 0.2
}

/**
 * Whether any pixel of `rectified` stands above the continuum by the least height a feature of
 * notStarEvidence needs. When none does, it finds nothing whatever the residual and the noise, so
 * a caller need not compute them (most stars).
 */
export function mayShowEmission(rectified: ArrayLike<number>, typeCode: number): boolean {
  const floor = emissionFloor(typeCode)
  for (let i = 0; i < rectified.length; i++) if (rectified[i]! - 1 > floor) return true
  return false
}

const round1 = (x: number) => Math.round(x * 10) / 10
