import { watch, type Ref } from 'vue'
import { getInstrumentCandidates, listInstruments } from '@/api/instruments'
import { useAsync } from './useAsync'

/** The instruments of the person's campaigns, or of one campaign when `campaignId` is given (and set). */
export function useInstruments(campaignId?: Readonly<Ref<number | null>>) {
  const list = useAsync(async () => (campaignId && campaignId.value === null ? [] : listInstruments(campaignId?.value ?? undefined)), { immediate: true })
  if (campaignId) watch(campaignId, () => void list.reload())
  return list
}

/** Candidates, coverage and passed-over spectra of the chosen instrument; nothing while none is chosen. */
export function useInstrumentCandidates(instrumentId: Readonly<Ref<number | null>>) {
  const data = useAsync(async () => (instrumentId.value === null ? null : getInstrumentCandidates(instrumentId.value)), { immediate: instrumentId.value !== null })
  watch(instrumentId, () => void data.reload())
  return data
}
