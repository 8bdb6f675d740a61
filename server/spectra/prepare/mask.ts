import type { Spectrum1D } from '../../../shared/spectrum'
import { assertSpectrum } from './guards'
import { medianInPlace } from './stats'

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

export interface SpikeOptions {
  /** Excess over the running median, in robust σ of the excesses around it, from which a pixel can be a spike. @default 6 */
  threshold?: number
  /** Share of its excess by which a spike must stand above its neighbours (one pixel) or the pair's outer neighbours (two). @default 0.6 */
  prominence?: number
  /** Least excess as a share of the running median: what is smaller changes no measurement, and noiseless data have σ near 0. @default 0.05 */
  minExcess?: number
}

/** Pixels per block in which the robust σ of the excesses is taken (noise changes along a spectrum). */
const SPIKE_BLOCK = 128
/** Half-width of the running median a spike's excess is taken against, pixels. */
const SPIKE_MEDIAN = 7
/** Pixels either side of a spike (or pair) that it must stand above. */
const SPIKE_RING = 4

/**
 * Masks cosmic-ray hits: one or two pixels far above the running median of the 15 pixels about them
 * (more than `threshold` robust σ of the excesses in their block, and `minExcess` of the median) that
 * stand above every pixel within 4 either side by more than `prominence` of their excess. A resolved
 * line (2.5 pixels FWHM or more) has neighbours within 0.4 of its excess of its peak, and a peak of
 * continuum between crowded lines has others near it, so only features narrower than the resolution
 * go (common practice: an unresolved spike in a spectrum sampled at two or more pixels per
 * resolution element cannot be light from the star). Only positive spikes: a deep narrow core is kept.
 * Up to three passes. Returns the spectrum with those pixels added to its mask, and their number.
 */
export function maskSpectrumSpikes(spectrum: Spectrum1D, options: SpikeOptions = {}): { spectrum: Spectrum1D; count: number } {
  // Again once spikes are masked: one next to another fails the test while the other stands beside it.
  let current = spectrum
  let count = 0
  for (let pass = 0; pass < 3; pass++) {
    const found = spikePass(current, options)
    if (found.count === 0) break
    current = found.spectrum
    count += found.count
  }
  return { spectrum: current, count }
}

function spikePass(spectrum: Spectrum1D, options: SpikeOptions): { spectrum: Spectrum1D; count: number } {
  const { threshold = 6, prominence = 0.6, minExcess = 0.05 } = options
  const { flux } = spectrum
  const n = flux.length
  const ok = new Uint8Array(n)
  for (let i = 0; i < n; i++) ok[i] = Number.isFinite(flux[i]!) && !(spectrum.mask !== undefined && spectrum.mask[i] !== 0) ? 1 : 0
  const good = (i: number) => i >= 0 && i < n && ok[i] === 1
  // Robust σ per block of what a spike is measured against: the pixel minus the mean of those two away
  // (noise and the structure of lines at the scale of a few pixels, as the median's excess sees them).
  const sigma = new Float64Array(Math.ceil(n / SPIKE_BLOCK))
  const block = new Float64Array(SPIKE_BLOCK)
  for (let b = 0; b < sigma.length; b++) {
    let k = 0
    for (let i = Math.max(2, b * SPIKE_BLOCK); i < Math.min(n - 2, (b + 1) * SPIKE_BLOCK); i++) if (ok[i] && ok[i - 2] && ok[i + 2]) block[k++] = Math.abs(flux[i]! - (flux[i - 2]! + flux[i + 2]!) / 2)
    sigma[b] = k >= 16 ? 1.4826 * medianInPlace(block, k) : Number.NaN
  }
  // A spike stands above its sides by more than prominence × threshold σ (its excess is above
  // threshold σ, and it stands above its ring by prominence of that): only such pixels are measured.
  // Flux with −∞ for unusable pixels and two of padding either side: no bounds or mask tests in the scan.
  const padded = new Float64Array(n + 4).fill(Number.NEGATIVE_INFINITY)
  for (let i = 0; i < n; i++) if (ok[i]) padded[i + 2] = flux[i]!
  const candidates: number[] = []
  for (let b = 0; b < sigma.length; b++) {
    const least = prominence * threshold * sigma[b]!
    if (!(least >= 0)) continue
    for (let i = b * SPIKE_BLOCK, end = Math.min(n, (b + 1) * SPIKE_BLOCK); i < end; i++) {
      const f = padded[i + 2]!
      if (f === Number.NEGATIVE_INFINITY) continue
      const left = padded[i + 1]!
      const right = padded[i + 3]!
      if (f - (left > right ? left : right) > least || Math.min(f, right) - Math.max(left, padded[i + 4]!) > least) candidates.push(i)
    }
  }
  const excess = new Float64Array(n).fill(Number.NaN)
  const median = new Float64Array(n).fill(Number.NaN)
  const window = new Float64Array(2 * SPIKE_MEDIAN + 1)
  const measure = (i: number) => {
    if (median[i] === median[i]) return
    let k = 0
    for (let j = i - SPIKE_MEDIAN; j <= i + SPIKE_MEDIAN; j++) if (good(j)) window[k++] = flux[j]!
    if (k < SPIKE_MEDIAN + 1) return
    median[i] = medianInPlace(window, k)
    excess[i] = flux[i]! - median[i]!
  }
  const high = (i: number) => {
    if (!good(i)) return false
    measure(i)
    return excess[i]! > Math.max(threshold * sigma[Math.floor(i / SPIKE_BLOCK)]!, minExcess * Math.abs(median[i]!))
  }
  /**
   * Highest good flux of the SPIKE_RING pixels before `from` and after `to`, leaving out those
   * beyond the adjacent ones that are themselves high: another hit two pixels away does not shield
   * one, while a resolved line's own wings, adjacent and high, do.
   */
  const ring = (from: number, to: number) => {
    let top = Number.NEGATIVE_INFINITY
    for (let d = 1; d <= SPIKE_RING; d++) {
      for (const j of [from - d, to + d]) if (good(j) && (d === 1 || !high(j))) top = Math.max(top, flux[j]!)
    }
    return top
  }
  /**
   * Whether the pixels either side of `from`…`to` sit more than 1 − prominence of the way up from
   * the lowest of the ring to `top`: the shoulders of a resolved peak, such as the continuum between
   * the Na D lines of a supergiant, which the median of its surroundings underrates.
   */
  const shouldered = (from: number, to: number, top: number) => {
    let low = Number.POSITIVE_INFINITY
    for (let d = 1; d <= SPIKE_RING; d++) for (const j of [from - d, to + d]) if (good(j)) low = Math.min(low, flux[j]!)
    const sides = Math.min(good(from - 1) ? flux[from - 1]! : low, good(to + 1) ? flux[to + 1]! : low)
    return sides - low > (1 - prominence) * (top - low)
  }
  const mask = spectrum.mask ? Uint8Array.from(spectrum.mask) : new Uint8Array(n)
  let count = 0
  let last = -1
  for (const i of candidates) {
    if (i <= last || !high(i)) continue
    if (flux[i]! - ring(i, i) > prominence * excess[i]! && !shouldered(i, i, flux[i]!)) {
      mask[i] = 1
      count++
    } else if (high(i + 1) && Math.min(flux[i]!, flux[i + 1]!) - ring(i, i + 1) > prominence * Math.min(excess[i]!, excess[i + 1]!) && !shouldered(i, i + 1, Math.min(flux[i]!, flux[i + 1]!))) {
      mask[i] = 1
      mask[i + 1] = 1
      count += 2
      last = i + 1
    }
  }
  return { spectrum: count > 0 ? { ...spectrum, mask } : spectrum, count }
}
