import type { DerivedView } from '@shared/api/derived'
import { http } from './http'

export type { DerivedView }

export async function getDerived(spectrumId: number): Promise<DerivedView> {
  return (await http.get<{ derived: DerivedView }>(`/spectra/${spectrumId}/derived`)).derived
}
