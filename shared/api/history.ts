import type { PersonRef } from './review'

export type HistoryKind = 'upload' | 'reread' | 'reprocess' | 'measurement' | 'suggestion' | 'call' | 'correction' | 'dispute' | 'agreed' | 'settled'

/** One entry of a spectrum's history, oldest first. */
export interface HistoryEvent {
  at: string
  kind: HistoryKind
  /** Null for the pipeline. */
  who: PersonRef | null
  summary: string
  /** For calls: whether the suggestion had been shown to the caller, and the time they spent. */
  suggestionShown?: boolean
  secondsSpent?: number | null
  /** What each kind adds (the call, the decision, …). */
  details: Record<string, unknown>
}

/** The whole history; `hidden` when blind review keeps some of it back from the caller. */
export interface SpectrumHistory {
  events: HistoryEvent[]
  hidden: boolean
}
