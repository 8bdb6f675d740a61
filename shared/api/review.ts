import { z } from 'zod'
import { SPECTRUM_STATUSES } from '../status'
import { MeasurementSummary } from './measurements'
import { SuggestionDetails } from './suggestions'
import { PersonRef, idParams, mkFields, multiLine } from './common'
import { endpoint } from './endpoint'

export { PersonRef }

export const CallKind = z.enum(['call', 'correction'])
export type CallKind = z.infer<typeof CallKind>
export const ClassificationSource = z.enum(['consensus', 'settled', 'accepted-suggestion'])
export type ClassificationSource = z.infer<typeof ClassificationSource>
export const Agreement = z.enum(['exact', 'within', 'settled'])
export type Agreement = z.infer<typeof Agreement>

/** The pipeline's suggestion as the review screens show it; candidates and votes are stored JSON, read leniently. */
export const SuggestionView = z
  .object({
    id: z.number().int(),
    ...mkFields,
    uncertaintySubtypes: z.number(),
    uncertaintyClasses: z.number(),
    libraryVersionId: z.number().int(),
    pipelineVersion: z.string(),
    bestStandardId: z.number().int().nullable(),
    candidates: z.array(z.unknown()),
    votes: z.unknown(),
    flags: z.array(z.string()),
    /** Probability of each (type, class) grid point, for the probability map (display only; stored JSON, read leniently). */
    probabilities: z.array(z.unknown()).optional(),
    /** How the suggestion was reached and the parameters it implies; null before pipeline 2. */
    details: SuggestionDetails.nullable().optional(),
    createdAt: z.string(),
  })
  .meta({ id: 'SuggestionView' })
export type SuggestionView = z.infer<typeof SuggestionView>

export const CallView = z
  .object({
    id: z.number().int(),
    kind: CallKind,
    correctsCallId: z.number().int().nullable(),
    by: PersonRef,
    ...mkFields,
    peculiarities: z.array(z.string()),
    notes: z.string(),
    confidence: z.number().int(),
    uncertain: z.boolean(),
    acceptedSuggestion: z.boolean(),
    suggestionId: z.number().int().nullable(),
    suggestionShown: z.boolean(),
    secondsSpent: z.number().nullable(),
    createdAt: z.string(),
  })
  .meta({ id: 'CallView' })
export type CallView = z.infer<typeof CallView>

/** The decision on a spectrum: agreed, settled or an accepted suggestion. */
export const FinalClassification = z
  .object({
    id: z.number().int(),
    spectrumId: z.number().int(),
    source: ClassificationSource,
    ...mkFields,
    peculiarities: z.array(z.string()),
    decidedBy: PersonRef.nullable(),
    decidedAt: z.string(),
    nCalls: z.number().int(),
    callIds: z.array(z.number().int()),
    agreement: Agreement,
    typeSpread: z.number().nullable(),
    classSpread: z.number().nullable(),
    suggestionId: z.number().int().nullable(),
    disputeId: z.number().int().nullable(),
    note: z.string(),
  })
  .meta({ id: 'FinalClassification' })
export type FinalClassification = z.infer<typeof FinalClassification>

export const ClaimView = z.object({ spectrumId: z.number().int(), mine: z.boolean(), by: PersonRef, claimedAt: z.string(), expiresAt: z.string(), live: z.boolean() }).meta({ id: 'ClaimView' })
export type ClaimView = z.infer<typeof ClaimView>

/** The campaign settings a classifier works under. */
export const ReviewCampaign = z.object({
  id: z.number().int(),
  code: z.string(),
  name: z.string(),
  callsRequired: z.number().int(),
  blindReview: z.boolean(),
  typeTolerance: z.number(),
  classTolerance: z.number(),
  regionMin: z.number(),
  regionMax: z.number(),
})
export type ReviewCampaign = z.infer<typeof ReviewCampaign>

/** Everything the review screen needs, with blind review applied for the caller. */
export const ReviewView = z
  .object({
    spectrum: z.object({
      id: z.number().int(),
      objectName: z.string(),
      status: z.enum(SPECTRUM_STATUSES),
      statusReason: z.string().nullable(),
      submittedBy: PersonRef,
      createdAt: z.string(),
      obsDate: z.string().nullable(),
      instrument: z.string(),
      snr: z.number().nullable(),
      wavelengthRange: z.tuple([z.number(), z.number()]),
      dispersion: z.number(),
      resolvingPower: z.number().nullable(),
      vMag: z.number().nullable(),
      notes: z.string(),
    }),
    campaign: ReviewCampaign,
    measurement: MeasurementSummary.nullable(),
    /** Null when there is none, or while blind review hides it (`hidden`). */
    suggestion: SuggestionView.nullable(),
    hidden: z.boolean(),
    /** The claim on the spectrum, if any; another person's lapsed claim is left out. */
    claim: ClaimView.nullable(),
    /** With `othersHidden`, only the caller's own rows. */
    calls: z.array(CallView),
    othersHidden: z.boolean(),
    callsSoFar: z.number().int(),
    callsRequired: z.number().int(),
    myCall: CallView.nullable(),
    canCall: z.object({ allowed: z.boolean(), reason: z.string().nullable(), code: z.string().nullable() }),
    canCorrect: z.boolean(),
    dispute: z.object({ id: z.number().int(), openedAt: z.string(), settled: z.boolean() }).nullable(),
    classification: FinalClassification.nullable(),
  })
  .meta({ id: 'ReviewView' })
export type ReviewView = z.infer<typeof ReviewView>

/** An MK text field: type "B8", class "III" … (read with shared/mkCall.ts on both sides). */
const mkText = (max: number) => z.string().trim().min(1, 'is required').max(max)

export const RecordCallInput = z
  .object({
    /** Letter and subtype only, e.g. "B8" (a range of adjacent types, "B8-9", counts as its middle); left out when accepting the suggestion. */
    spectralType: mkText(40).optional(),
    luminosityClass: mkText(12).optional(),
    /** MK peculiarity notes written after the class, e.g. "n", "e", "Si Sr". */
    peculiarities: z.string().trim().max(60).optional(),
    notes: multiLine(4000).default(''),
    confidence: z.number().int('must be 1, 2 or 3').min(1, 'must be 1, 2 or 3').max(3, 'must be 1, 2 or 3'),
    uncertain: z.boolean().default(false),
    acceptedSuggestion: z.boolean().default(false),
    /** Time on the item; from the caller's claim when not given. */
    secondsSpent: z.number().int().min(0).max(86_400).optional(),
    /** Set to record a correction of the caller's standing call (only while the spectrum waits for calls). */
    correctsCallId: z.number().int().positive().optional(),
  })
  .strict()
  .refine((v) => v.acceptedSuggestion || (v.spectralType !== undefined && v.luminosityClass !== undefined), {
    message: 'give a spectral type and a luminosity class, or accept the suggestion',
    path: ['spectralType'],
  })
/** What a caller sends (the service also takes it from the demo seed and tests, with the defaults left out). */
export type RecordCallInput = z.input<typeof RecordCallInput>

export const RecordCallResult = z
  .object({
    call: CallView,
    spectrum: z.object({ id: z.number().int(), status: z.enum(SPECTRUM_STATUSES) }),
    outcome: z.enum(['waiting', 'agreed', 'disputed']),
    callsSoFar: z.number().int(),
    callsRequired: z.number().int(),
    classification: FinalClassification.nullable(),
    dispute: z.object({ id: z.number().int() }).nullable(),
  })
  .meta({ id: 'RecordCallResult' })
export type RecordCallResult = z.infer<typeof RecordCallResult>

export const reviewApi = {
  view: endpoint({
    method: 'get',
    path: '/spectra/:id/review',
    tag: 'Review',
    summary: 'Everything the review screen needs, with blind review applied for the caller',
    params: idParams,
    response: ReviewView,
  }),
  recordCall: endpoint({
    method: 'post',
    path: '/spectra/:id/calls',
    tag: 'Review',
    summary: 'Record a call (or a correction of one’s own standing call); calls are never changed or removed',
    params: idParams,
    body: RecordCallInput,
    status: 201,
    response: RecordCallResult,
  }),
}
