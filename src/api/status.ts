import type { SpectrumLiveStatus } from '@shared/api/status'
import { http } from './http'

export type { SpectrumLiveStatus }

export const getLiveStatus = (spectrumId: number): Promise<SpectrumLiveStatus> => http.get<SpectrumLiveStatus>(`/spectra/${spectrumId}/status`)
