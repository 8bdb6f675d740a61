import type { SpectrumStatus } from '../status'
import type { CallView, FinalClassification, SuggestionView } from './review'

/** Open; settled by a lead; or answered by asking another classifier's call, or by reopening the calls. */
export type DisputeState = 'open' | 'settled' | 'another-call' | 'reopened'

export type DisputeActionKind = 'another-call' | 'reopened'

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
  /** The lead's answer when it was not a settlement. */
  action: { kind: DisputeActionKind; note: string; by: { id: number; name: string }; at: string } | null
}

/** Asks one more classifier for a call, or reopens the calls so their authors can correct them. */
export interface DisputeActionInput {
  action: DisputeActionKind
  note: string
}

/** A lead's settlement of a dispute. */
export interface SettleInput {
  /** Letter and subtype, e.g. "B8". */
  spectralType: string
  luminosityClass: string
  peculiarities?: string
  note: string
}
