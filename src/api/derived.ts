import { derivedApi, type DerivedView } from '@shared/api/derived'
import { call } from './http'

export type { DerivedView }

export const getDerived = async (spectrumId: number): Promise<DerivedView> => (await call(derivedApi.get, { params: { id: spectrumId } })).derived
