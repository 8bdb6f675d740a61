import type { Spectrum1D } from '../../../shared/spectrum'
import { assertSpectrum } from './guards'

export interface MaskOptions {
  /** Extra per-pixel flags from the file (non-zero = bad), e.g. a data-quality column. @default undefined */
  flagged?: ArrayLike<number>
  /** Also mask pixels whose error is zero or negative (they would get infinite weight). @default true */
  maskNonPositiveError?: boolean
}

/**
 * Marks unusable pixels: non-finite flux, non-finite (or, by default, non-positive) error, and any
 * pixel flagged by the caller. Existing mask bits are kept. Returns a new spectrum that always has
 * a mask; flux and error are shared with the input (they are not changed).
 */
export function maskSpectrumBadPixels(spectrum: Spectrum1D, options: MaskOptions = {}): Spectrum1D {
  assertSpectrum(spectrum)
  const { flagged, maskNonPositiveError = true } = options
  const n = spectrum.wavelength.length
  if (flagged && flagged.length !== n) throw new Error(`flags have ${flagged.length} values but wavelength has ${n}`)
  const mask = new Uint8Array(n)
  const { flux, error } = spectrum
  for (let i = 0; i < n; i++) {
    let bad = spectrum.mask !== undefined && spectrum.mask[i] !== 0
    if (!Number.isFinite(flux[i]!)) bad = true
    if (error) {
      const e = error[i]!
      if (!Number.isFinite(e) || (maskNonPositiveError && e <= 0)) bad = true
    }
    if (flagged && flagged[i] !== 0) bad = true
    mask[i] = bad ? 1 : 0
  }
  return { wavelength: spectrum.wavelength, flux, ...(error ? { error } : {}), mask }
}

/** Number of masked pixels. */
export function countMaskedPixels(spectrum: Spectrum1D): number {
  if (!spectrum.mask) return 0
  let count = 0
  for (let i = 0; i < spectrum.mask.length; i++) if (spectrum.mask[i] !== 0) count++
  return count
}
