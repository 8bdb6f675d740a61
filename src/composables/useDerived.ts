import { watch, type Ref } from 'vue'
import { getDerived } from '@/api/derived'
import { useAsync } from './useAsync'

/** Calibration estimates for one spectrum (Teff, M_V, BC, distance, luminosity, radius). */
export function useDerived(spectrumId: Ref<number>) {
  const derived = useAsync(() => getDerived(spectrumId.value))
  watch(spectrumId, () => void derived.reload())
  return derived
}
