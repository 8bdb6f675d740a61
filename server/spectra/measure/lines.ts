import { CLASSIFICATION_LINES, LINE_RATIOS, VOIGT_FIT_LINE_IDS, type ClassificationLine, type LineRatioDefinition } from '../../../shared/lines'
import type { Spectrum1D } from '../../../shared/spectrum'
import { assertSpectrum } from '../prepare/guards'
import { measureCheckedSpectrumLine } from './line'
import type { LineMeasurement, LineRatio, MeasuredLine } from './types'
import { gaussianFwhm } from './voigt'
import { fitCheckedSpectrumVoigtLine } from './voigt-fit'

export interface LinesOptions {
  /** Lines to measure. @default CLASSIFICATION_LINES (shared/lines.ts) */
  lines?: readonly ClassificationLine[]
  /** S/N per line id (DER_SNR near each line); lines without an entry use `snr`. @default {} */
  snrByLine?: Readonly<Record<string, number | null>>
  /** S/N for lines without their own. @default null */
  snr?: number | null
  /** S/N floor below which a line is not measured. @default 10 */
  snrFloor?: number
  /** Pixels per independent noise sample. @default 1 */
  noiseCorrelation?: number
  /** Ids of the lines that also get a Voigt fit. @default VOIGT_FIT_LINE_IDS (Hβ … H8) */
  voigtLineIds?: readonly string[]
  /** Instrumental FWHM of the spectrum, Å: the smallest Gaussian width a Voigt fit may take. @default undefined */
  instrumentalFwhm?: number
}

/**
 * Measures every line of the table on a continuum-normalised spectrum (measureSpectrumLine),
 * and fits a Voigt profile (fitSpectrumVoigtLine) to the Balmer lines that were measured.
 * Lines outside the coverage, masked or under the S/N floor come back as not measured with a reason.
 */
export function measureSpectrumLines(spectrum: Spectrum1D, options: LinesOptions = {}): LineMeasurement[] {
  assertSpectrum(spectrum, 2)
  const { lines = CLASSIFICATION_LINES, snrByLine = {}, snr = null, snrFloor = 10, noiseCorrelation = 1, voigtLineIds = VOIGT_FIT_LINE_IDS, instrumentalFwhm } = options
  const minSigma = instrumentalFwhm !== undefined ? instrumentalFwhm / gaussianFwhm(1) : undefined
  return lines.map((line) => {
    const lineSnr = snrByLine[line.id] ?? snr
    const measurement = measureCheckedSpectrumLine(spectrum, line, { snr: lineSnr, snrFloor, noiseCorrelation })
    if (!measurement.measured || !voigtLineIds.includes(line.id)) return measurement
    const result = fitCheckedSpectrumVoigtLine(spectrum, line, { noiseCorrelation, ...(minSigma !== undefined ? { minSigma } : {}) })
    return result.ok ? { ...measurement, voigt: result.fit } : { ...measurement, voigt: null, voigtReason: result.reason }
  })
}

export interface RatiosOptions {
  /** Ratio definitions. @default LINE_RATIOS (shared/lines.ts) */
  ratios?: readonly LineRatioDefinition[]
}

/**
 * The luminosity-sensitive line ratios of the table from a set of line measurements: the sum of
 * the numerator lines' equivalent widths (or depths) over the denominator's, with first-order error
 * propagation. A ratio with an empty denominator is the numerator itself (e.g. TiO depth).
 */
export function measureLineRatios(measurements: readonly LineMeasurement[], options: RatiosOptions = {}): LineRatio[] {
  const { ratios = LINE_RATIOS } = options
  const byId = new Map(measurements.map((m) => [m.id, m]))
  return ratios.map((ratio) => {
    const base = { id: ratio.id, name: ratio.name, quantity: ratio.quantity }
    const top = sumOf(ratio.numerator, ratio.quantity, byId)
    const bottom = ratio.denominator.length > 0 ? sumOf(ratio.denominator, ratio.quantity, byId) : { value: 1, error: 0 }
    if (typeof top === 'string') return { ...base, value: null, error: null, reason: top }
    if (typeof bottom === 'string') return { ...base, value: null, error: null, reason: bottom }
    if (!(bottom.value > 0)) return { ...base, value: null, error: null, reason: 'the denominator is not positive' }
    const value = top.value / bottom.value
    const error = top.error === null || bottom.error === null ? null : Math.hypot(top.error / bottom.value, (top.value * bottom.error) / (bottom.value * bottom.value))
    return { ...base, value, error }
  })
}

function sumOf(ids: readonly string[], quantity: 'ew' | 'depth', byId: Map<string, LineMeasurement>): { value: number; error: number | null } | string {
  let value = 0
  let variance: number | null = 0
  for (const id of ids) {
    const m = byId.get(id)
    if (!m) return `${id} was not measured`
    if (!m.measured) return `${m.name} was not measured (${m.reason})`
    const line = m as MeasuredLine
    value += quantity === 'ew' ? line.equivalentWidth : line.depth
    const e = quantity === 'ew' ? line.equivalentWidthError : line.depthError
    variance = e === null || variance === null ? null : variance + e * e
  }
  return { value, error: variance === null ? null : Math.sqrt(variance) }
}
