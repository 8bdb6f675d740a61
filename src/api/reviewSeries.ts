import { standardsApi, type StandardSummary } from '@shared/api/standards'
import { call } from './http'
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
  const { standards } = await call(standardsApi.library)
  return standards
    .filter((s) => !s.retiredAt)
    .map(({ id, spectralType, typeCode, luminosityClass, classCode, source, retiredAt }) => ({ id, spectralType, typeCode, luminosityClass, classCode, source, retiredAt }))
}
