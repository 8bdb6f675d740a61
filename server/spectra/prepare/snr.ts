import type { WavelengthRange } from '../../../shared/lines'
import type { Spectrum1D } from '../../../shared/spectrum'
import { assertSpectrum, isGoodPixel } from './guards'
import { lowerBound, medianInPlace } from './stats'

/** 1.482602 / √6: turns the median absolute second difference into a Gaussian σ (Stoehr et al. 2008). */
const DER_SNR_SCALE = 1.482602 / Math.sqrt(6)

export interface SnrOptions {
  /** Wavelength range to use, Å; the whole spectrum when absent. @default undefined */
  region?: WavelengthRange
}

/**
 * Signal-to-noise ratio per pixel by DER_SNR (Stoehr, Seaman & Zender 2008, ASP Conf. Ser. 394, 505):
 * S = median(f), N = 1.482602/√6 · median(|2fᵢ − fᵢ₋₂ − fᵢ₊₂|). Like the authors' reference code,
 * pixels that cannot be used (here: masked, non-finite or exactly zero flux) are dropped first and
 * the remaining pixels are treated as contiguous.
 *
 * Works on the spectrum as observed: on a resampled (oversampled) spectrum neighbouring pixels are
 * correlated and DER_SNR overestimates the S/N, so run it before rebinning.
 *
 * @returns S/N per pixel; Infinity for noiseless data; null when fewer than 5 usable pixels remain.
 */
export function estimateSpectrumSnr(spectrum: Spectrum1D, options: SnrOptions = {}): number | null {
  assertSpectrum(spectrum)
  const scratch = new Float64Array(spectrum.wavelength.length)
  return derSnr(spectrum, options.region, scratch, new Float64Array(spectrum.wavelength.length))
}

/**
 * S/N per pixel from the file's own errors: the median of flux/σ over the usable pixels of `region`
 * (pixels with a non-positive or non-finite σ left out). This is what the errors say, where
 * DER_SNR, which takes the noise from second differences, reads unresolved lines as noise and so
 * underestimates the S/N of spectra sampled at about two pixels per resolution element.
 * @returns null when the spectrum has no errors or fewer than 5 usable pixels
 */
export function spectrumSnrFromErrors(spectrum: Spectrum1D, options: SnrOptions = {}): number | null {
  assertSpectrum(spectrum)
  const { wavelength, flux, error } = spectrum
  if (!error) return null
  const lo = options.region ? options.region[0] : -Infinity
  const hi = options.region ? options.region[1] : Infinity
  const ratios = new Float64Array(wavelength.length)
  let m = 0
  for (let i = 0; i < wavelength.length; i++) {
    const w = wavelength[i]!
    const e = error[i]!
    if (w < lo || w > hi || !isGoodPixel(spectrum, i) || !(e > 0) || !Number.isFinite(e)) continue
    ratios[m++] = flux[i]! / e
  }
  if (m < 5) return null
  return medianInPlace(ratios, m)
}

export interface SnrByWindowOptions {
  /** Wavelength ranges, Å; one S/N per range. */
  windows: readonly WavelengthRange[]
}

/** DER_SNR ({@link estimateSpectrumSnr}) in each of several windows; null where a window has too few pixels. */
export function estimateSpectrumSnrByWindow(spectrum: Spectrum1D, options: SnrByWindowOptions): (number | null)[] {
  assertSpectrum(spectrum)
  const n = spectrum.wavelength.length
  const good = new Float64Array(n)
  const scratch = new Float64Array(n)
  return options.windows.map((window) => derSnr(spectrum, window, good, scratch))
}

function derSnr(spectrum: Spectrum1D, region: WavelengthRange | undefined, good: Float64Array, scratch: Float64Array): number | null {
  const { wavelength, flux } = spectrum
  const hi = region ? region[1] : Infinity
  let m = 0
  // Wavelengths ascend (assertSpectrum): only the window's pixels are visited, not the whole spectrum per window.
  for (let i = region ? lowerBound(wavelength, region[0]) : 0; i < wavelength.length && wavelength[i]! <= hi; i++) {
    if (!isGoodPixel(spectrum, i) || flux[i] === 0) continue
    good[m++] = flux[i]!
  }
  if (m < 5) return null
  for (let i = 2; i < m - 2; i++) scratch[i - 2] = Math.abs(2 * good[i]! - good[i - 2]! - good[i + 2]!)
  const noise = DER_SNR_SCALE * medianInPlace(scratch, m - 4)
  const signal = medianInPlace(good, m)
  // Noiseless (made-up) data: no noise to measure, so the S/N is unbounded.
  if (noise === 0 && signal > 0) return Infinity
  if (!(noise > 0)) return null
  return signal / noise
}
