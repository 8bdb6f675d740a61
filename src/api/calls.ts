import type { SpectrumStatus } from '@shared/status'
import { http } from './http'

export interface PersonRef {
  id: number
  name: string
}

/** One measured classification line (server: measurements.service LineRow). */
export interface ReviewLine {
  id: string
  name: string
  wavelength: number
  family: string
  measured: boolean
  reason: string | null
  ew: number | null
  ewError: number | null
  depth: number | null
  fwhm: number | null
  centroid: number | null
  snr: number | null
  lorentzianFwhm: number | null
}

export interface MeasurementSummary {
  id: number
  pipelineVersion: string
  snr: number | null
  rv: number | null
  rvError: number | null
  pseudoContinuum: boolean
  warnings: string[]
  lines: ReviewLine[]
}

/** The pipeline's suggestion; candidates and votes are read leniently (see lib/reviewSuggestion.ts). */
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
  createdAt: string
}

export interface CallView {
  id: number
  kind: 'call' | 'correction'
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

export interface FinalClassification {
  id: number
  spectrumId: number
  source: 'consensus' | 'settled' | 'accepted-suggestion'
  spectralType: string
  typeCode: number
  luminosityClass: string
  classCode: number
  decidedBy: PersonRef | null
  decidedAt: string
  nCalls: number
  agreement: 'exact' | 'within' | 'settled'
  note: string
}

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

/** Everything the Spectrum review screen needs (server: review.service ReviewView). */
export interface ReviewData {
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
  /** Withheld under blind review until the caller has recorded a call (then `hidden`). */
  suggestion: SuggestionView | null
  hidden: boolean
  claim: { mine: boolean; by: PersonRef; expiresAt: string; live: boolean } | null
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

export interface CallInput {
  /** Letter and subtype only, e.g. "B8"; the class goes in its own field. Left out when accepting the suggestion. */
  spectralType?: string
  luminosityClass?: string
  peculiarities?: string
  notes: string
  confidence: number
  uncertain: boolean
  acceptedSuggestion: boolean
  secondsSpent?: number
  correctsCallId?: number
}

export interface CallResult {
  call: CallView
  spectrum: { id: number; status: SpectrumStatus }
  outcome: 'waiting' | 'agreed' | 'disputed'
  callsSoFar: number
  callsRequired: number
  classification: FinalClassification | null
  dispute: { id: number } | null
}

export type HistoryKind = 'upload' | 'measurement' | 'suggestion' | 'call' | 'correction' | 'dispute' | 'agreed' | 'settled'

/** One entry of a spectrum's history, oldest first (server: history.service HistoryEvent). */
export interface HistoryEvent {
  at: string
  kind: HistoryKind
  /** Null for the pipeline. */
  who: PersonRef | null
  summary: string
  suggestionShown?: boolean
  secondsSpent?: number | null
}

export const getReview = (spectrumId: number): Promise<ReviewData> => http.get<ReviewData>(`/spectra/${spectrumId}/review`)

export const recordCall = (spectrumId: number, input: CallInput): Promise<CallResult> => http.post<CallResult>(`/spectra/${spectrumId}/calls`, input)

export const getHistory = async (spectrumId: number): Promise<HistoryEvent[]> =>
  (await http.get<{ events: HistoryEvent[] }>(`/spectra/${spectrumId}/history`)).events
