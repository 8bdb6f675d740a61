import type { SuggestionView } from './calls'
import { http } from './http'

/** Priority orders the server offers for the queue. */
export const QUEUE_ORDERS = ['oldest', 'snr', 'flagged'] as const
export type QueueOrder = (typeof QUEUE_ORDERS)[number]

export interface QueueFilters {
  campaign?: number
  /** Quality flags the item's suggestion must all carry. */
  flags?: string[]
  /** Suggested type-code range (O0 = 0 … M0 = 60); blind-review items drop out when it is set. */
  typeFrom?: number
  typeTo?: number
  snrMin?: number
  snrMax?: number
  order?: QueueOrder
}

/** One spectrum waiting for the caller's call (server: queue.service QueueItem). */
export interface QueueItem {
  spectrumId: number
  objectName: string
  campaign: { id: number; code: string; name: string; blindReview: boolean }
  snr: number | null
  flags: string[]
  createdAt: string
  status: 'suggested' | 'under_review'
  claim: { state: 'free' } | { state: 'mine'; claimedAt: string; expiresAt: string }
  calls: { count: number; needed: number }
  /** Null under blind review (then `hidden`) or when there is no suggestion. */
  suggestion: SuggestionView | null
  hidden: boolean
}

export interface QueuePage {
  items: QueueItem[]
  claimMinutes: number
}

export interface ClaimView {
  spectrumId: number
  mine: boolean
  by: { id: number; name: string }
  claimedAt: string
  expiresAt: string
  live: boolean
}

function queryOf(f: QueueFilters): Record<string, string | number | undefined> {
  return {
    campaign: f.campaign,
    flags: f.flags && f.flags.length > 0 ? f.flags.join(',') : undefined,
    typeFrom: f.typeFrom,
    typeTo: f.typeTo,
    snrMin: f.snrMin,
    snrMax: f.snrMax,
    order: f.order,
  }
}

export const listQueue = (filters: QueueFilters = {}): Promise<QueuePage> => http.get<QueuePage>('/queue', { query: queryOf(filters) })

/** The item after `after` in the caller's queue with these filters, or null when the queue is done. */
export const nextQueueItem = async (filters: QueueFilters, after?: number): Promise<QueueItem | null> =>
  (await http.get<{ item: QueueItem | null }>('/queue/next', { query: { ...queryOf(filters), after } })).item

export const claimQueueItem = async (spectrumId: number): Promise<ClaimView> =>
  (await http.post<{ claim: ClaimView }>(`/queue/${spectrumId}/claim`)).claim
