import { computed, onBeforeUnmount, ref, shallowRef, toValue, watch, type MaybeRefOrGetter } from 'vue'
import { ApiError } from '@/api/http'
import {
  getPreparedData,
  getSpectrum,
  getSpectrumData,
  processSpectrumAgain,
  updateSpectrum,
  withdrawSpectrum,
  type ReadingCorrection,
  type SpectrumMetadataInput,
  type SpectrumPage,
} from '@/api/spectra'
import type { DecodedSeries } from '@/lib/series'
import type { WavelengthRegion } from '@/lib/spectrumPlot'
import { useAsync } from './useAsync'

/** Points asked for when showing a whole spectrum, and when a zoomed range is fetched again. */
export const OVERVIEW_POINTS = 4000
export const ZOOM_POINTS = 20000

/**
 * One spectrum's page: its details and measurements, the observed and prepared arrays, and the
 * visible region. Zooming in fetches that range again at full resolution; zooming out goes back
 * to the overview already loaded. A new id (the route moved to another spectrum) starts again from scratch.
 */
export function useSpectrum(spectrumId: MaybeRefOrGetter<number>) {
  const current = () => toValue(spectrumId)
  const page = useAsync<SpectrumPage>(() => getSpectrum(current()))
  const overview = useAsync<DecodedSeries>(() => getSpectrumData(current(), { maxPoints: OVERVIEW_POINTS }))
  const preparedOverview = useAsync<DecodedSeries | null>(() =>
    getPreparedData(current(), { maxPoints: OVERVIEW_POINTS }).catch((e: unknown) => {
      // Not measured yet (or it failed): the page says so instead of an error.
      if (e instanceof ApiError && e.status === 404) return null
      throw e
    }),
  )
  const region = ref<WavelengthRegion | null>(null)
  const zoomed = shallowRef<{ observed: DecodedSeries; prepared: DecodedSeries | null } | null>(null)
  const zoomState = ref<'idle' | 'loading' | 'error'>('idle')
  let abort: AbortController | null = null
  let timer: ReturnType<typeof setTimeout> | null = null

  const observed = computed(() => zoomed.value?.observed ?? overview.data.value)
  const prepared = computed(() => (zoomed.value ? zoomed.value.prepared : preparedOverview.data.value))

  async function fetchRange(r: WavelengthRegion): Promise<void> {
    const id = current()
    abort?.abort()
    const mine = new AbortController()
    abort = mine
    zoomState.value = 'loading'
    try {
      const range = { from: r[0], to: r[1], maxPoints: ZOOM_POINTS }
      const [o, p] = await Promise.all([getSpectrumData(id, range, mine.signal), preparedOverview.data.value ? getPreparedData(id, range, mine.signal).catch(() => null) : Promise.resolve(null)])
      if (mine.signal.aborted) return
      zoomed.value = { observed: o, prepared: p }
      zoomState.value = 'idle'
    } catch (e) {
      if ((e as Error)?.name === 'AbortError') return
      // The overview stays on screen; only the sharper view is missing.
      zoomState.value = 'error'
    }
  }

  watch(region, (r) => {
    if (timer) clearTimeout(timer)
    if (!r) {
      abort?.abort()
      zoomed.value = null
      zoomState.value = 'idle'
      return
    }
    // The overview already holds every pixel of a short spectrum: no need to ask again.
    const layout = overview.data.value?.layout
    if (layout && !layout.decimated) return
    // Zoomed out of the sharper range: show the overview until the new range arrives.
    const wl = zoomed.value?.observed.columns.wavelength
    if (wl && wl.length > 0 && (r[0] < wl[0]! || r[1] > wl[wl.length - 1]!)) zoomed.value = null
    timer = setTimeout(() => void fetchRange(r), 180)
  })

  onBeforeUnmount(() => {
    if (timer) clearTimeout(timer)
    abort?.abort()
  })

  async function save(changes: SpectrumMetadataInput): Promise<void> {
    const spectrum = await updateSpectrum(current(), changes)
    if (page.data.value) page.data.value = { ...page.data.value, spectrum }
  }

  /** Reads the stored file again with other choices; everything drawn from the old arrays is fetched again. */
  async function reread(changes: ReadingCorrection): Promise<void> {
    await updateSpectrum(current(), changes)
    zoomed.value = null
    region.value = null
    reloadAll()
  }

  async function withdraw(): Promise<string> {
    return (await withdrawSpectrum(current())).message
  }

  async function processAgain(): Promise<string> {
    const reply = await processSpectrumAgain(current())
    await page.reload()
    return reply.message
  }

  function reloadAll(): void {
    void page.reload()
    void overview.reload()
    void preparedOverview.reload()
  }

  watch(current, (next, before) => {
    if (next === before) return
    if (timer) clearTimeout(timer)
    abort?.abort()
    zoomed.value = null
    zoomState.value = 'idle'
    region.value = null
    // What the last spectrum showed must not linger under the new one's title.
    page.data.value = null
    overview.data.value = null
    preparedOverview.data.value = null
    reloadAll()
  })

  return {
    data: page.data,
    error: page.error,
    state: page.state,
    reload: page.reload,
    overview,
    preparedOverview,
    observed,
    prepared,
    region,
    zoomState,
    save,
    reread,
    withdraw,
    processAgain,
    reloadAll,
  }
}
