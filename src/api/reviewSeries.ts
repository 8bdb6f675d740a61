import { decodeSeries, parseSeriesLayout, type DecodedSeries } from '@/lib/series'
import { ApiError, NETWORK_ERROR, NETWORK_MESSAGE, http } from './http'

/** A standard star, as far as choosing an overlay needs it. */
export interface OverlayStandardSummary {
  id: number
  spectralType: string
  typeCode: number
  luminosityClass: string
  classCode: number
  source: 'model' | 'observed'
  retiredAt: string | null
}

async function fetchSeries(path: string, query: Record<string, number | undefined> = {}): Promise<DecodedSeries> {
  const params = new URLSearchParams()
  for (const [k, v] of Object.entries(query)) if (v !== undefined) params.set(k, String(v))
  const qs = params.toString()
  let response: Response
  try {
    response = await fetch(`/api${path}${qs ? `?${qs}` : ''}`, { credentials: 'same-origin', headers: { accept: 'application/octet-stream, application/json' } })
  } catch {
    throw new ApiError(0, NETWORK_ERROR, NETWORK_MESSAGE)
  }
  if (!response.ok) {
    let message = response.statusText || `The server answered ${response.status}.`
    let code = `http_${response.status}`
    try {
      const body = (await response.json()) as { error?: { code?: string; message?: string } }
      if (body.error?.message) message = body.error.message
      if (body.error?.code) code = body.error.code
    } catch {
      // not JSON
    }
    throw new ApiError(response.status, code, message)
  }
  try {
    return decodeSeries(await response.arrayBuffer(), parseSeriesLayout(response.headers.get('x-series-layout')))
  } catch (e) {
    throw new ApiError(0, 'bad_series', e instanceof Error ? e.message : String(e))
  }
}

/** The prepared (rest-frame, rectified) spectrum: wavelength, flux, continuum, rectified. */
export const fetchPrepared = (spectrumId: number, maxPoints = 6000) => fetchSeries(`/spectra/${spectrumId}/prepared`, { maxPoints })

/** A standard's rectified series on the library grid. */
export const fetchStandardSeries = (standardId: number, maxPoints = 6000) => fetchSeries(`/standards/${standardId}/data`, { maxPoints })

/** Every standard still in use (any library version), for overlays. */
export async function listOverlayStandards(): Promise<OverlayStandardSummary[]> {
  const body = await http.get<{ standards?: Array<Partial<OverlayStandardSummary>> }>('/standards')
  return (body.standards ?? [])
    .filter((s): s is OverlayStandardSummary => typeof s.id === 'number' && typeof s.typeCode === 'number' && typeof s.classCode === 'number' && !s.retiredAt)
    .map((s) => ({ id: s.id, spectralType: s.spectralType ?? '', typeCode: s.typeCode, luminosityClass: s.luminosityClass ?? '', classCode: s.classCode, source: s.source === 'observed' ? 'observed' : 'model', retiredAt: null }))
}
