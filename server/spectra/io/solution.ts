/**
 * What an explicit wavelength array looks like, and the merging of echelle orders: the
 * "calibration" side of the readers. Straight-line fits of λ and log10 λ against the pixel index
 * use ml-regression's least squares.
 */
import { PolynomialRegression } from 'ml-regression'
import { SPEED_OF_LIGHT_KMS } from '../../../shared/grid'
import { kthSmallest } from '../prepare/stats'

/** Points used for a fit: a regular subsample is as good as every pixel for a straight line. */
const FIT_POINTS = 400

export interface DispersionFit {
  kind: 'linear' | 'log-linear' | 'non-linear'
  /** Å per pixel (linear), km/s per pixel (log-linear), or the median Å per pixel. */
  step: number
  /** Largest deviation from the fitted line, Å. */
  maxResidual: number
}

function subsample(n: number): number[] {
  const stride = Math.max(1, Math.floor(n / FIT_POINTS))
  const idx: number[] = []
  for (let i = 0; i < n; i += stride) idx.push(i)
  if (idx[idx.length - 1] !== n - 1) idx.push(n - 1)
  return idx
}

/**
 * Fits λ(i) and log10 λ(i) with straight lines (least squares, ml-regression) and says which
 * describes the array: a linear or log-linear dispersion when the worst residual is below a
 * hundredth of a pixel, otherwise non-linear with the median step.
 * @param wavelength ascending or descending wavelengths, Å, all finite and positive
 */
export function fitDispersion(wavelength: Float64Array): DispersionFit {
  const n = wavelength.length
  const idx = subsample(n)
  const x = idx.map(Number)
  const y = idx.map((i) => wavelength[i]!)
  const steps = new Float64Array(n - 1)
  for (let i = 1; i < n; i++) steps[i - 1] = Math.abs(wavelength[i]! - wavelength[i - 1]!)
  // The value a sort puts in the middle, found by selection.
  const medianStep = n > 1 ? kthSmallest(steps, (n - 1) >> 1) : 0
  const linear = new PolynomialRegression(x, y, 1)
  const log = new PolynomialRegression(x, y.map(Math.log10), 1)
  // Residuals at every pixel: a solution that bends between the fitted points must not pass as linear.
  const [a0, a1] = linear.coefficients as [number, number]
  const [b0, b1] = log.coefficients as [number, number]
  let linMax = 0
  let logMax = 0
  for (let i = 0; i < n; i++) {
    const w = wavelength[i]!
    linMax = Math.max(linMax, Math.abs(a0 + a1 * i - w))
    logMax = Math.max(logMax, Math.abs(10 ** (b0 + b1 * i) - w))
  }
  const tolerance = medianStep / 100
  if (linMax <= tolerance && linMax <= logMax) return { kind: 'linear', step: Math.abs(linear.coefficients[1]!), maxResidual: linMax }
  if (logMax <= tolerance) return { kind: 'log-linear', step: Math.abs(log.coefficients[1]!) * Math.LN10 * SPEED_OF_LIGHT_KMS, maxResidual: logMax }
  return { kind: 'non-linear', step: medianStep, maxResidual: Math.min(linMax, logMax) }
}

/** "linear, 1.000 Å per pixel" and the like, for the reader's decisions. */
export function describeDispersion(fit: DispersionFit): string {
  if (fit.kind === 'linear') return `linear, ${fit.step.toPrecision(4)} Å per pixel`
  if (fit.kind === 'log-linear') return `log-linear, ${fit.step.toPrecision(4)} km/s per pixel`
  return `non-linear, median ${fit.step.toPrecision(4)} Å per pixel`
}

/**
 * True when a row of numbers can be a wavelength axis: finite, strictly monotonic, and a straight
 * line in λ or log10 λ within a hundredth of a pixel (survey images store one as a row).
 */
export function isWavelengthRow(row: Float64Array): boolean {
  const n = row.length
  if (n < 3) return false
  const rising = row[n - 1]! > row[0]!
  for (let i = 0; i < n; i++) {
    const v = row[i]!
    if (!Number.isFinite(v) || v <= 0) return false
    if (i > 0 && (rising ? v <= row[i - 1]! : v >= row[i - 1]!)) return false
  }
  return fitDispersion(row).kind !== 'non-linear'
}

/** Where each pixel of a merged spectrum comes from: segment and pixel index. */
export interface MergeOrder {
  segment: Uint32Array
  pixel: Uint32Array
  /** Segments that contributed nothing (inside another one). */
  skipped: number[]
}

/**
 * Merges overlapping segments (echelle orders) into one ascending axis. Segments are taken by
 * their first wavelength; where two overlap, each keeps the pixels on its side of the overlap's
 * midpoint, so no pixel is averaged or resampled (common practice for a first look; a blaze
 * correction is the reducer's job). Each segment must be strictly monotonic.
 */
export function mergeSegments(wavelengths: Float64Array[]): MergeOrder {
  const ascending = wavelengths.map((w) => {
    const idx = Array.from({ length: w.length }, (_, i) => i)
    if (w.length > 1 && w[w.length - 1]! < w[0]!) idx.reverse()
    return idx
  })
  const order = wavelengths
    .map((_, k) => k)
    .filter((k) => wavelengths[k]!.length > 0)
    .sort((a, b) => wavelengths[a]![ascending[a]![0]!]! - wavelengths[b]![ascending[b]![0]!]!)
  const seg: number[] = []
  const pix: number[] = []
  const skipped: number[] = []
  let end = -Infinity
  for (const k of order) {
    const w = wavelengths[k]!
    const idx = ascending[k]!
    const first = w[idx[0]!]!
    const last = w[idx[idx.length - 1]!]!
    if (last <= end) {
      skipped.push(k)
      continue
    }
    if (first < end) {
      const cut = (first + end) / 2
      while (seg.length > 0 && wavelengths[seg[seg.length - 1]!]![pix[pix.length - 1]!]! >= cut) {
        seg.pop()
        pix.pop()
      }
      for (const i of idx)
        if (w[i]! >= cut) {
          seg.push(k)
          pix.push(i)
        }
    } else {
      for (const i of idx) {
        seg.push(k)
        pix.push(i)
      }
    }
    end = last
  }
  return { segment: Uint32Array.from(seg), pixel: Uint32Array.from(pix), skipped }
}

/** Gathers one per-segment array along a merge order. */
export function gather<T extends Float64Array | Uint8Array>(parts: T[], order: MergeOrder, make: (n: number) => T): T {
  const out = make(order.segment.length)
  for (let i = 0; i < out.length; i++) out[i] = parts[order.segment[i]!]![order.pixel[i]!]!
  return out
}

/**
 * Fraction of `region` spanned by a wavelength array (any order), ignoring masks: enough to tell
 * which aperture or HDU holds the classification region.
 */
export function spanCoverage(wavelength: Float64Array, region: readonly [number, number]): number {
  const n = wavelength.length
  if (n < 2) return 0
  let covered = 0
  for (let i = 1; i < n; i++) {
    const lo = Math.max(Math.min(wavelength[i - 1]!, wavelength[i]!), region[0])
    const hi = Math.min(Math.max(wavelength[i - 1]!, wavelength[i]!), region[1])
    if (hi > lo) covered += hi - lo
  }
  return covered / (region[1] - region[0])
}
