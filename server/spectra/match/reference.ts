import type { Spectrum1D } from '../../../shared/spectrum'
import { gridWavelengths } from '../../../shared/grid'
import type { LibraryLevel, PreparedMatchLibrary } from './library'

/**
 * A standard of a prepared library as a full-grid spectrum (continuum 1 outside the stored span),
 * for use as the radial-velocity reference of analyseSpectrum.
 * @param row row of the standard in `level.rows`
 */
export function standardOnGrid(library: PreparedMatchLibrary, level: LibraryLevel, row: number): Spectrum1D {
  const flux = new Float64Array(library.grid.length).fill(1)
  const slice = level.flux.subarray(row * library.pixels, (row + 1) * library.pixels)
  for (let i = 0; i < library.pixels; i++) {
    const v = slice[i]!
    flux[i + library.offset] = Number.isFinite(v) ? v : 1
  }
  return { wavelength: gridWavelengths(library.grid), flux }
}
