import type { HistoryEvent } from '@shared/api/history'
import type { LineRow, MeasurementSummary } from '@shared/api/measurements'
import type { RecordCallInput, RecordCallResult, ReviewView } from '@shared/api/review'
import { http } from './http'

export type { HistoryEvent, HistoryKind } from '@shared/api/history'
export type { MeasurementSummary }
export type { CallView, FinalClassification, PersonRef, ReviewCampaign, SuggestionView } from '@shared/api/review'

/** One measured classification line. */
export type ReviewLine = LineRow
/** Everything the Spectrum review screen needs. */
export type ReviewData = ReviewView
export type CallInput = RecordCallInput
export type CallResult = RecordCallResult

export const getReview = (spectrumId: number): Promise<ReviewData> => http.get<ReviewData>(`/spectra/${spectrumId}/review`)

export const recordCall = (spectrumId: number, input: CallInput): Promise<CallResult> => http.post<CallResult>(`/spectra/${spectrumId}/calls`, input)

export const getHistory = async (spectrumId: number): Promise<HistoryEvent[]> =>
  (await http.get<{ events: HistoryEvent[] }>(`/spectra/${spectrumId}/history`)).events
