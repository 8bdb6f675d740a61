import { historyApi, type HistoryEvent, type SpectrumHistory } from '@shared/api/history'
import type { LineRow } from '@shared/api/measurements'
import {
  spectraApi,
  type SpectrumCorrectionInput,
  type SpectrumDetail,
  type SpectrumList,
  type SpectrumListQuery as ListQueryFields,
  type SeriesQuery,
  type SpectrumSort,
  type SubmitFields as SubmitFieldsOf,
  type SubmitReply,
} from '@shared/api/spectra'
import type { SuggestionSummary } from '@shared/api/suggestions'
import { ApiError, NETWORK_ERROR, NETWORK_MESSAGE, call, currentCsrfToken, retryAfterSeconds, setCsrfToken, type ApiErrorDetails } from './http'
import { getSeries } from './series'

export type { SpectrumHistory }
export type { MeasurementSummary, SpectrumMeasurements } from '@shared/api/measurements'
export type {
  FileResult,
  HeaderValue,
  ReadChoices,
  ReadDecisions,
  SpectrumDetail,
  SpectrumList,
  SpectrumListItem,
  SpectrumPage,
  SpectrumSort,
  SpectrumSortField,
  SubmitReply,
  WavelengthUnitChoice,
} from '@shared/api/spectra'
export type { SpectrumSuggestions } from '@shared/api/suggestions'

/** One classification line's measurement; unmeasured lines carry a reason and nulls, never zeros. */
export type LineMeasurement = LineRow
/** The pipeline's suggested classification; candidates and votes are read leniently (see composables/useSpectrumSuggestion.ts). */
export type SpectrumSuggestion = SuggestionSummary
/** A history entry with what the server adds for each kind (the call, the decision, …). */
export type SpectrumHistoryEvent = HistoryEvent

/** One of the nearest standards the matcher found (server: match CandidateStandard). */
export interface SuggestionCandidate {
  standardId: number
  spectralType: string
  source?: 'model' | 'observed'
  /** Star name and library of an observed standard (suggestions from pipeline 2 on). */
  star?: string | null
  origin?: string | null
  chi2: number
  reducedChi2: number
  scale?: number
  probability: number
}

/** A list request as the screens build it (server: SpectrumListQuery); empty filters are left out when sent. */
export type SpectrumListQuery = Pick<ListQueryFields, 'page' | 'pageSize'> & Partial<Omit<ListQueryFields, 'page' | 'pageSize' | 'mine' | 'sort'>> & { sort?: SpectrumSort }

/** The query string values for a list request: empty filters are left out. */
export function listQueryParams(query: SpectrumListQuery): Record<string, string | number> {
  const out: Record<string, string | number> = { page: query.page, pageSize: query.pageSize }
  if (query.sort) out.sort = query.sort
  if (query.status) out.status = query.status
  if (query.campaign !== undefined) out.campaign = query.campaign
  if (query.instrument !== undefined) out.instrument = query.instrument
  const q = query.q?.trim()
  if (q) out.q = q
  if (query.from) out.from = query.from
  if (query.to) out.to = query.to
  if (query.snrMin !== undefined && Number.isFinite(query.snrMin)) out.snrMin = query.snrMin
  if (query.snrMax !== undefined && Number.isFinite(query.snrMax)) out.snrMax = query.snrMax
  return out
}

export const listSpectra = (query: SpectrumListQuery, signal?: AbortSignal): Promise<SpectrumList> => call(spectraApi.list, { query: listQueryParams(query) }, signal ? { signal } : {})

export const getSpectrum = (id: number) => call(spectraApi.get, { params: { id } })

/** Metadata as the forms send it: text as typed (empty clears); numbers as numbers, null to clear, absent to leave. */
export type SpectrumMetadataInput = Omit<SpectrumCorrectionInput, 'wavelengthMedium' | 'wavelengthUnit' | 'hdu' | 'aperture'>

/** How to read the stored file again: 'file' and null mean "as the file says" / automatic. */
export type ReadingCorrection = Pick<SpectrumCorrectionInput, 'wavelengthMedium' | 'wavelengthUnit' | 'hdu' | 'aperture'>

export const updateSpectrum = async (id: number, changes: SpectrumMetadataInput & ReadingCorrection): Promise<SpectrumDetail> =>
  (await call(spectraApi.update, { params: { id }, body: changes })).spectrum

/** Withdraws one's own spectrum before any call: the file and its results go. */
export const withdrawSpectrum = (id: number) => call(spectraApi.withdraw, { params: { id } })

export const getSpectrumHistory = (id: number): Promise<SpectrumHistory> => call(historyApi.get, { params: { id } })

export const processSpectrumAgain = (id: number) => call(spectraApi.process, { params: { id } })

/** A window of a series and the most points to send (server: SeriesQuery). */
export type SeriesRange = Partial<SeriesQuery>

function seriesQuery(range: SeriesRange): Record<string, string> {
  const query: Record<string, string> = {}
  if (range.from !== undefined) query.from = range.from.toFixed(3)
  if (range.to !== undefined) query.to = range.to.toFixed(3)
  query.maxPoints = String(Math.round(range.maxPoints ?? 4000))
  return query
}

/** The observed spectrum (wavelength, flux[, error]) between from and to, at most maxPoints points. */
export const getSpectrumData = (id: number, range: SeriesRange = {}, signal?: AbortSignal) => getSeries(`/spectra/${id}/data`, { query: seriesQuery(range), signal })

/** The prepared spectrum on the library grid: wavelength, flux, continuum, rectified. */
export const getPreparedData = (id: number, range: SeriesRange = {}, signal?: AbortSignal) => getSeries(`/spectra/${id}/prepared`, { query: seriesQuery(range), signal })

/** Batch metadata, as the multipart fields of POST /api/spectra (server: SubmitFields); numbers only, no clearing. */
export type SubmitFields = { [K in keyof SubmitFieldsOf]?: Exclude<SubmitFieldsOf[K], null> } & Pick<SubmitFieldsOf, 'campaignId' | 'wavelengthMedium'> & { batchId: string }

/** The multipart body for one file: the batch fields (empty ones left out) and the file. */
/** One file of an upload and the name the server sees. */
export interface UploadFile {
  file: Blob
  name: string
}

export function submitFormData(fields: SubmitFields, files: readonly UploadFile[]): FormData {
  const form = new FormData()
  for (const [key, value] of Object.entries(fields)) {
    if (value === undefined || value === null || value === '') continue
    form.append(key, String(value))
  }
  for (const f of files) form.append('files', f.file, f.name)
  return form
}

export interface UploadHandle {
  promise: Promise<SubmitReply>
  abort: () => void
}

/**
 * Sends a batch of files in one request with XMLHttpRequest, so its progress can be drawn (fetch
 * cannot report upload progress). Resolves with the per-file results (also on a 422 that carries
 * them); rejects with an ApiError otherwise, whose details carry `retryAfterSeconds` when the server
 * said when to try again.
 */
export function uploadSpectrumFiles(fields: SubmitFields, files: readonly UploadFile[], onProgress: (fraction: number) => void): UploadHandle {
  let xhr: XMLHttpRequest | null = null
  let aborted = false
  const send = (token: string) =>
    new Promise<{ status: number; body: unknown; retryAfter: number | null }>((resolve, reject) => {
      const req = new XMLHttpRequest()
      xhr = req
      req.open('POST', '/api/spectra')
      req.withCredentials = true
      req.responseType = 'text'
      req.setRequestHeader('accept', 'application/json')
      req.setRequestHeader('x-csrf-token', token)
      req.upload.onprogress = (e) => {
        if (e.lengthComputable && e.total > 0) onProgress(e.loaded / e.total)
      }
      req.onload = () => {
        let body: unknown = null
        try {
          body = req.responseText ? JSON.parse(req.responseText) : null
        } catch {
          // a proxy page
        }
        resolve({ status: req.status, body, retryAfter: retryAfterSeconds(req.getResponseHeader('retry-after')) })
      }
      req.onerror = () => reject(new ApiError(0, NETWORK_ERROR, NETWORK_MESSAGE))
      req.onabort = () => reject(new ApiError(0, 'aborted', 'The upload was stopped.'))
      req.send(submitFormData(fields, files))
    })

  const promise = (async (): Promise<SubmitReply> => {
    let reply = await send(await currentCsrfToken())
    const code = (reply.body as { error?: { code?: string } } | null)?.error?.code
    if (reply.status === 403 && code === 'csrf_failed' && !aborted) {
      setCsrfToken(null)
      reply = await send(await currentCsrfToken())
    }
    const body = reply.body as Partial<SubmitReply> & { error?: { code?: string; message?: string; details?: ApiErrorDetails | null } }
    if (reply.status >= 200 && reply.status < 300 && Array.isArray(body?.results)) return body as SubmitReply
    if (reply.status === 413) {
      throw new ApiError(413, 'file_too_large', body?.error?.message ?? 'This file is larger than the server accepts.')
    }
    const wait = reply.retryAfter === null ? {} : { retryAfterSeconds: reply.retryAfter }
    if (body?.error?.code) throw new ApiError(reply.status, body.error.code, body.error.message ?? `The server answered ${reply.status}.`, { ...(body.error.details ?? {}), ...wait })
    throw new ApiError(reply.status, `http_${reply.status}`, `The server answered ${reply.status}.`, reply.retryAfter === null ? null : wait)
  })()
  onProgress(0)
  return {
    promise,
    abort: () => {
      aborted = true
      ;(xhr as XMLHttpRequest | null)?.abort()
    },
  }
}
