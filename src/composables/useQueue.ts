import { ref, watch, type Ref } from 'vue'
import { ApiError } from '@/api/http'
import { claimQueueItem, listQueue, nextQueueItem, releaseQueueItem, type QueueFilters } from '@/api/queue'
import { useAsync } from './useAsync'

const STORAGE_KEY = 'lineweight.queueFilters'

/** The filters last used on the queue screen; Spectrum review's "next" follows the same order. */
export function savedQueueFilters(): QueueFilters {
  try {
    const raw = typeof sessionStorage === 'undefined' ? null : sessionStorage.getItem(STORAGE_KEY)
    const parsed = raw ? (JSON.parse(raw) as unknown) : null
    return parsed && typeof parsed === 'object' ? (parsed as QueueFilters) : { order: 'oldest' }
  } catch {
    return { order: 'oldest' }
  }
}

export function saveQueueFilters(filters: QueueFilters): void {
  try {
    sessionStorage.setItem(STORAGE_KEY, JSON.stringify(filters))
  } catch {
    // private mode or no storage: the queue still works, it just forgets the filters
  }
}

/**
 * The caller's review queue with its filters, a page at a time; reloads from the top whenever a
 * filter changes, and `loadMore` appends the page after the last item shown.
 */
export function useQueue(initial: QueueFilters = savedQueueFilters()) {
  const filters: Ref<QueueFilters> = ref({ ...initial })
  const queue = useAsync(() => listQueue(filters.value))
  const loadingMore = ref(false)
  watch(
    filters,
    (f) => {
      saveQueueFilters(f)
      void queue.reload()
    },
    { deep: true },
  )
  async function loadMore(): Promise<void> {
    const page = queue.data.value
    const last = page?.items.at(-1)
    if (!page || !page.more || !last || loadingMore.value) return
    loadingMore.value = true
    try {
      const next = await listQueue(filters.value, last.spectrumId)
      // A reload meanwhile (filters, refresh) wins.
      if (queue.data.value !== page) return
      const shown = new Set(page.items.map((i) => i.spectrumId))
      queue.data.value = { ...page, items: [...page.items, ...next.items.filter((i) => !shown.has(i.spectrumId))], more: next.more }
    } finally {
      loadingMore.value = false
    }
  }
  return { ...queue, filters, loadMore, loadingMore }
}

/**
 * Claims the item after `currentId` in the saved queue order and filters, within `campaignId` when
 * given (the campaign being worked), and returns its id; null when nothing is left. The item being
 * left is given back first, so a classifier holds only what they have open. An item another
 * classifier claims first is skipped.
 */
export async function claimNext(currentId: number | null, campaignId?: number): Promise<number | null> {
  const saved = savedQueueFilters()
  const filters = campaignId === undefined || saved.campaign !== undefined ? saved : { ...saved, campaign: campaignId }
  if (currentId !== null) await releaseQueueItem(currentId)
  let after = currentId ?? undefined
  for (let tries = 0; tries < 20; tries++) {
    const item = await nextQueueItem(filters, after)
    if (!item) return null
    try {
      await claimQueueItem(item.spectrumId)
      return item.spectrumId
    } catch (e) {
      // Claimed by someone else in the meantime, or no longer waiting: try the one after it.
      if (e instanceof ApiError && (e.status === 404 || (e.status === 409 && e.code !== 'too_many_claims'))) {
        after = item.spectrumId
        continue
      }
      throw e
    }
  }
  return null
}
