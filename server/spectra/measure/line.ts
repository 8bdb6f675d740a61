import type { ClassificationLine, WavelengthRange } from '../../../shared/lines'
import type { Spectrum1D } from '../../../shared/spectrum'
import { assertSpectrum } from '../prepare/guards'
import { lowerBound } from '../prepare/stats'
import type { LineMeasurement } from './types'

export interface LineOptions {
  /**
   * S/N per pixel near the line (DER_SNR of the observed spectrum), used for the floor and, when
   * the spectrum has no errors, for the error of the equivalent width. @default null
   */
  snr?: number | null
  /** Lines whose S/N is below this are not measured. @default 10 */
  snrFloor?: number
  /** Largest fraction of masked pixels allowed in the window or a side band. @default 0.2 */
  maxMaskedFraction?: number
  /**
   * Pixels per independent noise sample (e.g. from rebinning onto a finer grid); the variance of
   * every sum is multiplied by it. @default 1
   */
  noiseCorrelation?: number
}

/**
 * Measures one line or band on a spectrum of any sampling: equivalent width, central depth, FWHM
 * and centroid, against a straight pseudo-continuum through the mean flux of the blue and red side
 * bands at their midpoints (the Lick-index construction, Worthey et al. 1994).
 *
 * Pixels are boxes with edges half-way between centres; window and side-band edges cut pixels
 * fractionally. W = Σ (1 − Fᵢ/Cᵢ) Δλᵢ (Å). Its error is propagated from the flux errors (or, without
 * errors, from σᵢ = Cᵢ/(S/N)), including the error of the two side-band means:
 * σ²_W = k [Σ (Δλᵢσᵢ/Cᵢ)² + (∂W/∂F_b)² σ²_b + (∂W/∂F_r)² σ²_r], k = `noiseCorrelation`.
 * The FWHM follows specutils's `fwhm` (the nearest half-depth crossings on either side of the
 * deepest pixel, linearly interpolated), with the half level taken from the parabola-refined depth.
 *
 * A line is "not measured", never zero, when the window or a side band leaves the coverage, too
 * many of their pixels are masked, the S/N is below the floor, or the continuum is not positive.
 */
export function measureSpectrumLine(spectrum: Spectrum1D, line: ClassificationLine, options: LineOptions = {}): LineMeasurement {
  assertSpectrum(spectrum, 2)
  return measureCheckedSpectrumLine(spectrum, line, options)
}

/** {@link measureSpectrumLine} for a spectrum already checked by assertSpectrum (no O(n) check per line). */
export function measureCheckedSpectrumLine(spectrum: Spectrum1D, line: ClassificationLine, options: LineOptions = {}): LineMeasurement {
  const { snr = null, snrFloor = 10, maxMaskedFraction = 0.2, noiseCorrelation = 1 } = options
  const identity = { id: line.id, name: line.name, wavelength: line.wavelength, family: line.family }
  const { wavelength: w, flux, error, mask } = spectrum
  const n = w.length
  const first = w[0]! - (w[1]! - w[0]!) / 2
  const last = w[n - 1]! + (w[n - 1]! - w[n - 2]!) / 2
  const lo = Math.min(line.blue[0], line.window[0])
  const hi = Math.max(line.red[1], line.window[1])
  if (lo < first || hi > last) {
    return {
      ...identity,
      measured: false,
      reason: 'outside-coverage',
      detail: `needs ${fmt(lo)}–${fmt(hi)} Å; the spectrum covers ${fmt(first)}–${fmt(last)} Å`,
    }
  }
  if (snr !== null && snr < snrFloor) {
    return { ...identity, measured: false, reason: 'low-snr', detail: `S/N ${snr.toFixed(1)} is below the floor of ${snrFloor}` }
  }
  const blue = bandMean(spectrum, line.blue)
  const red = bandMean(spectrum, line.red)
  const win = bandMean(spectrum, line.window)
  for (const [band, name] of [
    [blue, 'blue side band'],
    [red, 'red side band'],
    [win, 'window'],
  ] as const) {
    if (band.maskedFraction > maxMaskedFraction) {
      return {
        ...identity,
        measured: false,
        reason: 'masked-pixels',
        detail: `${Math.round(band.maskedFraction * 100)} % of the ${name} is masked`,
      }
    }
  }
  if (!(blue.mean > 0) || !(red.mean > 0)) {
    return { ...identity, measured: false, reason: 'no-continuum', detail: 'a side band has no positive flux' }
  }
  const wb = (line.blue[0] + line.blue[1]) / 2
  const wr = (line.red[0] + line.red[1]) / 2
  const slope = (red.mean - blue.mean) / (wr - wb)

  // One pass over the window pixels: EW, its derivatives, centroid, deepest pixel.
  let ew = 0
  let varLine = 0
  let dBlue = 0
  let dRed = 0
  let sumDepthW = 0
  let sumDepthWl = 0
  let deepest = -1
  let deepestDepth = -Infinity
  const hasNoise = error !== undefined || snr !== null
  const [winFirst, winLast] = pixelSpan(w, line.window)
  for (let i = winFirst; i <= winLast; i++) {
    const overlap = pixelOverlap(w, i, n, line.window)
    if (overlap <= 0) continue
    if ((mask && mask[i] !== 0) || !Number.isFinite(flux[i]!)) continue
    const c = blue.mean + slope * (w[i]! - wb)
    const ratio = flux[i]! / c
    const depth = 1 - ratio
    ew += overlap * depth
    const sigma = error ? error[i]! : snr !== null ? c / snr : 0
    const s = (overlap * sigma) / c
    varLine += s * s
    const t = (w[i]! - wb) / (wr - wb)
    const dc = (overlap * ratio) / c
    dBlue += dc * (1 - t)
    dRed += dc * t
    sumDepthW += overlap * depth
    sumDepthWl += overlap * depth * w[i]!
    if (w[i]! >= line.window[0] && w[i]! <= line.window[1] && depth > deepestDepth) {
      deepestDepth = depth
      deepest = i
    }
  }
  // Masked pixels inside the window: scale to the full window (the fraction is small by the guard above).
  const coverage = 1 - win.maskedFraction
  ew /= coverage
  const blueError = snr !== null && !error ? blue.mean / snr / Math.sqrt(Math.max(1, blue.pixels)) : blue.error
  const redError = snr !== null && !error ? red.mean / snr / Math.sqrt(Math.max(1, red.pixels)) : red.error
  const ewVar = noiseCorrelation * (varLine + dBlue * dBlue * blueError * blueError + dRed * dRed * redError * redError)
  const ewError = hasNoise ? Math.sqrt(ewVar) / coverage : null

  const isBand = line.family === 'band'
  let depth = deepestDepth
  let centreDepthError: number | null = null
  let fwhm: number | null = null
  if (deepest >= 0) {
    const cAt = (i: number) => blue.mean + slope * (w[i]! - wb)
    const d = (i: number) => 1 - flux[i]! / cAt(i)
    const good = (i: number) => i >= 0 && i < n && !(mask && mask[i] !== 0) && Number.isFinite(flux[i]!)
    if (good(deepest - 1) && good(deepest + 1)) {
      const ym = d(deepest - 1)
      const y0 = d(deepest)
      const yp = d(deepest + 1)
      const curv = ym - 2 * y0 + yp
      if (curv < 0) depth = y0 - (0.125 * (ym - yp) * (ym - yp)) / curv
    }
    const sigma = error ? error[deepest]! : snr !== null ? cAt(deepest) / snr : Number.NaN
    centreDepthError = Number.isFinite(sigma) ? Math.sqrt(noiseCorrelation) * (sigma / cAt(deepest)) : null
    // A width at half depth exists only for a line that dips below its side bands.
    if (depth > 0) fwhm = halfDepthWidth(spectrum, line.window, deepest, depth / 2, blue.mean, slope, wb)
    if (fwhm !== null && !(fwhm > 0)) fwhm = null
  }
  if (isBand) {
    const width = line.window[1] - line.window[0]
    depth = ew / width
    centreDepthError = ewError === null ? null : ewError / width
  }
  return {
    ...identity,
    measured: true,
    equivalentWidth: ew,
    equivalentWidthError: ewError,
    depth,
    depthError: centreDepthError,
    fwhm,
    centroid: sumDepthW > 0 ? sumDepthWl / sumDepthW : null,
    continuum: { blue: blue.mean, red: red.mean },
    snr,
  }
}

interface BandMean {
  mean: number
  error: number
  maskedFraction: number
  pixels: number
}

/** Overlap-weighted mean flux over a range, its error, and the masked fraction of the range. */
function bandMean(spectrum: Spectrum1D, range: WavelengthRange): BandMean {
  const { wavelength: w, flux, error, mask } = spectrum
  const n = w.length
  let sum = 0
  let sumV = 0
  let good = 0
  let total = 0
  let pixels = 0
  const [first, last] = pixelSpan(w, range)
  for (let i = first; i <= last; i++) {
    const overlap = pixelOverlap(w, i, n, range)
    if (overlap <= 0) continue
    total += overlap
    if (w[i]! >= range[0] && w[i]! <= range[1]) pixels++
    if ((mask && mask[i] !== 0) || !Number.isFinite(flux[i]!)) continue
    sum += overlap * flux[i]!
    if (error) sumV += (overlap * error[i]!) ** 2
    good += overlap
  }
  const width = range[1] - range[0]
  return {
    mean: good > 0 ? sum / good : Number.NaN,
    error: good > 0 ? Math.sqrt(sumV) / good : Number.NaN,
    maskedFraction: total > 0 ? 1 - good / width : 1,
    pixels: total > 0 ? Math.round((good / width) * pixels) : 0,
  }
}

/** First and last pixel whose box can touch the range (binary search; pixels are ascending). */
function pixelSpan(w: Float64Array, range: WavelengthRange): [number, number] {
  return [Math.max(0, lowerBound(w, range[0]) - 1), Math.min(w.length - 1, lowerBound(w, range[1]))]
}

/** Length (Å) of pixel i's box inside the range. */
function pixelOverlap(w: Float64Array, i: number, n: number, range: WavelengthRange): number {
  const x = w[i]!
  const left = i === 0 ? x - (w[1]! - x) / 2 : (w[i - 1]! + x) / 2
  const right = i === n - 1 ? x + (x - w[n - 2]!) / 2 : (x + w[i + 1]!) / 2
  return Math.min(right, range[1]) - Math.max(left, range[0])
}

/** Distance between the half-depth crossings nearest the deepest pixel, inside the window. */
function halfDepthWidth(spectrum: Spectrum1D, window: WavelengthRange, deepest: number, half: number, level: number, slope: number, wb: number): number | null {
  const { wavelength: w, flux } = spectrum
  const d = (i: number) => 1 - flux[i]! / (level + slope * (w[i]! - wb))
  let left: number | null = null
  for (let i = deepest - 1; i >= 0 && w[i]! >= window[0]; i--) {
    const di = d(i)
    if (di < half) {
      const dn = d(i + 1)
      left = w[i]! + ((half - di) * (w[i + 1]! - w[i]!)) / (dn - di)
      break
    }
  }
  let right: number | null = null
  for (let i = deepest + 1; i < w.length && w[i]! <= window[1]; i++) {
    const di = d(i)
    if (di < half) {
      const dp = d(i - 1)
      right = w[i - 1]! + ((half - dp) * (w[i]! - w[i - 1]!)) / (di - dp)
      break
    }
  }
  return left !== null && right !== null ? right - left : null
}

function fmt(x: number): string {
  return x.toFixed(1)
}
