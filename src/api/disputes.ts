import type { DisputeActionInput, DisputeState, DisputeView, SettleInput } from '@shared/api/disputes'
import { http } from './http'

export type { DisputeActionInput, DisputeState, DisputeView, SettleInput }

export const listDisputes = async (state: DisputeState | 'all' = 'all'): Promise<DisputeView[]> =>
  (await http.get<{ disputes: DisputeView[] }>('/disputes', { query: { state } })).disputes

export const settleDispute = async (id: number, input: SettleInput): Promise<DisputeView> =>
  (await http.post<{ dispute: DisputeView }>(`/disputes/${id}/settle`, input)).dispute

/** Sends the dispute back to the classifiers: another classifier's call, or the calls reopened. */
export const answerDispute = async (id: number, input: DisputeActionInput): Promise<DisputeView> =>
  (await http.post<{ dispute: DisputeView }>(`/disputes/${id}/answer`, input)).dispute
