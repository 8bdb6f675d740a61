import { z } from 'zod'
import { parseMK } from '../mk'
import { emptyToUndefined, id } from './common'
import { endpoint, noBody } from './endpoint'
import { ClaimView, SuggestionView } from './review'

export const QUEUE_ORDERS = ['oldest', 'snr', 'flagged'] as const
export type QueueOrder = (typeof QUEUE_ORDERS)[number]

/** Items per queue page unless `limit` says otherwise. */
export const QUEUE_PAGE_SIZE = 50

/** A queue row's suggestion: the call and its uncertainty; the review screen has the standards and criteria behind it. */
export const QueueSuggestion = SuggestionView.omit({ candidates: true, votes: true })
export type QueueSuggestion = z.infer<typeof QueueSuggestion>

/** One spectrum waiting for the caller's call. */
export const QueueItem = z
  .object({
    spectrumId: z.number().int(),
    objectName: z.string(),
    campaign: z.object({ id: z.number().int(), code: z.string(), name: z.string(), blindReview: z.boolean() }),
    snr: z.number().nullable(),
    flags: z.array(z.string()),
    createdAt: z.string(),
    status: z.enum(['suggested', 'under_review']),
    claim: z.union([z.object({ state: z.literal('free') }), z.object({ state: z.literal('mine'), claimedAt: z.string(), expiresAt: z.string() })]),
    calls: z.object({ count: z.number().int(), needed: z.number().int() }),
    /** Null under blind review (then `hidden`) or when there is no suggestion. */
    suggestion: QueueSuggestion.nullable(),
    hidden: z.boolean(),
  })
  .meta({ id: 'QueueItem' })
export type QueueItem = z.infer<typeof QueueItem>

export const QueuePage = z
  .object({
    items: z.array(QueueItem),
    /** Whether items follow this page (ask again with `after` = the last item's spectrumId). */
    more: z.boolean(),
    /** How many wait with these filters, counted up to a cap (`atLeast`: more than `count`); first page only, null after. */
    waiting: z.object({ count: z.number().int(), atLeast: z.boolean() }).nullable(),
    claimMinutes: z.number(),
  })
  .meta({ id: 'QueuePage' })
export type QueuePage = z.infer<typeof QueuePage>

/** A type bound as a type code (18) or as MK text ("B8"). */
const typeBound = z.preprocess(
  emptyToUndefined,
  z
    .union([z.coerce.number().min(0).max(99.99), z.string().trim()])
    .transform((v, ctx) => {
      if (typeof v === 'number') return v
      const r = parseMK(v)
      if (r.ok && r.value.typeCode !== undefined) return r.value.typeCode
      ctx.addIssue({ code: 'custom', message: 'must be a spectral type such as B0 or a type code such as 10' })
      return z.NEVER
    })
    .optional(),
)

export const QueueQuery = z.object({
  campaign: z.preprocess(emptyToUndefined, id.optional()),
  /** Quality flags the item's suggestion must all carry, comma-separated. */
  flags: z.preprocess(
    emptyToUndefined,
    z
      .string()
      .max(400)
      .transform((v) =>
        v
          .split(',')
          .map((f) => f.trim())
          .filter(Boolean),
      )
      .optional(),
  ),
  /** Suggested type-code range (O0 = 0 … M0 = 60, or MK text); blind-review items drop out when it is set. */
  typeFrom: typeBound,
  typeTo: typeBound,
  snrMin: z.preprocess(emptyToUndefined, z.coerce.number().optional()),
  snrMax: z.preprocess(emptyToUndefined, z.coerce.number().optional()),
  order: z.enum(QUEUE_ORDERS).default('oldest'),
  limit: z.coerce.number().int().min(1).max(500).default(QUEUE_PAGE_SIZE),
  /** Continue after this spectrum in the queue order (keyset paging: items others call meanwhile do not shift the page). */
  after: z.preprocess(emptyToUndefined, id.optional()),
})
export type QueueQuery = z.infer<typeof QueueQuery>

const spectrumIdParams = z.object({ spectrumId: id })

export const queueApi = {
  list: endpoint({ method: 'get', path: '/queue', tag: 'Review', summary: "The caller's review queue", query: QueueQuery, response: QueuePage }),
  next: endpoint({
    method: 'get',
    path: '/queue/next',
    tag: 'Review',
    summary: 'The item after `after` in the caller’s queue with these filters (null when the queue is done)',
    query: QueueQuery,
    response: z.object({ item: QueueItem.nullable() }),
  }),
  claim: endpoint({
    method: 'post',
    path: '/queue/:spectrumId/claim',
    tag: 'Review',
    summary: 'Claim a spectrum for a while so nobody else opens it',
    params: spectrumIdParams,
    response: z.object({ claim: ClaimView }),
  }),
  release: endpoint({
    method: 'delete',
    path: '/queue/:spectrumId/claim',
    tag: 'Review',
    summary: 'Give a claimed spectrum back to the queue',
    params: spectrumIdParams,
    status: 204,
    response: noBody,
  }),
}
