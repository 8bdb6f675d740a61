import type { SpectrumStatus } from '../status'
import type { CallView, FinalClassification, SuggestionView } from './review'

export type DisputeState = 'open' | 'settled'

/** A disputed spectrum with its calls side by side. */
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
  /** The disputed calls side by side, in the order they were made. */
  calls: CallView[]
  /** Every call row on the spectrum, corrections included. */
  allCalls: CallView[]
  suggestion: SuggestionView | null
  settlement: FinalClassification | null
}

/** A lead's settlement of a dispute. */
export interface SettleInput {
  /** Letter and subtype, e.g. "B8". */
  spectralType: string
  luminosityClass: string
  peculiarities?: string
  note: string
}
