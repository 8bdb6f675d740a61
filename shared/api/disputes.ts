import { z } from 'zod'
import { SPECTRUM_STATUSES } from '../status'
import { CampaignRef, PersonRef, emptyToUndefined, id, idParams, multiLine } from './common'
import { endpoint } from './endpoint'
import { CallView, FinalClassification, SuggestionView } from './review'

/** Open; settled by a lead; or answered by asking another classifier's call, or by reopening the calls. */
export const DisputeState = z.enum(['open', 'settled', 'another-call', 'reopened'])
export type DisputeState = z.infer<typeof DisputeState>

export const DisputeActionKind = z.enum(['another-call', 'reopened'])
export type DisputeActionKind = z.infer<typeof DisputeActionKind>

/** A disputed spectrum with its calls side by side. */
export const DisputeView = z
  .object({
    id: z.number().int(),
    state: DisputeState,
    openedAt: z.string(),
    spectrum: z.object({ id: z.number().int(), objectName: z.string(), status: z.enum(SPECTRUM_STATUSES), snr: z.number().nullable(), createdAt: z.string() }),
    campaign: CampaignRef,
    typeSpread: z.number(),
    classSpread: z.number(),
    typeTolerance: z.number(),
    classTolerance: z.number(),
    /** The disputed calls side by side, in the order they were made. */
    calls: z.array(CallView),
    /** Every call row on the spectrum, corrections included. */
    allCalls: z.array(CallView),
    suggestion: SuggestionView.nullable(),
    settlement: FinalClassification.nullable(),
    /** The lead's answer when it was not a settlement. */
    action: z.object({ kind: DisputeActionKind, note: z.string(), by: PersonRef, at: z.string() }).nullable(),
  })
  .meta({ id: 'DisputeView' })
export type DisputeView = z.infer<typeof DisputeView>

const mkText = (max: number) => z.string().trim().min(1, 'is required').max(max)

/** A lead's settlement of a dispute. */
export const SettleInput = z.object({
  /** Letter and subtype, e.g. "B8". */
  spectralType: mkText(40),
  luminosityClass: mkText(12),
  peculiarities: z.string().trim().max(60).optional(),
  note: multiLine(4000).pipe(z.string().min(1, 'say why you settled it this way')),
})
export type SettleInput = z.infer<typeof SettleInput>

/** Asks one more classifier for a call, or reopens the calls so their authors can correct them. */
export const DisputeActionInput = z.object({ action: DisputeActionKind, note: z.string().trim().min(1, 'say why').max(4000) })
export type DisputeActionInput = z.infer<typeof DisputeActionInput>

export const DisputeQuery = z.object({
  state: z.enum(['open', 'settled', 'another-call', 'reopened', 'all']).default('all'),
  campaign: z.preprocess(emptyToUndefined, id.optional()),
})
export type DisputeQuery = z.infer<typeof DisputeQuery>

const disputeReply = z.object({ dispute: DisputeView })

export const disputesApi = {
  list: endpoint({ method: 'get', path: '/disputes', tag: 'Disputes', summary: 'Disputes, open ones first', query: DisputeQuery, response: z.object({ disputes: z.array(DisputeView) }) }),
  get: endpoint({ method: 'get', path: '/disputes/:id', tag: 'Disputes', summary: 'One dispute with its calls', params: idParams, response: disputeReply }),
  settle: endpoint({
    method: 'post',
    path: '/disputes/:id/settle',
    tag: 'Disputes',
    summary: 'Settle a dispute with a final classification',
    params: idParams,
    body: SettleInput,
    response: disputeReply,
  }),
  answer: endpoint({
    method: 'post',
    path: '/disputes/:id/answer',
    tag: 'Disputes',
    summary: 'Ask for another call, or reopen the calls',
    params: idParams,
    body: DisputeActionInput,
    response: disputeReply,
  }),
}
