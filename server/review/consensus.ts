import { parseMK, type MKValue } from '../../shared/mk'
import { checkCallText, parsedCallOf, type ParsedCall } from '../../shared/mkCall'
import { HttpError } from '../lib/http-error'
import type { Agreement, ClassificationSource } from '../models'

/**
 * The review's pure rules: reading a call, and judging a spectrum's calls against the campaign's
 * tolerance (agreement, the consensus, a majority after extra calls). No database, no mail.
 */

export type { ParsedCall }
export { parsedCallOf }

const EPSILON = 1e-9

// ---------------------------------------------------------------------------------------------
// MK input
// ---------------------------------------------------------------------------------------------

const invalid = (fields: Record<string, string>) => new HttpError(422, 'invalid_input', 'Some fields are not valid.', { fields })

/** Reads a call with the rules the review form applies too (shared/mkCall.ts); refuses it field by field. */
export function parseCallType(spectralType: string, luminosityClass: string, peculiarities = ''): ParsedCall {
  const checked = checkCallText(spectralType, luminosityClass, peculiarities)
  if (!checked.ok) throw invalid(checked.errors)
  return checked.call
}

// ---------------------------------------------------------------------------------------------
// Consensus
// ---------------------------------------------------------------------------------------------

export interface JudgedCall {
  id: number
  spectralType: string
  typeCode: number
  luminosityClass: string
  classCode: number
  acceptedSuggestion: boolean
}

export type Judgement =
  | { outcome: 'agreed'; typeSpread: number; classSpread: number; agreement: Exclude<Agreement, 'settled'>; source: Exclude<ClassificationSource, 'settled'>; consensus: ParsedCall }
  | { outcome: 'disputed'; typeSpread: number; classSpread: number }

/**
 * The median of values given in call order. With an even count the two middle values tie: the one
 * equal to `preferred` (the suggestion's) wins, else the one that was called first.
 */
export function medianOf(values: number[], preferred?: number): number {
  if (values.length === 0) throw new RangeError('no values')
  const sorted = [...values].sort((a, b) => a - b)
  const mid = sorted.length >> 1
  if (sorted.length % 2 === 1) return sorted[mid]!
  const lo = sorted[mid - 1]!
  const hi = sorted[mid]!
  if (Math.abs(lo - hi) < EPSILON) return lo
  if (preferred !== undefined && (Math.abs(preferred - lo) < EPSILON || Math.abs(preferred - hi) < EPSILON)) return preferred
  return values.find((v) => Math.abs(v - lo) < EPSILON || Math.abs(v - hi) < EPSILON)!
}

/**
 * Judges the calls against the campaign's tolerance: they agree when every pair differs by at most
 * `typeTolerance` subtypes and `classTolerance` classes. The consensus takes the median type code and
 * the median class code, written as the earliest call that has that type (with its notes) and the
 * class text of the earliest call that has that class.
 */
export function judgeCalls(calls: JudgedCall[], rules: { typeTolerance: number; classTolerance: number }, suggestion?: { typeCode: number; classCode: number } | null): Judgement {
  if (calls.length === 0) throw new RangeError('no calls to judge')
  const types = calls.map((c) => c.typeCode)
  const classes = calls.map((c) => c.classCode)
  const typeSpread = Math.max(...types) - Math.min(...types)
  const classSpread = Math.max(...classes) - Math.min(...classes)
  if (typeSpread > rules.typeTolerance + EPSILON || classSpread > rules.classTolerance + EPSILON) return { outcome: 'disputed', typeSpread, classSpread }
  const typeCode = medianOf(types, suggestion?.typeCode)
  const classCode = medianOf(classes, suggestion?.classCode)
  const typeCall = calls.find((c) => Math.abs(c.typeCode - typeCode) < EPSILON)!
  const classCall = calls.find((c) => Math.abs(c.classCode - classCode) < EPSILON)!
  const both = calls.find((c) => Math.abs(c.typeCode - typeCode) < EPSILON && Math.abs(c.classCode - classCode) < EPSILON)
  let consensus: ParsedCall
  const parsed = parseMK((both ?? typeCall).spectralType)
  if (!parsed.ok) throw new Error(`stored call ${typeCall.id} no longer parses: ${parsed.reason}`)
  if (both) consensus = parsedCallOf(parsed.value)
  else {
    const classText = parseMK(classCall.spectralType)
    const v: MKValue = { ...parsed.value, luminosityClass: classCall.luminosityClass, classCode: classCall.classCode }
    if (classText.ok) v.uncertain = { ...v.uncertain, class: classText.value.uncertain.class }
    delete v.classRange
    consensus = parsedCallOf(v)
  }
  return {
    outcome: 'agreed',
    typeSpread,
    classSpread,
    agreement: typeSpread < EPSILON && classSpread < EPSILON ? 'exact' : 'within',
    source: calls.every((c) => c.acceptedSuggestion) ? 'accepted-suggestion' : 'consensus',
    // The codes are the medians themselves, whatever precision the text carries.
    consensus: { ...consensus, typeCode, classCode },
  }
}

/**
 * Judges calls after a lead asked for more than the campaign's number: the largest group of calls
 * that agree pairwise within the tolerance decides when it is a majority (more than half); the
 * consensus is that group's, as {@link judgeCalls} forms it. Otherwise the calls are disputed again.
 */
export function judgeByMajority(calls: JudgedCall[], rules: { typeTolerance: number; classTolerance: number }, suggestion?: { typeCode: number; classCode: number } | null): Judgement {
  const n = calls.length
  if (n === 0) throw new RangeError('no calls to judge')
  const fits = (a: JudgedCall, b: JudgedCall) => Math.abs(a.typeCode - b.typeCode) <= rules.typeTolerance + EPSILON && Math.abs(a.classCode - b.classCode) <= rules.classTolerance + EPSILON
  let best: JudgedCall[] = []
  // Few calls per spectrum (a handful at most): every subset is cheap to try.
  for (let mask = 1; mask < 1 << Math.min(n, 12); mask++) {
    const group = calls.filter((_, i) => (mask >> i) & 1)
    if (group.length <= best.length) continue
    if (group.every((a, i) => group.slice(i + 1).every((b) => fits(a, b)))) best = group
  }
  if (best.length * 2 > n) return judgeCalls(best, rules, suggestion)
  const all = judgeCalls(calls, { typeTolerance: -1, classTolerance: -1 })
  return { outcome: 'disputed', typeSpread: all.typeSpread, classSpread: all.classSpread }
}
