import { gridWavelength, type LogGrid } from '../../../shared/grid'
import type { Spectrum1D } from '../../../shared/spectrum'
import { assertSpectrum } from './guards'

const FWHM_PER_SIGMA = 2 * Math.sqrt(2 * Math.LN2)

export interface SmoothOptions {
  /** The log-λ grid the spectrum is sampled on. */
  grid: LogGrid
  /** Resolution to reach, FWHM in Å (constant in Å across the spectrum). */
  targetFwhm: number
  /** Resolution of the input, FWHM in Å. */
  inputFwhm: number
  /** Pixels that share one kernel; the kernel width is recomputed block by block. @default 64 */
  blockPixels?: number
}

/**
 * Degrades a spectrum on a log-λ grid to a coarser resolution by convolving with a Gaussian of
 * FWHM √(target² − input²) Å. On a log grid a constant Å width is a width in velocity that falls
 * with wavelength, so the kernel (in pixels, σ = FWHM/(2√(2 ln 2)·λ·Δlnλ)) is recomputed for each
 * block of pixels. Masked pixels are left out and the kernel renormalised over the rest (normalised
 * convolution); output pixels with less than half the kernel weight on good pixels are masked.
 * Errors propagate as σ_out = √Σ(kⱼσⱼ)² / Σkⱼ.
 *
 * When the input is already as broad as the target (input ≥ target) the spectrum is returned
 * unchanged (copied): convolution cannot sharpen it.
 */
export function smoothSpectrumToFwhm(spectrum: Spectrum1D, options: SmoothOptions): Spectrum1D {
  assertSpectrum(spectrum)
  const { grid, targetFwhm, inputFwhm, blockPixels = 64 } = options
  const n = spectrum.wavelength.length
  if (n !== grid.length) throw new Error(`spectrum has ${n} pixels but the grid has ${grid.length}`)
  if (!(targetFwhm > 0)) throw new Error('target FWHM must be positive')
  if (!(inputFwhm >= 0)) throw new Error('input FWHM must be zero or positive')
  const { flux, error, mask } = spectrum
  const outFlux = new Float64Array(n)
  const outError = error ? new Float64Array(n) : undefined
  const outMask = new Uint8Array(n)
  if (inputFwhm >= targetFwhm) {
    outFlux.set(flux)
    if (outError && error) outError.set(error)
    if (mask) outMask.set(mask)
    return { wavelength: spectrum.wavelength, flux: outFlux, ...(outError ? { error: outError } : {}), mask: outMask }
  }
  const kernelFwhm = Math.sqrt(targetFwhm * targetFwhm - inputFwhm * inputFwhm)
  const maxSigma = kernelFwhm / FWHM_PER_SIGMA / (grid.start * grid.step)
  const kernel = new Float64Array(2 * Math.ceil(4 * maxSigma) + 1)

  for (let start = 0; start < n; start += blockPixels) {
    const end = Math.min(n, start + blockPixels)
    const sigma = kernelFwhm / FWHM_PER_SIGMA / (gridWavelength(grid, (start + end - 1) / 2) * grid.step)
    const half = Math.ceil(4 * sigma)
    let full = 0
    for (let k = -half; k <= half; k++) {
      const v = Math.exp(-0.5 * (k / sigma) ** 2)
      kernel[k + half] = v
      full += v
    }
    for (let i = start; i < end; i++) {
      let sumK = 0
      let sumF = 0
      let sumV = 0
      const lo = Math.max(0, i - half)
      const hi = Math.min(n - 1, i + half)
      for (let j = lo; j <= hi; j++) {
        if ((mask && mask[j] !== 0) || !Number.isFinite(flux[j]!)) continue
        const k = kernel[j - i + half]!
        sumK += k
        sumF += k * flux[j]!
        if (error) {
          const e = k * error[j]!
          sumV += e * e
        }
      }
      if (sumK < 0.5 * full) {
        outFlux[i] = Number.NaN
        if (outError) outError[i] = Number.NaN
        outMask[i] = 1
        continue
      }
      outFlux[i] = sumF / sumK
      if (outError) outError[i] = Math.sqrt(sumV) / sumK
    }
  }
  return { wavelength: spectrum.wavelength, flux: outFlux, ...(outError ? { error: outError } : {}), mask: outMask }
}
