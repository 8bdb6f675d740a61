import { computed, ref, shallowRef, watch, type Ref } from 'vue'
import { getHistory, getReview, recordCall, type CallInput, type ReviewData } from '@/api/calls'
import { ApiError } from '@/api/http'
import { fetchPrepared, fetchStandardSeries, listOverlayStandards, type OverlayStandardSummary } from '@/api/reviewSeries'
import type { DecodedSeries } from '@/lib/series'
import { useAsync, type LoadState } from './useAsync'

/** The library's standards, fetched once per page load and shared by every screen that overlays them. */
let standardsRequest: Promise<OverlayStandardSummary[]> | null = null
export function useOverlayStandards() {
  return useAsync(() => {
    standardsRequest ??= listOverlayStandards().catch((e: unknown) => {
      standardsRequest = null
      throw e
    })
    return standardsRequest
  })
}

const seriesCache = new Map<number, Promise<DecodedSeries>>()
/** A standard's rectified series; kept for the page's life, standards do not change under a version. */
export function standardSeries(id: number): Promise<DecodedSeries> {
  let p = seriesCache.get(id)
  if (!p) {
    p = fetchStandardSeries(id).catch((e: unknown) => {
      seriesCache.delete(id)
      throw e
    })
    seriesCache.set(id, p)
  }
  return p
}

/** Overlays by standard id, loaded on demand; `state` says whether the requested ones are in. */
export function useStandardSeries(ids: Ref<readonly number[]>) {
  const data = shallowRef<Map<number, DecodedSeries>>(new Map())
  const error = ref<ApiError | null>(null)
  const state = ref<LoadState>('idle')
  let generation = 0
  watch(
    ids,
    async (wanted) => {
      const mine = ++generation
      if (wanted.length === 0) {
        state.value = 'done'
        return
      }
      state.value = 'loading'
      error.value = null
      try {
        const loaded = await Promise.all(wanted.map(async (id) => [id, await standardSeries(id)] as const))
        if (mine !== generation) return
        data.value = new Map(loaded)
        state.value = 'done'
      } catch (e) {
        if (mine !== generation) return
        error.value = e instanceof ApiError ? e : new ApiError(0, 'client_error', String(e))
        state.value = 'error'
      }
    },
    { immediate: true },
  )
  return { data, error, state }
}

/** One spectrum's review: the review record, the prepared series, and recording a call. */
export function useReview(spectrumId: Ref<number>) {
  const review = useAsync<ReviewData>(() => getReview(spectrumId.value))
  const prepared = useAsync<DecodedSeries>(() => fetchPrepared(spectrumId.value))
  const openedAt = ref(Date.now())

  watch(spectrumId, () => {
    openedAt.value = Date.now()
    void review.reload()
    void prepared.reload()
  })

  const submitting = ref(false)
  async function submit(input: Omit<CallInput, 'secondsSpent'>) {
    submitting.value = true
    try {
      const result = await recordCall(spectrumId.value, { ...input, secondsSpent: Math.round((Date.now() - openedAt.value) / 1000) })
      return result
    } finally {
      submitting.value = false
    }
  }

  const hidden = computed(() => review.data.value?.hidden === true)
  return { ...review, prepared, submit, submitting, hidden }
}

/** The spectrum's history, loaded when its tab is first opened. */
export function useHistory(spectrumId: Ref<number>) {
  const history = useAsync(() => getHistory(spectrumId.value), { immediate: false })
  watch(spectrumId, () => {
    if (history.state.value !== 'idle') void history.reload()
  })
  return history
}
