import { toValue, watch, type MaybeRefOrGetter } from 'vue'
import { getSpectrumHistory, type SpectrumHistory } from '@/api/spectra'
import { useAsync } from './useAsync'

/** A spectrum's whole history, oldest first; loaded again when the page moves to another spectrum. */
export function useSpectrumHistory(spectrumId: MaybeRefOrGetter<number>) {
  const history = useAsync<SpectrumHistory>(() => getSpectrumHistory(toValue(spectrumId)))
  watch(
    () => toValue(spectrumId),
    (next, before) => {
      if (next === before) return
      history.data.value = null
      void history.reload()
    },
  )
  return history
}
