// The class vote's helpers and the evidence shown beside it: class counts of a level, why the class
// differs from the nearest standard's, the parameters read off the voters, and the luminosity criteria.
import { formatTypeCode } from '../../../shared/mk'
import { roundTo as round } from '../../../shared/rounding'
import { CRITERIA, criterionNoise, criterionValue, type Criterion } from './criteria'
import type { LibraryLevel, PreparedMatchLibrary } from './library'
import { classText, type Estimate, type ParameterEstimate, type Vote } from './types'

const classCountCache = new WeakMap<LibraryLevel, Map<number, number>>()

/** How many standards of each class code a level has (computed once per level). */
export function classCounts(library: PreparedMatchLibrary, level: LibraryLevel): Map<number, number> {
  let counts = classCountCache.get(level)
  if (!counts) {
    counts = new Map()
    for (const k of level.rows) {
      const c = library.standards[k]!.classCode
      counts.set(c, (counts.get(c) ?? 0) + 1)
    }
    classCountCache.set(level, counts)
  }
  return counts
}

/** Every class code of a level. */
export function levelClassCodes(library: PreparedMatchLibrary, level: LibraryLevel): number[] {
  return [...new Set(Array.from(level.rows, (k) => library.standards[k]!.classCode))]
}

/** Says why the suggested class is not the best standard's, or null when it contains it. */
export function describeClassChoice(classCode: number, bestClass: number, bestType: string, shares: { luminosityClass: string; p: number }[], voters: number): string | null {
  if (Math.abs(bestClass - classCode) <= 0.5) return null
  const listed = shares
    .filter((s) => s.p >= 0.05)
    .map((s) => `${s.luminosityClass} ${Math.round(100 * s.p)} %`)
    .join(', ')
  return `The class comes from the vote of the ${voters} nearest standards (${listed}), each weighted by its fit and by how many standards its class has; the single nearest standard, ${bestType}, is outvoted.`
}

/** Vote-weighted mean and spread of the voters' published parameters (Teff averaged in log). */
export function parameterEstimate(voters: readonly { teff: number | null; logg: number | null; feh: number | null }[], w: ArrayLike<number>): ParameterEstimate {
  const one = (get: (v: (typeof voters)[number]) => number | null, log: boolean): { e: Estimate; n: number } | null => {
    let sw = 0
    let sx = 0
    let n = 0
    voters.forEach((v, q) => {
      const x = get(v)
      if (x === null || !Number.isFinite(x) || (log && x <= 0)) return
      sw += w[q]!
      sx += w[q]! * (log ? Math.log10(x) : x)
      n++
    })
    if (n === 0 || sw <= 0) return null
    const mean = sx / sw
    let sv = 0
    voters.forEach((v, q) => {
      const x = get(v)
      if (x === null || !Number.isFinite(x) || (log && x <= 0)) return
      sv += w[q]! * ((log ? Math.log10(x) : x) - mean) ** 2
    })
    const sd = Math.sqrt(sv / sw)
    if (log) return { e: { value: Math.round(10 ** mean), error: Math.round(10 ** mean * Math.LN10 * Math.max(sd, 0.005)) }, n }
    return { e: { value: round(mean, 2), error: round(Math.max(sd, 0.05), 2) }, n }
  }
  const teff = one((v) => v.teff, true)
  const logg = one((v) => v.logg, false)
  const feh = one((v) => v.feh, false)
  return { teff: teff?.e ?? null, logg: logg?.e ?? null, feh: feh?.e ?? null, standards: Math.max(teff?.n ?? 0, logg?.n ?? 0, feh?.n ?? 0) }
}

/** The luminosity criteria of criteria.ts measured on the spectrum and read off each class's standards at the type, as evidence shown beside the vote. */
export function criteriaVotes(
  library: PreparedMatchLibrary,
  level: LibraryLevel,
  spectrumSpan: Float64Array,
  typeCode: number,
  snr: number | null,
  centre: number,
  exclude?: ReadonlySet<number>,
): Vote[] {
  const sigmaPix = snr !== null && snr > 0 ? 1 / snr : 0.02
  const pixelsPerAngstrom = 1 / (centre * library.grid.step)
  const classCodes = levelClassCodes(library, level)
    .filter((c) => Number.isInteger(c) || c === 1.5)
    .sort((a, b) => a - b)
  const one = (c: Criterion, ci: number): Vote => {
    const value = criterionValue(c, spectrumSpan, library.wavelength)
    const vote: Vote = { criterion: c.id, name: c.name, value: Number.isFinite(value) ? round(value, 4) : null, vote: null }
    if (typeCode < c.types[0] || typeCode > c.types[1]) {
      vote.note = `not used for this type (applies to ${formatTypeCode(c.types[0])}–${formatTypeCode(Math.min(69, c.types[1]))})`
      return vote
    }
    if (!Number.isFinite(value)) {
      vote.note = 'not measurable on this spectrum'
      return vote
    }
    const standards: Record<string, number> = {}
    let bestClass = -1
    let bestD = Infinity
    const sigma = Math.hypot(criterionNoise(c, value, sigmaPix, pixelsPerAngstrom), c.scatter, 1e-3)
    for (const cc of classCodes) {
      const v = criterionAtType(library, level, ci, cc, typeCode, exclude)
      if (v === null) continue
      standards[classText(cc)] = round(v, 4)
      const d = Math.abs(value - v) / sigma
      if (d < bestD) {
        bestD = d
        bestClass = cc
      }
    }
    if (Object.keys(standards).length < 2) {
      vote.note = 'fewer than two classes of standards at this type'
      return vote
    }
    vote.standards = standards
    vote.vote = classText(bestClass)
    return vote
  }
  // Pushed onto an empty array rather than made by map: map's array has one elements kind when map
  // runs optimised and another when not, and a caller optimised for one was thrown away at the other.
  const out: Vote[] = []
  for (let ci = 0; ci < CRITERIA.length; ci++) out.push(one(CRITERIA[ci]!, ci))
  return out
}

/**
 * A criterion's typical value for one class at a type code: the median over that class's
 * standards within ±2 subtypes (±4 where there are fewer than two); null when none.
 */
function criterionAtType(library: PreparedMatchLibrary, level: LibraryLevel, ci: number, classCode: number, typeCode: number, exclude?: ReadonlySet<number>): number | null {
  if (exclude && exclude.size > 0) return criterionAtTypeUncached(library, level, ci, classCode, typeCode, exclude)
  let memo = criterionMemo.get(level)
  if (!memo) criterionMemo.set(level, (memo = new Map()))
  const key = `${ci}|${classCode}|${typeCode}`
  if (memo.has(key)) return memo.get(key)!
  const value = criterionAtTypeUncached(library, level, ci, classCode, typeCode)
  memo.set(key, value)
  return value
}

const criterionMemo = new WeakMap<LibraryLevel, Map<string, number | null>>()

function criterionAtTypeUncached(library: PreparedMatchLibrary, level: LibraryLevel, ci: number, classCode: number, typeCode: number, exclude?: ReadonlySet<number>): number | null {
  const n = level.rows.length
  for (const width of [2, 4]) {
    const values: number[] = []
    level.rows.forEach((k, r) => {
      const st = library.standards[k]!
      if (st.classCode !== classCode || Math.abs(st.typeCode - typeCode) > width || exclude?.has(st.id)) return
      const v = level.criteria[ci * n + r]!
      if (Number.isFinite(v)) values.push(v)
    })
    if (values.length >= 2 || (width === 4 && values.length > 0)) {
      values.sort((a, b) => a - b)
      const m = values.length >> 1
      return values.length % 2 ? values[m]! : (values[m - 1]! + values[m]!) / 2
    }
  }
  return null
}
