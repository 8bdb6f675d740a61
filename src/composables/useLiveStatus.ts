import { onBeforeUnmount, ref, toValue, watch, type MaybeRefOrGetter } from 'vue'
import { getLiveStatus, type SpectrumLiveStatus } from '@/api/status'
import type { SpectrumStatus } from '@shared/status'

/** Statuses in which the server is still working on a spectrum. */
export const PROCESSING: readonly SpectrumStatus[] = ['received', 'measured']

/** How often a page asks while a spectrum is processed. */
export const POLL_MS = 2000

/**
 * Follows a spectrum while it is processed: asks the server every POLL_MS for its status and place in
 * the processing queue, and calls `onChange` once the status moves on, so the page reloads itself.
 * Polling (rather than a pushed stream) keeps to plain JSON requests through the one fetch wrapper.
 */
export function useLiveStatus(spectrumId: MaybeRefOrGetter<number>, status: MaybeRefOrGetter<SpectrumStatus | null | undefined>, onChange: (next: SpectrumLiveStatus) => void) {
  const live = ref<SpectrumLiveStatus | null>(null)
  let timer: ReturnType<typeof setTimeout> | null = null
  let stopped = false

  const stop = () => {
    if (timer) clearTimeout(timer)
    timer = null
  }

  async function tick(): Promise<void> {
    const id = toValue(spectrumId)
    const before = toValue(status)
    try {
      const next = await getLiveStatus(id)
      if (stopped || id !== toValue(spectrumId)) return
      live.value = next
      if (next.status !== before) {
        onChange(next)
        return
      }
    } catch {
      // A missed poll is tried again on the next tick.
    }
    if (!stopped) timer = setTimeout(() => void tick(), POLL_MS)
  }

  watch(
    [() => toValue(spectrumId), () => toValue(status)],
    ([, s]) => {
      stop()
      live.value = null
      if (s && PROCESSING.includes(s)) timer = setTimeout(() => void tick(), 0)
    },
    { immediate: true },
  )
  onBeforeUnmount(() => {
    stopped = true
    stop()
  })
  return { live }
}

/** "3rd in line of 5", "being measured now", or null when nothing is running. */
export function queueText(live: SpectrumLiveStatus | null): string | null {
  const job = live?.job
  if (!job) return null
  if (job.state === 'running') return 'Being measured now; this page updates when it is done.'
  const n = job.position
  const nth = n % 10 === 1 && n % 100 !== 11 ? 'st' : n % 10 === 2 && n % 100 !== 12 ? 'nd' : n % 10 === 3 && n % 100 !== 13 ? 'rd' : 'th'
  return `Waiting to be measured: ${n === 1 ? 'next in line' : `${n}${nth} in line`} of ${job.ofQueued} queued. This page updates by itself.`
}
