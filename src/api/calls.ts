import type { LineRow, MeasurementSummary } from '@shared/api/measurements'
import { historyApi, type HistoryEvent } from '@shared/api/history'
import { reviewApi, type RecordCallInput, type RecordCallResult, type ReviewView } from '@shared/api/review'
import { call } from './http'

export type { HistoryEvent, HistoryKind } from '@shared/api/history'
export type { MeasurementSummary }
export type { CallView, FinalClassification, PersonRef, ReviewCampaign, SuggestionView } from '@shared/api/review'

/** One measured classification line. */
export type ReviewLine = LineRow
/** Everything the Spectrum review screen needs. */
export type ReviewData = ReviewView
export type CallInput = RecordCallInput
export type CallResult = RecordCallResult

export const getReview = (spectrumId: number): Promise<ReviewData> => call(reviewApi.view, { params: { id: spectrumId } })

export const recordCall = (spectrumId: number, input: CallInput): Promise<CallResult> => call(reviewApi.recordCall, { params: { id: spectrumId }, body: input })

export const getHistory = async (spectrumId: number): Promise<HistoryEvent[]> => (await call(historyApi.get, { params: { id: spectrumId } })).events
