import type { StandardSummary } from '@shared/api/standards'
import { http } from './http'
import { getSeries } from './series'

/** A standard star, as far as choosing an overlay needs it. */
export type OverlayStandardSummary = Pick<StandardSummary, 'id' | 'spectralType' | 'typeCode' | 'luminosityClass' | 'classCode' | 'source' | 'retiredAt'>

/**
 * Points asked for on the library's log-λ grid: enough for every pixel of the default grid (6 377),
 * so a zoomed plot draws the real pixels, never the steps of min–max decimation.
 */
export const LIBRARY_GRID_POINTS = 8000

/** The prepared (rest-frame, rectified) spectrum: wavelength, flux, continuum, rectified. */
export const fetchPrepared = (spectrumId: number, maxPoints = LIBRARY_GRID_POINTS) => getSeries(`/spectra/${spectrumId}/prepared`, { query: { maxPoints } })

/** A standard's rectified series on the library grid. */
export const fetchStandardSeries = (standardId: number, maxPoints = LIBRARY_GRID_POINTS) => getSeries(`/standards/${standardId}/data`, { query: { maxPoints } })

/** Every standard still in use (any library version), for overlays. */
export async function listOverlayStandards(): Promise<OverlayStandardSummary[]> {
  const body = await http.get<{ standards?: Array<Partial<OverlayStandardSummary>> }>('/standards')
  return (body.standards ?? [])
    .filter((s): s is OverlayStandardSummary => typeof s.id === 'number' && typeof s.typeCode === 'number' && typeof s.classCode === 'number' && !s.retiredAt)
    .map((s) => ({ id: s.id, spectralType: s.spectralType ?? '', typeCode: s.typeCode, luminosityClass: s.luminosityClass ?? '', classCode: s.classCode, source: s.source === 'observed' ? 'observed' : 'model', retiredAt: null }))
}
