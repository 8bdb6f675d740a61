import type { DerivedParameters } from '@shared/derived'
import { http } from './http'

// Mirrors GET /api/spectra/:id/derived (server/services/derived.service.ts).

export interface DerivedView {
  spectrumId: number
  /** What the estimates rest on: the decided classification, else the current suggestion; null when there is neither. */
  basis: { source: 'classification' | 'suggestion'; spectralType: string; typeUncertainty: number; classUncertainty: number } | null
  inputs: { vMag: number | null; ebv: number | null; parallaxMas: number | null; parallaxErrorMas: number | null }
  estimates: DerivedParameters | null
  /** The server's wording of the caution that these are estimates. */
  caution: string
}

export async function getDerived(spectrumId: number): Promise<DerivedView> {
  return (await http.get<{ derived: DerivedView }>(`/spectra/${spectrumId}/derived`)).derived
}
