/** Reads the JSON parts of a suggestion (candidates, votes) for display, without trusting their shape. */

import type { SuggestionFlag } from '@shared/api/suggestions'

export interface Candidate {
  standardId: number
  spectralType: string
  /** Star name of an observed standard. */
  star: string | null
  chi2: number | null
  reducedChi2: number | null
  probability: number | null
}

export interface Vote {
  criterion: string
  name: string
  value: number | null
  /** The luminosity class this criterion prefers; null when it does not apply. */
  vote: string | null
  /** The criterion's value for each class's standards at the suggested type. */
  standards: Record<string, number>
  note: string | null
}

type Raw = Record<string, unknown>
const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null)
const str = (v: unknown): string | null => (typeof v === 'string' ? v : null)
const isObject = (v: unknown): v is Raw => v !== null && typeof v === 'object' && !Array.isArray(v)

export function readCandidates(raw: unknown): Candidate[] {
  if (!Array.isArray(raw)) return []
  return raw.filter(isObject).flatMap((c) => {
    const id = num(c.standardId) ?? num(c.id)
    if (id === null) return []
    return [{ standardId: id, spectralType: str(c.spectralType) ?? `#${id}`, star: str(c.star), chi2: num(c.chi2), reducedChi2: num(c.reducedChi2), probability: num(c.probability) }]
  })
}

export function readVotes(raw: unknown): Vote[] {
  const list = Array.isArray(raw) ? raw : isObject(raw) && Array.isArray(raw.votes) ? raw.votes : []
  return list.filter(isObject).map((v, i) => {
    const standards: Record<string, number> = {}
    if (isObject(v.standards)) for (const [k, x] of Object.entries(v.standards)) if (typeof x === 'number' && Number.isFinite(x)) standards[k] = x
    return {
      criterion: str(v.criterion) ?? str(v.id) ?? `criterion-${i}`,
      name: str(v.name) ?? str(v.criterion) ?? 'Criterion',
      value: num(v.value),
      vote: str(v.vote),
      standards,
      note: str(v.note),
    }
  })
}

/** Plain words for the pipeline's quality flags. */
export const FLAG_LABELS: Record<SuggestionFlag, string> = {
  'low-snr': 'Low S/N',
  emission: 'Emission',
  'poor-fit': 'Poor fit',
  'outside-grid': 'Outside the grid',
  'possible-composite': 'Possible composite',
  'not-mk': 'White dwarf / non-MK',
  'not-star': 'Not a star',
}

export const flagLabel = (flag: string): string => (FLAG_LABELS as Record<string, string>)[flag.replace(/_/g, '-')] ?? flag.replace(/[-_]/g, ' ')

export interface GridProbability {
  typeCode: number
  classCode: number
  p: number
}

/** The suggestion's (type, class) probabilities, for the probability map. */
export function readProbabilities(raw: unknown): GridProbability[] {
  if (!Array.isArray(raw)) return []
  return raw.filter(isObject).flatMap((r) => {
    const typeCode = num(r.typeCode)
    const classCode = num(r.classCode)
    const p = num(r.p) ?? num(r.probability)
    return typeCode === null || classCode === null || p === null || p < 0 ? [] : [{ typeCode, classCode, p }]
  })
}
