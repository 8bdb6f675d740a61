import { reactive, ref, watch } from 'vue'
import type { SpectrumStatus } from '@shared/status'
import { listSpectra, type SpectrumList, type SpectrumListQuery, type SpectrumSort } from '@/api/spectra'
import { useAsync } from './useAsync'

/** The filters on the spectra table, as the controls hold them. */
export interface SpectraFilters {
  status: SpectrumStatus | null
  campaign: number | null
  /** The instrument the spectra were taken with. */
  instrument: number | null
  q: string
  /** Submitted between, as [from, to] in ms since the epoch. */
  submitted: [number, number] | null
  snrMin: number | null
  snrMax: number | null
}

export const emptySpectraFilters = (): SpectraFilters => ({ status: null, campaign: null, instrument: null, q: '', submitted: null, snrMin: null, snrMax: null })

/** The list request for a page, sort and filters; the end of the date range covers its whole day. */
export function spectraQuery(page: number, pageSize: number, sort: SpectrumSort, f: SpectraFilters): SpectrumListQuery {
  const query: SpectrumListQuery = { page, pageSize, sort }
  if (f.status) query.status = f.status
  if (f.campaign !== null) query.campaign = f.campaign
  if (f.instrument !== null) query.instrument = f.instrument
  if (f.q.trim()) query.q = f.q.trim()
  if (f.submitted) {
    query.from = new Date(f.submitted[0]).toISOString()
    query.to = new Date(f.submitted[1] + 86_400_000 - 1).toISOString()
  }
  if (f.snrMin !== null) query.snrMin = f.snrMin
  if (f.snrMax !== null) query.snrMax = f.snrMax
  return query
}

/** One page of spectra from the server, reloaded when the page, sort or filters change (typing waits a moment). */
export function useSpectra(options: { pageSize?: number; debounceMs?: number } = {}) {
  const page = ref(1)
  const pageSize = ref(options.pageSize ?? 25)
  const sort = ref<SpectrumSort>('-createdAt')
  const filters = reactive<SpectraFilters>(emptySpectraFilters())
  const list = useAsync<SpectrumList>(() => listSpectra(spectraQuery(page.value, pageSize.value, sort.value, filters)))

  let timer: ReturnType<typeof setTimeout> | null = null
  const later = () => {
    if (timer) clearTimeout(timer)
    timer = setTimeout(() => void list.reload(), options.debounceMs ?? 300)
  }

  watch([page, pageSize, sort], () => void list.reload())
  watch(
    () => ({ ...filters, submitted: filters.submitted ? [...filters.submitted] : null }),
    (now, before) => {
      // A new filter starts from the first page; the search box waits for the typing to pause.
      const typed = now.q !== before.q || now.snrMin !== before.snrMin || now.snrMax !== before.snrMax
      if (page.value !== 1) page.value = 1
      else if (typed) later()
      else void list.reload()
    },
  )

  function clearFilters(): void {
    Object.assign(filters, emptySpectraFilters())
  }

  return { ...list, page, pageSize, sort, filters, clearFilters }
}
