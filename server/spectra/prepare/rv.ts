import { SPEED_OF_LIGHT_KMS, type LogGrid } from '../../../shared/grid'
import type { WavelengthRange } from '../../../shared/lines'
import type { Spectrum1D } from '../../../shared/spectrum'
import { assertSpectrum } from './guards'

export interface RadialVelocityOptions {
  /** The log-λ grid both spectra are sampled on. */
  grid: LogGrid
  /** Largest |v| searched, km/s. @default 1000 */
  maxVelocity?: number
  /** Wavelength range used, Å; the whole grid when absent. @default undefined */
  region?: WavelengthRange
  /**
   * Number of independent pixels for the error estimate; by default the count of overlapping good
   * pixels (an underestimate of the error when pixels are correlated). @default undefined
   */
  independentPixels?: number
}

export type RadialVelocityResult =
  | {
      found: true
      /** Radial velocity, km/s, optical convention λ_obs = λ_rest (1 + v/c). */
      velocity: number
      /** 1σ error, km/s (Zucker 2003). */
      error: number
      /** Normalised cross-correlation at the peak (−1…1). */
      peak: number
      /** Pixels that entered the correlation at the peak lag. */
      pixels: number
    }
  | { found: false; reason: string }

/**
 * Radial velocity by cross-correlating a continuum-normalised spectrum with a reference of known
 * velocity (zero) on the same log-λ grid, where a velocity is a constant pixel shift (Tonry & Davis
 * 1979, AJ 84, 1511). The line signal 1 − rectified flux, mean-subtracted over the region, is
 * correlated at every integer lag within ±maxVelocity (normalised per lag over the overlapping good
 * pixels). The peak is located to a fraction of a pixel with a three-point Gaussian fit (a parabola
 * through the logarithms; a plain parabola when a value is not positive). The error follows the
 * maximum-likelihood curvature formula of Zucker (2003, MNRAS 342, 1291):
 * σ² = −[N · C″/C · C²/(1 − C²)]⁻¹, with C″ the curvature of the correlation at the peak.
 *
 * @returns the velocity, or `found: false` with a reason when the peak sits at the search edge,
 * the correlation is not positive, or too few pixels overlap.
 */
export function measureSpectrumRadialVelocity(spectrum: Spectrum1D, reference: Spectrum1D, options: RadialVelocityOptions): RadialVelocityResult {
  assertSpectrum(spectrum)
  assertSpectrum(reference)
  const { grid, maxVelocity = 1000, region } = options
  const n = grid.length
  if (spectrum.flux.length !== n) throw new Error(`spectrum has ${spectrum.flux.length} pixels but the grid has ${n}`)
  if (reference.flux.length !== n) throw new Error(`reference has ${reference.flux.length} pixels but the grid has ${n}`)
  if (!(maxVelocity > 0 && maxVelocity < SPEED_OF_LIGHT_KMS)) throw new Error('maximum velocity must be between 0 and c')

  const lo = region ? Math.max(0, Math.ceil(Math.log(region[0] / grid.start) / grid.step)) : 0
  const hi = region ? Math.min(n - 1, Math.floor(Math.log(region[1] / grid.start) / grid.step)) : n - 1
  const a = lineSignal(spectrum, lo, hi, n)
  const b = lineSignal(reference, lo, hi, n)
  const maxLag = Math.ceil(Math.log(1 + maxVelocity / SPEED_OF_LIGHT_KMS) / grid.step) + 1
  const lags = 2 * maxLag + 1
  const ccf = new Float64Array(lags)
  const counts = new Float64Array(lags)
  for (let l = -maxLag; l <= maxLag; l++) {
    // Observed pixel i matches reference pixel i − l.
    let sab = 0
    let saa = 0
    let sbb = 0
    let count = 0
    const start = Math.max(lo, lo + l)
    const end = Math.min(hi, hi + l)
    for (let i = start; i <= end; i++) {
      const x = a[i]!
      const y = b[i - l]!
      if (Number.isNaN(x) || Number.isNaN(y)) continue
      sab += x * y
      saa += x * x
      sbb += y * y
      count++
    }
    ccf[l + maxLag] = saa > 0 && sbb > 0 ? sab / Math.sqrt(saa * sbb) : 0
    counts[l + maxLag] = count
  }
  let best = 0
  for (let k = 1; k < lags; k++) if (ccf[k]! > ccf[best]!) best = k
  const peakCount = counts[best]!
  if (peakCount < 20) return { found: false, reason: `only ${peakCount} pixels overlap the reference` }
  if (!(ccf[best]! > 0)) return { found: false, reason: 'the cross-correlation has no positive peak' }
  if (best === 0 || best === lags - 1) return { found: false, reason: `the correlation peak lies at the ±${maxVelocity} km/s search limit` }

  const ym = ccf[best - 1]!
  const y0 = ccf[best]!
  const yp = ccf[best + 1]!
  let offset: number
  if (ym > 0 && yp > 0) {
    const lm = Math.log(ym)
    const l0 = Math.log(y0)
    const lp = Math.log(yp)
    const d = lm - 2 * l0 + lp
    offset = d < 0 ? (0.5 * (lm - lp)) / d : 0
  } else {
    const d = ym - 2 * y0 + yp
    offset = d < 0 ? (0.5 * (ym - yp)) / d : 0
  }
  const curvature = ym - 2 * y0 + yp
  const peak = Math.min(y0 - 0.25 * (ym - yp) * offset, 0.999999)
  const shift = best - maxLag + offset
  const velocity = SPEED_OF_LIGHT_KMS * (Math.exp(shift * grid.step) - 1)
  const pixels = options.independentPixels ?? peakCount
  const variance = curvature < 0 ? -1 / (((pixels * curvature) / peak) * ((peak * peak) / (1 - peak * peak))) : Infinity
  const kmsPerPixel = SPEED_OF_LIGHT_KMS * grid.step * Math.exp(shift * grid.step)
  return { found: true, velocity, error: Math.sqrt(variance) * kmsPerPixel, peak, pixels: peakCount }
}

/** 1 − rectified flux, mean-subtracted over good pixels of [lo, hi]; NaN elsewhere. */
function lineSignal(spectrum: Spectrum1D, lo: number, hi: number, n: number): Float64Array {
  const out = new Float64Array(n).fill(Number.NaN)
  let sum = 0
  let count = 0
  for (let i = lo; i <= hi; i++) {
    const f = spectrum.flux[i]!
    if ((spectrum.mask && spectrum.mask[i] !== 0) || !Number.isFinite(f)) continue
    out[i] = 1 - f
    sum += 1 - f
    count++
  }
  const mean = count > 0 ? sum / count : 0
  for (let i = lo; i <= hi; i++) if (!Number.isNaN(out[i]!)) out[i] = out[i]! - mean
  return out
}

export interface ShiftOptions {
  /** Radial velocity to remove, km/s (optical convention). */
  velocity: number
}

/**
 * Moves a spectrum to its rest frame: λ_rest = λ_obs / (1 + v/c) (optical convention, the one a
 * log-λ cross-correlation measures). Flux, error and mask are shared with the input.
 */
export function shiftSpectrumToRest(spectrum: Spectrum1D, options: ShiftOptions): Spectrum1D {
  assertSpectrum(spectrum)
  const { velocity } = options
  if (!(Math.abs(velocity) < SPEED_OF_LIGHT_KMS)) throw new Error('velocity must be finite and below c')
  const factor = 1 / (1 + velocity / SPEED_OF_LIGHT_KMS)
  const wavelength = new Float64Array(spectrum.wavelength.length)
  for (let i = 0; i < wavelength.length; i++) wavelength[i] = spectrum.wavelength[i]! * factor
  return { ...spectrum, wavelength }
}
