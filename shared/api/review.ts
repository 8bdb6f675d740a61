import type { SuggestionDetails } from './suggestions'
import type { SpectrumStatus } from '../status'
import type { MeasurementSummary } from './measurements'

export type CallKind = 'call' | 'correction'
export type ClassificationSource = 'consensus' | 'settled' | 'accepted-suggestion'
export type Agreement = 'exact' | 'within' | 'settled'

export interface PersonRef {
  id: number
  name: string
}

/** The pipeline's suggestion as the review screens show it; candidates and votes are stored JSON, read leniently. */
export interface SuggestionView {
  id: number
  spectralType: string
  letter: string
  subtype: number
  typeCode: number
  luminosityClass: string
  classCode: number
  uncertaintySubtypes: number
  uncertaintyClasses: number
  libraryVersionId: number
  pipelineVersion: string
  bestStandardId: number | null
  candidates: unknown[]
  votes: unknown
  flags: string[]
  /** Probability of each (type, class) grid point, for the probability map (display only; stored JSON, read leniently). */
  probabilities?: unknown[]
  /** How the suggestion was reached and the parameters it implies; null before pipeline 2. */
  details?: SuggestionDetails | null
  createdAt: string
}

export interface CallView {
  id: number
  kind: CallKind
  correctsCallId: number | null
  by: PersonRef
  spectralType: string
  letter: string
  subtype: number
  typeCode: number
  luminosityClass: string
  classCode: number
  peculiarities: string[]
  notes: string
  confidence: number
  uncertain: boolean
  acceptedSuggestion: boolean
  suggestionId: number | null
  suggestionShown: boolean
  secondsSpent: number | null
  createdAt: string
}

/** The decision on a spectrum: agreed, settled or an accepted suggestion. */
export interface FinalClassification {
  id: number
  spectrumId: number
  source: ClassificationSource
  spectralType: string
  letter: string
  subtype: number
  typeCode: number
  luminosityClass: string
  classCode: number
  peculiarities: string[]
  decidedBy: PersonRef | null
  decidedAt: string
  nCalls: number
  callIds: number[]
  agreement: Agreement
  typeSpread: number | null
  classSpread: number | null
  suggestionId: number | null
  disputeId: number | null
  note: string
}

export interface ClaimView {
  spectrumId: number
  mine: boolean
  by: PersonRef
  claimedAt: string
  expiresAt: string
  live: boolean
}

/** The campaign settings a classifier works under. */
export interface ReviewCampaign {
  id: number
  code: string
  name: string
  callsRequired: number
  blindReview: boolean
  typeTolerance: number
  classTolerance: number
  regionMin: number
  regionMax: number
}

/** Everything the review screen needs, with blind review applied for the caller. */
export interface ReviewView {
  spectrum: {
    id: number
    objectName: string
    status: SpectrumStatus
    statusReason: string | null
    submittedBy: PersonRef
    createdAt: string
    obsDate: string | null
    instrument: string
    snr: number | null
    wavelengthRange: [number, number]
    dispersion: number
    resolvingPower: number | null
    vMag: number | null
    notes: string
  }
  campaign: ReviewCampaign
  measurement: MeasurementSummary | null
  /** Null when there is none, or while blind review hides it (`hidden`). */
  suggestion: SuggestionView | null
  hidden: boolean
  /** The claim on the spectrum, if any; another person's lapsed claim is left out. */
  claim: ClaimView | null
  /** With `othersHidden`, only the caller's own rows. */
  calls: CallView[]
  othersHidden: boolean
  callsSoFar: number
  callsRequired: number
  myCall: CallView | null
  canCall: { allowed: boolean; reason: string | null; code: string | null }
  canCorrect: boolean
  dispute: { id: number; openedAt: string; settled: boolean } | null
  classification: FinalClassification | null
}

export interface RecordCallInput {
  /** Letter and subtype only, e.g. "B8"; the class goes in its own field. Left out when accepting the suggestion. */
  spectralType?: string
  luminosityClass?: string
  /** MK peculiarity notes written after the class, e.g. "n", "e", "Si Sr". */
  peculiarities?: string
  notes?: string
  confidence: number
  uncertain?: boolean
  acceptedSuggestion: boolean
  /** Time on the item; from the caller's claim when not given. */
  secondsSpent?: number
  /** Set to record a correction of the caller's standing call (only while the spectrum waits for calls). */
  correctsCallId?: number
}

export interface RecordCallResult {
  call: CallView
  spectrum: { id: number; status: SpectrumStatus }
  outcome: 'waiting' | 'agreed' | 'disputed'
  callsSoFar: number
  callsRequired: number
  classification: FinalClassification | null
  dispute: { id: number } | null
}
