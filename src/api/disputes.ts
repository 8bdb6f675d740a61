import type { SpectrumStatus } from '@shared/status'
import type { CallView, FinalClassification, SuggestionView } from './calls'
import { http } from './http'

export type DisputeState = 'open' | 'settled'

/** A disputed spectrum with its calls side by side (server: disputes.service DisputeView). */
export interface DisputeView {
  id: number
  state: DisputeState
  openedAt: string
  spectrum: { id: number; objectName: string; status: SpectrumStatus; snr: number | null; createdAt: string }
  campaign: { id: number; code: string; name: string }
  typeSpread: number
  classSpread: number
  typeTolerance: number
  classTolerance: number
  calls: CallView[]
  allCalls: CallView[]
  suggestion: SuggestionView | null
  settlement: FinalClassification | null
}

export interface SettleInput {
  /** Letter and subtype, e.g. "B8". */
  spectralType: string
  luminosityClass: string
  peculiarities: string
  note: string
}

export const listDisputes = async (state: DisputeState | 'all' = 'all'): Promise<DisputeView[]> =>
  (await http.get<{ disputes: DisputeView[] }>('/disputes', { query: { state } })).disputes

export const settleDispute = async (id: number, input: SettleInput): Promise<DisputeView> =>
  (await http.post<{ dispute: DisputeView }>(`/disputes/${id}/settle`, input)).dispute
