import { DEFAULT_CLASSIFICATION_REGION, DEFAULT_GRID, gridWavelength, gridWavelengths, type LogGrid } from '../../shared/grid'
import { CLASSIFICATION_LINES, lineSpan, type WavelengthRange } from '../../shared/lines'
import type { Spectrum1D } from '../../shared/spectrum'
import { fitSpectrumContinuum, type ContinuumOptions } from './prepare/continuum'
import { assertSpectrum } from './prepare/guards'
import { countMaskedPixels, maskSpectrumBadPixels, maskSpectrumSpikes } from './prepare/mask'
import { rebinNoiseCorrelation, rebinSpectrumToLogGrid } from './prepare/rebin'
import { shiftGridToRest } from './prepare/shift'
import { measureSpectrumRadialVelocity, shiftSpectrumToRest, type RadialVelocityResult } from './prepare/rv'
import { smoothSpectrumToFwhm } from './prepare/smooth'
import { estimateSpectrumSnr, estimateSpectrumSnrByWindow, spectrumSnrFromErrors } from './prepare/snr'
import { measureLineRatios, measureSpectrumLines } from './measure/lines'
import type { LineMeasurement, LineRatio } from './measure/types'

export type { LineMeasurement, LineRatio, MeasuredLine, UnmeasuredLine, VoigtFit, NotMeasuredReason } from './measure/types'

export interface AnalyseOptions {
  /** Grid the spectrum is prepared on. @default DEFAULT_GRID (shared/grid.ts) */
  grid?: LogGrid
  /** Resolution to smooth to, FWHM Å; no smoothing when absent. @default undefined */
  targetFwhm?: number
  /** Resolution of the input, FWHM Å; needed for smoothing. @default undefined */
  inputFwhm?: number
  /**
   * Continuum-normalised reference spectrum on `grid` at zero velocity; the radial velocity is
   * measured (and removed) only when one is given. @default undefined
   */
  rvReference?: Spectrum1D
  /** Range used for the cross-correlation, Å. @default DEFAULT_CLASSIFICATION_REGION */
  rvRegion?: WavelengthRange
  /** Largest |v| searched, km/s. @default 1000 */
  maxVelocity?: number
  /** Range for the headline S/N, Å. @default DEFAULT_CLASSIFICATION_REGION */
  snrRegion?: WavelengthRange
  /** Lines below this S/N are not measured. @default 10 */
  snrFloor?: number
  /**
   * S/N the caller measured on the residual from the best standard (pipeline.ts): used instead of
   * DER_SNR when the file has no errors and it is higher, since both overestimate the noise and the
   * residual is free of the line pattern that DER_SNR reads as noise. @default undefined
   */
  residualSnr?: number
  /** Per-pixel flags from the file (non-zero = bad). @default undefined */
  flagged?: ArrayLike<number>
  /** Mask narrow spikes (cosmic-ray hits, maskSpectrumSpikes); false when the caller has done so. @default true */
  maskSpikes?: boolean
  /** Options for the continuum fit. @default {} */
  continuum?: ContinuumOptions
}

export interface PreparedSpectrum {
  grid: LogGrid
  /** Rebinned (and smoothed) flux on the grid, input units; NaN where masked. */
  flux: Float64Array
  /** Its 1σ error, when the input had errors. */
  error?: Float64Array
  /** 1 where the pixel is outside the coverage or bad. */
  mask: Uint8Array
  continuum: Float64Array
  /** flux / continuum. */
  rectified: Float64Array
  /** error / continuum (before smoothing, see analyseSpectrum), when the input had errors. */
  rectifiedError?: Float64Array
}

/** Largest S/N reported: beyond it the noise says nothing more (noiseless or synthetic data). */
export const SNR_CAP = 1000

export interface AnalysisResult {
  /**
   * S/N per input pixel over `snrRegion` (the whole spectrum if that has too few pixels): from the
   * file's errors when it has them, else the residual from the best standard when the caller gives
   * one (AnalyseOptions.residualSnr), else DER_SNR; at most SNR_CAP.
   */
  snr: number | null
  /** How the S/N was measured; 'capped' when it reached SNR_CAP. */
  snrMethod: 'errors' | 'der-snr' | 'residual' | 'capped' | null
  /** Radial velocity removed before measuring, km/s; null when no reference was given or none was found. */
  rv: { v: number; error: number } | null
  prepared: PreparedSpectrum
  /** True when the continuum is an upper envelope through band-free peaks (M-type spectra). */
  pseudoContinuum: boolean
  lines: LineMeasurement[]
  ratios: LineRatio[]
  warnings: string[]
}

/**
 * Runs the preparation and measurement steps on one observed spectrum, in order: mask bad pixels;
 * DER_SNR over the classification region and near each line (on the observed pixels, before any
 * resampling); flux-conserving rebinning onto the log-λ grid; Gaussian smoothing to the target
 * resolution when the input is sharper; continuum fit; when a reference is given, radial velocity
 * by cross-correlation, then the same preparation again from the observed pixels shifted to rest;
 * every line of the table and the Balmer Voigt fits; the line ratios.
 *
 * Line errors use the rebinned errors before smoothing (smoothing conserves the integrals a line
 * measurement sums), with the variance scaled by the number of grid pixels per input pixel.
 *
 * @throws when the spectrum is malformed (see assertSpectrum) or does not overlap the grid
 */
export function analyseSpectrum(spectrum: Spectrum1D, options: AnalyseOptions = {}): AnalysisResult {
  const { grid = DEFAULT_GRID, targetFwhm, inputFwhm, rvReference, rvRegion = DEFAULT_CLASSIFICATION_REGION, maxVelocity = 1000, continuum: continuumOptions = {} } = options
  const observed = maskAndMeasureSnr(spectrum, options)
  let rest = observed.masked
  let prepared = prepareOnGrid(rest, grid, targetFwhm, inputFwhm, continuumOptions)
  let rv: AnalysisResult['rv'] = null
  if (rvReference) {
    const result = measureSpectrumRadialVelocity({ wavelength: prepared.wavelength, flux: prepared.rectified, mask: prepared.mask }, rvReference, { grid, maxVelocity, region: rvRegion })
    if (result.found) {
      rv = { v: result.velocity, error: result.error }
      rest = shiftSpectrumToRest(observed.masked, { velocity: result.velocity })
      prepared = prepareOnGrid(rest, grid, targetFwhm, inputFwhm, continuumOptions)
    } else {
      observed.warnings.push(`radial velocity not measured: ${result.reason}`)
    }
  }
  return measurePrepared(rest, prepared, observed, rv, options)
}

/**
 * analyseSpectrum(spectrum, { ...options, rvReference }) with the velocity already measured on
 * `observed`, the spectrum's own analysis with the same options (any S/N floor) in the frame it was
 * observed in. Its prepared arrays are shifted to rest on the grid (shiftGridToRest) rather than
 * the shifted pixels prepared again: the grid samples every resolution it smooths to several times
 * per FWHM, so the interpolation leaves the lines as they were. The headline S/N comes from the
 * observed pixels, as before the shift.
 */
export function analyseAtVelocity(spectrum: Spectrum1D, observed: AnalysisResult, velocity: RadialVelocityResult, options: AnalyseOptions = {}): AnalysisResult {
  const p = observed.prepared
  const masked = maskAndMeasureSnr(spectrum, options)
  const base = { wavelength: gridWavelengths(p.grid), pseudoContinuum: observed.pseudoContinuum }
  if (!velocity.found) {
    masked.warnings.push(`radial velocity not measured: ${velocity.reason}`)
    return measurePrepared(masked.masked, { ...base, ...p }, masked, null, { ...options, grid: p.grid })
  }
  const rest = shiftSpectrumToRest(masked.masked, { velocity: velocity.velocity })
  const arrays = [
    { values: p.flux },
    { values: p.continuum, everywhere: true },
    { values: p.rectified },
    ...(p.error ? [{ values: p.error }] : []),
    ...(p.rectifiedError ? [{ values: p.rectifiedError }] : []),
  ]
  const shifted = shiftGridToRest(p.grid, velocity.velocity, p.mask, arrays)
  const [flux, continuum, rectified] = shifted.values as [Float64Array, Float64Array, Float64Array]
  const error = p.error ? shifted.values[3] : undefined
  const rectifiedError = p.rectifiedError ? shifted.values[p.error ? 4 : 3] : undefined
  const prepared: GridPreparation = { ...base, flux, ...(error ? { error } : {}), mask: shifted.mask, continuum, rectified, ...(rectifiedError ? { rectifiedError } : {}) }
  return measurePrepared(rest, prepared, masked, { v: velocity.velocity, error: velocity.error }, { ...options, grid: p.grid })
}

interface MaskedSpectrum {
  masked: Spectrum1D
  snr: number | null
  snrMethod: AnalysisResult['snrMethod']
  warnings: string[]
}

/** Bad pixels and spikes masked, and the headline S/N, on the observed pixels. */
function maskAndMeasureSnr(spectrum: Spectrum1D, options: AnalyseOptions): MaskedSpectrum {
  assertSpectrum(spectrum, 5)
  const { targetFwhm, inputFwhm, snrRegion = DEFAULT_CLASSIFICATION_REGION, snrFloor = 10, residualSnr, flagged, maskSpikes = true } = options
  const warnings: string[] = []
  const bad = maskSpectrumBadPixels(spectrum, flagged ? { flagged } : {})
  const spiked = maskSpikes ? maskSpectrumSpikes(bad) : { spectrum: bad, count: 0 }
  const masked = spiked.spectrum
  const maskedCount = countMaskedPixels(masked)
  if (maskedCount > 0) warnings.push(`${maskedCount} of ${spectrum.wavelength.length} pixels are masked${spiked.count > 0 ? `, ${spiked.count} of them narrow spikes (cosmic-ray hits)` : ''}`)

  const fromErrors = spectrumSnrFromErrors(masked, { region: snrRegion }) ?? spectrumSnrFromErrors(masked)
  const derSnr = estimateSpectrumSnr(masked, { region: snrRegion }) ?? estimateSpectrumSnr(masked)
  const fromResidual = fromErrors === null && residualSnr !== undefined && Number.isFinite(residualSnr) && residualSnr > (derSnr ?? 0) ? residualSnr : null
  const measured = fromErrors ?? fromResidual ?? derSnr
  const snr = measured === null ? null : Math.min(SNR_CAP, measured)
  const snrMethod: AnalysisResult['snrMethod'] = measured === null ? null : measured >= SNR_CAP ? 'capped' : fromErrors !== null ? 'errors' : fromResidual !== null ? 'residual' : 'der-snr'
  if (snr === null) warnings.push('S/N could not be estimated (too few usable pixels)')
  else if (snr < snrFloor) warnings.push(`S/N ${snr.toFixed(1)} is below the floor of ${snrFloor}`)

  if (targetFwhm !== undefined && inputFwhm === undefined) warnings.push('input resolution unknown: not smoothed to the target')
  if (targetFwhm !== undefined && inputFwhm !== undefined && inputFwhm >= targetFwhm) {
    warnings.push(`input resolution ${inputFwhm} Å FWHM is not sharper than the target ${targetFwhm} Å: not smoothed`)
  }
  return { masked, snr, snrMethod, warnings }
}

/** The line measurements and ratios on a prepared spectrum; `rest` is its pixels in the frame the grid is in. */
function measurePrepared(rest: Spectrum1D, prepared: GridPreparation, observed: MaskedSpectrum, rv: AnalysisResult['rv'], options: AnalyseOptions): AnalysisResult {
  const { grid = DEFAULT_GRID, targetFwhm, inputFwhm, rvRegion = DEFAULT_CLASSIFICATION_REGION, snrFloor = 10 } = options
  const { snr, snrMethod, warnings } = observed
  if (prepared.pseudoContinuum) warnings.push('molecular bands dominate: the continuum is a pseudo-continuum through band-free peaks')

  // S/N near each line, on the observed pixels (rest frame, so the windows line up).
  const windows = CLASSIFICATION_LINES.map((line): WavelengthRange => {
    const [lo, hi] = lineSpan(line)
    return [Math.min(lo, line.wavelength - 50), Math.max(hi, line.wavelength + 50)]
  })
  // An infinite floor turns every line down whatever its window's S/N (the pipeline's first,
  // quick look), so the windows are not measured.
  const snrs = snr !== null && snrFloor === Infinity ? windows.map(() => null) : estimateSpectrumSnrByWindow(rest, { windows })
  const snrByLine: Record<string, number | null> = {}
  CLASSIFICATION_LINES.forEach((line, i) => {
    snrByLine[line.id] = snrs[i] ?? null
  })
  const centre = (rvRegion[0] + rvRegion[1]) / 2
  const noiseCorrelation = rebinNoiseCorrelation(rest, grid, centre)
  const smoothed = targetFwhm !== undefined && inputFwhm !== undefined && inputFwhm < targetFwhm
  const resolution = smoothed ? targetFwhm : inputFwhm
  const lines = measureSpectrumLines(
    {
      wavelength: prepared.wavelength,
      flux: prepared.rectified,
      ...(prepared.rectifiedError ? { error: prepared.rectifiedError } : {}),
      mask: prepared.mask,
    },
    { snrByLine, snr, snrFloor, noiseCorrelation, ...(resolution !== undefined ? { instrumentalFwhm: resolution } : {}) },
  )
  const ratios = measureLineRatios(lines)
  return {
    snr,
    snrMethod,
    rv,
    prepared: {
      grid,
      flux: prepared.flux,
      ...(prepared.error ? { error: prepared.error } : {}),
      mask: prepared.mask,
      continuum: prepared.continuum,
      rectified: prepared.rectified,
      ...(prepared.rectifiedError ? { rectifiedError: prepared.rectifiedError } : {}),
    },
    pseudoContinuum: prepared.pseudoContinuum,
    lines,
    ratios,
    warnings,
  }
}

interface GridPreparation {
  wavelength: Float64Array
  flux: Float64Array
  error?: Float64Array
  mask: Uint8Array
  continuum: Float64Array
  rectified: Float64Array
  rectifiedError?: Float64Array
  pseudoContinuum: boolean
}

function prepareOnGrid(spectrum: Spectrum1D, grid: LogGrid, targetFwhm: number | undefined, inputFwhm: number | undefined, continuumOptions: ContinuumOptions): GridPreparation {
  const rebinned = rebinSpectrumToLogGrid(spectrum, { grid })
  const mask = rebinned.mask!
  let covered = 0
  for (let i = 0; i < mask.length; i++) if (mask[i] === 0) covered++
  if (covered < 5) {
    const lo = spectrum.wavelength[0]!
    const hi = spectrum.wavelength[spectrum.wavelength.length - 1]!
    throw new Error(`spectrum covers ${lo.toFixed(1)}–${hi.toFixed(1)} Å, which does not overlap the grid's ` + `${grid.start.toFixed(1)}–${gridWavelength(grid, grid.length - 1).toFixed(1)} Å`)
  }
  const smoothed = targetFwhm !== undefined && inputFwhm !== undefined && inputFwhm < targetFwhm ? smoothSpectrumToFwhm(rebinned, { grid, targetFwhm, inputFwhm }) : rebinned
  const fit = fitSpectrumContinuum(smoothed, { space: 'log', ...continuumOptions })
  let rectifiedError: Float64Array | undefined
  if (rebinned.error) {
    rectifiedError = new Float64Array(grid.length)
    for (let i = 0; i < grid.length; i++) rectifiedError[i] = rebinned.error[i]! / fit.continuum[i]!
  }
  return {
    wavelength: smoothed.wavelength,
    flux: smoothed.flux,
    ...(smoothed.error ? { error: smoothed.error } : {}),
    mask: smoothed.mask!,
    continuum: fit.continuum,
    rectified: fit.rectified,
    ...(rectifiedError ? { rectifiedError } : {}),
    pseudoContinuum: fit.pseudoContinuum,
  }
}
