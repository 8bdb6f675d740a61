import { z } from 'zod'
import { CampaignRef } from './common'
import { endpoint } from './endpoint'

/** A figure with the number of items behind it; `value` is null when it is undefined (no items, or κ with one category). */
export const Figure = z.object({ value: z.number().nullable(), n: z.number().int(), smallSample: z.boolean() }).meta({ id: 'Figure' })
export type Figure = z.infer<typeof Figure>

const agreementFields = {
  /** Items both raters rated. */
  n: z.number().int(),
  exactType: Figure,
  withinOneSubtype: Figure,
  exactClass: Figure,
  withinOneClass: Figure,
  /** Cohen's κ on the luminosity-class codes. */
  kappaClass: Figure,
  /** Weighted κ (Cohen 1968) on the numeric type scale. */
  weightedKappaTypeLinear: Figure,
  weightedKappaTypeQuadratic: Figure,
}
export const AgreementFigures = z.object(agreementFields)
export type AgreementFigures = z.infer<typeof AgreementFigures>

export const RaterRef = z.object({ kind: z.enum(['classifier', 'suggestion']), id: z.number().int().nullable(), name: z.string() })
export type RaterRef = z.infer<typeof RaterRef>

export const PairFigures = z.object({ ...agreementFields, a: RaterRef, b: RaterRef }).meta({ id: 'PairFigures' })
export type PairFigures = z.infer<typeof PairFigures>

export const ClassifierFigures = z.object({
  id: z.number().int(),
  name: z.string(),
  calls: z.number().int(),
  /** Mean signed offset of the classifier's calls from the consensus (positive = later type / fainter class). */
  typeOffset: Figure,
  classOffset: Figure,
  medianSecondsPerCall: Figure,
})
export type ClassifierFigures = z.infer<typeof ClassifierFigures>

export const MatrixCell = z.object({ count: z.number().int(), spectrumIds: z.array(z.number().int()) })
export type MatrixCell = z.infer<typeof MatrixCell>

/** Rows: the first rater's category; columns: the second's. */
export const ConfusionMatrix = z
  .object({ rowsAre: z.string(), columnsAre: z.string(), labels: z.array(z.string()), cells: z.array(z.array(MatrixCell)), n: z.number().int() })
  .meta({ id: 'ConfusionMatrix' })
export type ConfusionMatrix = z.infer<typeof ConfusionMatrix>

/** The four agreement fractions of a group of calls against one reference. */
export const FourFigures = z.object({ exactType: Figure, withinOneSubtype: Figure, exactClass: Figure, withinOneClass: Figure })
export type FourFigures = z.infer<typeof FourFigures>

export const GroupFigures = z.object({
  /** ISO week "2025-W03", or a library-version name. */
  key: z.string(),
  calls: z.number().int(),
  /** Calls against the consensus. */
  vsConsensus: FourFigures,
  /** Calls against the suggestion. */
  vsSuggestion: FourFigures,
})
export type GroupFigures = z.infer<typeof GroupFigures>

export const BlindFigures = z.object({
  /** Calls made with the suggestion on screen. */
  shown: z.object({ calls: z.number().int(), acceptedSuggestion: Figure, agreeWithSuggestion: Figure, exactTypeVsConsensus: Figure }),
  /** Calls made before the suggestion was shown. */
  blind: z.object({ calls: z.number().int(), agreeWithSuggestion: Figure, exactTypeVsConsensus: Figure }),
})
export type BlindFigures = z.infer<typeof BlindFigures>

const auditFields = {
  spectra: z.number().int(),
  calls: z.number().int(),
  classifiers: z.array(ClassifierFigures),
  pairs: z.array(PairFigures),
  vsSuggestion: z.array(PairFigures),
  fleiss: z.object({ type: Figure, class: Figure, ratersPerItem: z.number().nullable() }),
  confusion: z.object({
    callsVsConsensus: z.object({ type: ConfusionMatrix, class: ConfusionMatrix }),
    suggestionVsConsensus: z.object({ type: ConfusionMatrix, class: ConfusionMatrix }),
  }),
  byWeek: z.array(GroupFigures),
  byLibraryVersion: z.array(GroupFigures),
  blind: BlindFigures,
  notes: z.array(z.string()),
}
export const AuditFigures = z.object(auditFields)
export type AuditFigures = z.infer<typeof AuditFigures>

/** How often suggestions hit the decided classification. */
const accuracyFields = {
  /** Decided spectra scored. */
  n: z.number().int(),
  exactType: Figure,
  withinOneSubtype: Figure,
  exactClass: Figure,
  /** Mean share of the type vote that came from the instrument's own standards. */
  ownShare: Figure,
}
export const AccuracyFigures = z.object(accuracyFields)
export type AccuracyFigures = z.infer<typeof AccuracyFigures>

export const VersionAccuracy = z.object({
  ...accuracyFields,
  version: z.object({ id: z.number().int(), name: z.string(), publishedAt: z.string().nullable() }),
  /** Its ±1-subtype and exact-class figures minus the previous version's for this instrument, in points (null for the first, or without figures). */
  change: z.object({ withinOneSubtype: z.number().nullable(), exactClass: z.number().nullable() }),
})
export type VersionAccuracy = z.infer<typeof VersionAccuracy>

/** Suggestion accuracy for the spectra of one instrument (or of none). */
export const InstrumentAccuracy = z.object({
  instrument: z.object({ id: z.number().int().nullable(), name: z.string() }),
  /** Per library version, in the order they were published. */
  versions: z.array(VersionAccuracy),
  /** Per ISO week the suggestions were made, with the versions that made them. */
  byWeek: z.array(z.object({ ...accuracyFields, week: z.string(), versions: z.array(z.string()) })),
})
export type InstrumentAccuracy = z.infer<typeof InstrumentAccuracy>

/** Suggestions scored against the decided classifications, per instrument and per library version. */
export const SuggestionAccuracy = z.object({ instruments: z.array(InstrumentAccuracy), notes: z.array(z.string()) }).meta({ id: 'SuggestionAccuracy' })
export type SuggestionAccuracy = z.infer<typeof SuggestionAccuracy>

export const AuditReport = z
  .object({ ...auditFields, suggestionAccuracy: SuggestionAccuracy, campaign: CampaignRef, from: z.string().nullable(), to: z.string().nullable() })
  .meta({ id: 'AuditReport' })
export type AuditReport = z.infer<typeof AuditReport>

const DATE_ONLY = /^\d{4}-\d\d-\d\d$/

/** A date or a date-time; a bare date means the start of that UTC day. */
const when = z
  .string()
  .trim()
  .max(40)
  .refine((v) => !Number.isNaN(Date.parse(DATE_ONLY.test(v) ? `${v}T00:00:00Z` : v)), { message: 'must be a date, e.g. 2026-03-14' })

/** The audit's query string as sent; `to` is inclusive: a bare date covers that whole day. */
export const AuditQueryFields = z.object({
  campaign: z.coerce.number({ message: 'choose a campaign' }).int().positive({ message: 'choose a campaign' }),
  /** First day (UTC), YYYY-MM-DD or a date-time. */
  from: when.optional(),
  /** Last day (UTC), inclusive. */
  to: when.optional(),
})
export type AuditQueryFields = z.infer<typeof AuditQueryFields>

/** The query read into a campaign id and a half-open range of instants. */
export const AuditQuery = AuditQueryFields.transform((q) => ({
  campaignId: q.campaign,
  from: q.from ? new Date(DATE_ONLY.test(q.from) ? `${q.from}T00:00:00Z` : q.from) : undefined,
  to: q.to ? (DATE_ONLY.test(q.to) ? new Date(Date.parse(`${q.to}T00:00:00Z`) + 86_400_000) : new Date(q.to)) : undefined,
})).refine((q) => !q.from || !q.to || q.from < q.to, { message: 'must be after from', path: ['to'] })
export type AuditQuery = z.infer<typeof AuditQuery>

export const auditApi = {
  report: endpoint({
    method: 'get',
    path: '/audit',
    tag: 'Audit',
    summary: "Agreement figures of one campaign's calls over a date range",
    query: AuditQuery,
    response: z.object({ audit: AuditReport }),
  }),
}
