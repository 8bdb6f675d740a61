import { gridWavelengths, type LogGrid } from '../../../shared/grid'
import type { Spectrum1D } from '../../../shared/spectrum'
import { assertSpectrum, isGoodPixel } from './guards'

export interface RebinOptions {
  /** Target log-λ grid. */
  grid: LogGrid
  /**
   * Fraction of an output pixel that good input pixels must cover for it to be kept; pixels
   * below are masked (flux and error NaN). @default 0.5
   */
  minCoverage?: number
}

/**
 * Resamples a spectrum onto a log-λ grid conserving flux: the input is treated as constant across
 * each input pixel (edges half-way between centres) and each output pixel gets the mean flux
 * density over its extent, as in SpectRes (Carnall 2017, arXiv:1705.05165) and specutils's
 * FluxConservingResampler. Errors propagate as σ_out = √Σ(wⱼσⱼ)² / Σwⱼ with wⱼ the overlap (Å);
 * masked input pixels are left out and the remaining overlap renormalised.
 *
 * When the grid is finer than the input, neighbouring output pixels share an input pixel, so their
 * errors are correlated: see {@link rebinNoiseCorrelation}.
 *
 * @returns a new spectrum on the grid's wavelengths with flux, error (when the input has one) and mask.
 */
export function rebinSpectrumToLogGrid(spectrum: Spectrum1D, options: RebinOptions): Spectrum1D {
  assertSpectrum(spectrum, 2)
  const { grid, minCoverage = 0.5 } = options
  const { wavelength: w, flux, error } = spectrum
  const n = w.length
  const outWave = gridWavelengths(grid)
  const outFlux = new Float64Array(grid.length)
  const outError = error ? new Float64Array(grid.length) : undefined
  const outMask = new Uint8Array(grid.length)
  const half = Math.exp(grid.step / 2)
  const inLo = w[0]! - (w[1]! - w[0]!) / 2
  const inHi = w[n - 1]! + (w[n - 1]! - w[n - 2]!) / 2

  let j = 0
  for (let i = 0; i < grid.length; i++) {
    const a = outWave[i]! / half
    const b = outWave[i]! * half
    if (b <= inLo || a >= inHi) {
      markEmpty(i, outFlux, outError, outMask)
      continue
    }
    // Advance j to the first input pixel whose upper edge is above a.
    while (j < n - 1 && upperEdge(w, j, n) <= a) j++
    let sumF = 0
    let sumV = 0
    let covered = 0
    for (let k = j; k < n; k++) {
      const lo = lowerEdge(w, k)
      if (lo >= b) break
      const overlap = Math.min(b, upperEdge(w, k, n)) - Math.max(a, lo)
      if (overlap <= 0 || !isGoodPixel(spectrum, k)) continue
      sumF += flux[k]! * overlap
      if (error) {
        const e = error[k]! * overlap
        sumV += e * e
      }
      covered += overlap
    }
    if (covered < minCoverage * (b - a) || covered === 0) {
      markEmpty(i, outFlux, outError, outMask)
      continue
    }
    outFlux[i] = sumF / covered
    if (outError) outError[i] = Math.sqrt(sumV) / covered
  }
  return { wavelength: outWave, flux: outFlux, ...(outError ? { error: outError } : {}), mask: outMask }
}

/**
 * How many output pixels share one input pixel's noise when rebinning from `spectrum` onto `grid`
 * near wavelength λ: the input pixel width over the grid pixel width, at least 1. Measurements
 * that sum errors over many pixels multiply the variance by this (exact for block-correlated noise).
 */
export function rebinNoiseCorrelation(spectrum: Spectrum1D, grid: LogGrid, wavelength: number): number {
  const w = spectrum.wavelength
  const n = w.length
  if (n < 2) return 1
  let lo = 0
  let hi = n - 1
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1
    if (w[mid]! < wavelength) lo = mid
    else hi = mid
  }
  const inputWidth = w[hi]! - w[lo]!
  const gridWidth = wavelength * grid.step
  return Math.max(1, inputWidth / gridWidth)
}

function lowerEdge(w: Float64Array, k: number): number {
  return k === 0 ? w[0]! - (w[1]! - w[0]!) / 2 : (w[k - 1]! + w[k]!) / 2
}

function upperEdge(w: Float64Array, k: number, n: number): number {
  return k === n - 1 ? w[n - 1]! + (w[n - 1]! - w[n - 2]!) / 2 : (w[k]! + w[k + 1]!) / 2
}

function markEmpty(i: number, flux: Float64Array, error: Float64Array | undefined, mask: Uint8Array): void {
  flux[i] = Number.NaN
  if (error) error[i] = Number.NaN
  mask[i] = 1
}
