import { disputesApi, type DisputeActionInput, type DisputeState, type DisputeView, type SettleInput } from '@shared/api/disputes'
import { call } from './http'

export type { DisputeActionInput, DisputeState, DisputeView, SettleInput }

export const listDisputes = async (state: DisputeState | 'all' = 'all'): Promise<DisputeView[]> => (await call(disputesApi.list, { query: { state } })).disputes

export const settleDispute = async (id: number, input: SettleInput): Promise<DisputeView> => (await call(disputesApi.settle, { params: { id }, body: input })).dispute

/** Sends the dispute back to the classifiers: another classifier's call, or the calls reopened. */
export const answerDispute = async (id: number, input: DisputeActionInput): Promise<DisputeView> => (await call(disputesApi.answer, { params: { id }, body: input })).dispute
