import type { QueueItem, QueueOrder, QueuePage } from '@shared/api/queue'
import type { ClaimView } from '@shared/api/review'
import { http } from './http'

export type { QueueItem, QueueOrder, QueuePage }
export type { ClaimView }

/** Priority orders the server offers for the queue. */
export const QUEUE_ORDERS = ['oldest', 'snr', 'flagged'] as const satisfies readonly QueueOrder[]

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

/** Gives the item back to the queue (releasing a claim one does not hold changes nothing). */
export const releaseQueueItem = async (spectrumId: number): Promise<void> => {
  await http.delete<void>(`/queue/${spectrumId}/claim`)
}
