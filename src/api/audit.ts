import { http } from './http'

// Mirrors GET /api/audit (server/services/audit.service.ts).

/** A figure with the number of items behind it; value is null when undefined (no items, or κ with one category). */
export interface Figure {
  value: number | null
  n: number
  smallSample: boolean
}

export interface AgreementFigures {
  /** Spectra both raters called. */
  n: number
  exactType: Figure
  withinOneSubtype: Figure
  exactClass: Figure
  withinOneClass: Figure
  /** Cohen's κ over luminosity classes. */
  kappaClass: Figure
  /** Weighted κ (Cohen 1968) over the spectral-type scale. */
  weightedKappaTypeLinear: Figure
  weightedKappaTypeQuadratic: Figure
}

export interface RaterRef {
  kind: 'classifier' | 'suggestion'
  id: number | null
  name: string
}

export interface PairFigures extends AgreementFigures {
  a: RaterRef
  b: RaterRef
}

export interface ClassifierFigures {
  id: number
  name: string
  calls: number
  /** Mean signed offset from the consensus (positive = later type / fainter class). */
  typeOffset: Figure
  classOffset: Figure
  medianSecondsPerCall: Figure
}

export interface MatrixCell {
  count: number
  spectrumIds: number[]
}

/** Rows: the first rater's category; columns: the second's. */
export interface ConfusionMatrix {
  rowsAre: string
  columnsAre: string
  labels: string[]
  cells: MatrixCell[][]
  n: number
}

export interface FourFigures {
  exactType: Figure
  withinOneSubtype: Figure
  exactClass: Figure
  withinOneClass: Figure
}

export interface GroupFigures {
  /** ISO week "2026-W03", or a library-version name. */
  key: string
  calls: number
  vsConsensus: FourFigures
  vsSuggestion: FourFigures
}

export interface BlindFigures {
  /** Calls made with the suggestion on screen. */
  shown: { calls: number; acceptedSuggestion: Figure; agreeWithSuggestion: Figure; exactTypeVsConsensus: Figure }
  /** Calls made before the suggestion was shown. */
  blind: { calls: number; agreeWithSuggestion: Figure; exactTypeVsConsensus: Figure }
}

export interface AuditReport {
  campaign: { id: number; code: string; name: string }
  from: string | null
  to: string | null
  spectra: number
  calls: number
  classifiers: ClassifierFigures[]
  pairs: PairFigures[]
  vsSuggestion: PairFigures[]
  fleiss: { type: Figure; class: Figure; ratersPerItem: number | null }
  confusion: {
    callsVsConsensus: { type: ConfusionMatrix; class: ConfusionMatrix }
    suggestionVsConsensus: { type: ConfusionMatrix; class: ConfusionMatrix }
  }
  byWeek: GroupFigures[]
  byLibraryVersion: GroupFigures[]
  blind: BlindFigures
  notes: string[]
}

export interface AuditQuery {
  campaign: number
  /** First day, YYYY-MM-DD (UTC). */
  from?: string
  /** Last day, YYYY-MM-DD (UTC), inclusive. */
  to?: string
}

export interface CampaignChoice {
  id: number
  code: string
  name: string
}

/** Below this many spectra the server marks a figure as a small sample. */
export const SMALL_SAMPLE = 10

export async function listCampaignChoices(): Promise<CampaignChoice[]> {
  const body = await http.get<{ campaigns: CampaignChoice[] }>('/campaigns')
  return body.campaigns.map((c) => ({ id: c.id, code: c.code, name: c.name }))
}

export async function getAudit(query: AuditQuery): Promise<AuditReport> {
  return (await http.get<{ audit: AuditReport }>('/audit', { query: { campaign: query.campaign, from: query.from, to: query.to } })).audit
}

/** Monday 00:00 UTC of an ISO week "2026-W03", in Unix seconds (null when the key is not a week). */
export function isoWeekStart(key: string): number | null {
  const m = /^(\d{4})-W(\d{2})$/.exec(key)
  if (!m) return null
  const year = Number(m[1])
  const week = Number(m[2])
  // Week 1 holds 4 January; step back to its Monday.
  const jan4 = Date.UTC(year, 0, 4)
  const dow = new Date(jan4).getUTCDay() || 7
  return (jan4 - (dow - 1) * 86_400_000 + (week - 1) * 7 * 86_400_000) / 1000
}
