import type { StandardSummary } from '@shared/api/standards'
import { http } from './http'
import { getSeries } from './series'

/** A standard star, as far as choosing an overlay needs it. */
export type OverlayStandardSummary = Pick<StandardSummary, 'id' | 'spectralType' | 'typeCode' | 'luminosityClass' | 'classCode' | 'source' | 'retiredAt'>

/** The prepared (rest-frame, rectified) spectrum: wavelength, flux, continuum, rectified. */
export const fetchPrepared = (spectrumId: number, maxPoints = 6000) => getSeries(`/spectra/${spectrumId}/prepared`, { query: { maxPoints } })

/** A standard's rectified series on the library grid. */
export const fetchStandardSeries = (standardId: number, maxPoints = 6000) => getSeries(`/standards/${standardId}/data`, { query: { maxPoints } })

/** Every standard still in use (any library version), for overlays. */
export async function listOverlayStandards(): Promise<OverlayStandardSummary[]> {
  const body = await http.get<{ standards?: Array<Partial<OverlayStandardSummary>> }>('/standards')
  return (body.standards ?? [])
    .filter((s): s is OverlayStandardSummary => typeof s.id === 'number' && typeof s.typeCode === 'number' && typeof s.classCode === 'number' && !s.retiredAt)
    .map((s) => ({ id: s.id, spectralType: s.spectralType ?? '', typeCode: s.typeCode, luminosityClass: s.luminosityClass ?? '', classCode: s.classCode, source: s.source === 'observed' ? 'observed' : 'model', retiredAt: null }))
}
