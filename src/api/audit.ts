import { auditApi, type AuditQueryFields, type AuditReport } from '@shared/api/audit'
import { campaignsApi } from '@shared/api/campaigns'
import { call } from './http'

export type {
  AccuracyFigures,
  AgreementFigures,
  AuditReport,
  InstrumentAccuracy,
  SuggestionAccuracy,
  VersionAccuracy,
  BlindFigures,
  ClassifierFigures,
  ConfusionMatrix,
  Figure,
  FourFigures,
  GroupFigures,
  MatrixCell,
  PairFigures,
  RaterRef,
} from '@shared/api/audit'

/** Campaign, first and last day (YYYY-MM-DD, UTC, inclusive). */
export type AuditQuery = AuditQueryFields

export interface CampaignChoice {
  id: number
  code: string
  name: string
  /** Calls recorded in the campaign (the audit opens on the one with most). */
  calls?: number
}

/** Below this many spectra the server marks a figure as a small sample. */
export const SMALL_SAMPLE = 10

export async function listCampaignChoices(): Promise<CampaignChoice[]> {
  const body = await call(campaignsApi.list)
  return body.campaigns.map((c) => ({ id: c.id, code: c.code, name: c.name, calls: c.progress?.calls ?? 0 }))
}

export async function getAudit(query: AuditQuery): Promise<AuditReport> {
  return (await call(auditApi.report, { query })).audit
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
