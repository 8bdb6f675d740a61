import { QUEUE_ORDERS, QUEUE_PAGE_SIZE, queueApi, type QueueItem, type QueueOrder, type QueuePage, type QueueQuery } from '@shared/api/queue'
import type { ClaimView } from '@shared/api/review'
import { call } from './http'

export type { QueueItem, QueueOrder, QueuePage }
export type { ClaimView }
export { QUEUE_ORDERS, QUEUE_PAGE_SIZE }

/** The queue's filters (server: QueueQuery); every one may be left out. */
export type QueueFilters = Partial<Omit<QueueQuery, 'limit' | 'after'>>

/** The filters as the query string carries them (flags comma-separated). */
const queryOf = (f: QueueFilters) => ({ ...f, flags: f.flags && f.flags.length > 0 ? f.flags.join(',') : undefined })

/** A page of the queue; `after` continues after that spectrum. */
export const listQueue = (filters: QueueFilters = {}, after?: number): Promise<QueuePage> => call(queueApi.list, { query: { ...queryOf(filters), after } })

/** The item after `after` in the caller's queue with these filters, or null when the queue is done. */
export const nextQueueItem = async (filters: QueueFilters, after?: number): Promise<QueueItem | null> => (await call(queueApi.next, { query: { ...queryOf(filters), after } })).item

export const claimQueueItem = async (spectrumId: number): Promise<ClaimView> => (await call(queueApi.claim, { params: { spectrumId } })).claim

/** Gives the item back to the queue (releasing a claim one does not hold changes nothing). */
export const releaseQueueItem = async (spectrumId: number): Promise<void> => {
  await call(queueApi.release, { params: { spectrumId } })
}
