import { statusApi, type SpectrumLiveStatus } from '@shared/api/status'
import { call } from './http'

export type { SpectrumLiveStatus }

export const getLiveStatus = (spectrumId: number): Promise<SpectrumLiveStatus> => call(statusApi.get, { params: { id: spectrumId } })
