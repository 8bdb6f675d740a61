import type { SuggestionView } from './review'

/** A queue row's suggestion: the call and its uncertainty; the review screen has the standards and criteria behind it. */
export type QueueSuggestion = Omit<SuggestionView, 'candidates' | 'votes'>

export type QueueOrder = 'oldest' | 'snr' | 'flagged'

/** One spectrum waiting for the caller's call. */
export interface QueueItem {
  spectrumId: number
  objectName: string
  campaign: { id: number; code: string; name: string; blindReview: boolean }
  snr: number | null
  flags: string[]
  createdAt: string
  status: 'suggested' | 'under_review'
  claim: { state: 'free' } | { state: 'mine'; claimedAt: string; expiresAt: string }
  calls: { count: number; needed: number }
  /** Null under blind review (then `hidden`) or when there is no suggestion. */
  suggestion: QueueSuggestion | null
  hidden: boolean
}

export interface QueuePage {
  items: QueueItem[]
  claimMinutes: number
}
