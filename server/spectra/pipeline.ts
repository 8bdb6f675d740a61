import { DEFAULT_CLASSIFICATION_REGION, SPEED_OF_LIGHT_KMS, gridWavelengths } from '../../shared/grid'
import type { Spectrum1D } from '../../shared/spectrum'
import { analyseSpectrum, type AnalyseOptions, type AnalysisResult } from './analyse'
import { matchSpectrum, standardOnGrid, type MatchResult, type PreparedMatchLibrary } from './match'
import { measureSpectrumRadialVelocity, shiftSpectrumToRest } from './prepare/rv'

/** Version of the numeric pipeline; stored with every measurement and suggestion it makes. */
export const PIPELINE_VERSION = '1.2.2'

export interface PipelineInput {
  spectrum: Spectrum1D
  /** Instrumental resolution, FWHM Å, when the observer or the header gave it. */
  inputFwhm?: number
  /** Classification region, Å (the campaign's); the default region when absent. */
  region?: readonly [number, number]
}

export interface PipelineOutput {
  pipelineVersion: string
  analysis: AnalysisResult
  /** The classification against the library, or null when no library was given. */
  suggestion: MatchResult | null
  seconds: number
  /** Seconds per step: first analysis, coarse match, analysis at rest against the best standard, final match. */
  steps: { analyse: number; match: number; analyseRest: number; matchRest: number }
}

/** Resolution in Å FWHM from what the observer gave: FWHM directly, or R = λ/Δλ at 4500 Å. */
export function resolutionFwhm(fwhm: number | null | undefined, resolvingPower: number | null | undefined): number | undefined {
  if (fwhm && fwhm > 0) return fwhm
  if (resolvingPower && resolvingPower > 0) return 4500 / resolvingPower
  return undefined
}

/**
 * Runs every step of the numeric core on one spectrum; pure, so the CLI, the workers and the
 * benchmark share it. With a library: prepare the spectrum (without line measurements, which the
 * coarse match does not need), match coarsely, measure the radial velocity against the best
 * standard, analyse the spectrum shifted to rest, and match that. The result is that of
 * analyseSpectrum with the best standard as `rvReference`, without preparing the observed-frame
 * spectrum twice. Spectra sharper than the library's sharpest level are smoothed to it first,
 * so lines are measured as the standards were.
 */
export function runPipeline(input: PipelineInput, library?: PreparedMatchLibrary): PipelineOutput {
  const started = performance.now()
  const options: AnalyseOptions = {}
  if (input.inputFwhm !== undefined) options.inputFwhm = input.inputFwhm
  const sharpest = library?.levels[0]?.fwhm
  if (sharpest !== undefined && input.inputFwhm !== undefined && input.inputFwhm < sharpest) options.targetFwhm = sharpest
  if (input.region) options.snrRegion = input.region
  const steps = { analyse: 0, match: 0, analyseRest: 0, matchRest: 0 }
  let t = performance.now()
  if (!library) {
    const analysis = analyseSpectrum(input.spectrum, options)
    steps.analyse = (performance.now() - t) / 1000
    return { pipelineVersion: PIPELINE_VERSION, analysis, suggestion: null, seconds: (performance.now() - started) / 1000, steps }
  }
  // An infinite S/N floor skips the line measurements: only the prepared arrays are used here.
  const first = analyseSpectrum(input.spectrum, { ...options, snrFloor: Infinity })
  steps.analyse = (performance.now() - t) / 1000
  const fwhm = input.inputFwhm !== undefined ? Math.max(input.inputFwhm, sharpest ?? 0) : undefined
  const matchOptions = input.region ? { region: input.region } : {}
  t = performance.now()
  // Only the best standard and the level are used from it, so the class step can be the cheapest.
  const coarse = matchSpectrum(library, matchInput(first, fwhm), { ...matchOptions, classFit: 'points' })
  steps.match = (performance.now() - t) / 1000
  const row = library.standards.findIndex((s) => s.id === coarse.bestStandardId)
  const level = library.levels.find((l) => l.fwhm === coarse.levelFwhm) ?? library.levels[0]!
  t = performance.now()
  const analysis = analyseAtRest(input, options, first, standardOnGrid(library, level, row))
  steps.analyseRest = (performance.now() - t) / 1000
  t = performance.now()
  const suggestion = matchSpectrum(library, matchInput(analysis, coarse.levelFwhm), matchOptions)
  steps.matchRest = (performance.now() - t) / 1000
  return { pipelineVersion: PIPELINE_VERSION, analysis, suggestion, seconds: (performance.now() - started) / 1000, steps }
}

/**
 * analyseSpectrum(spectrum, { ...options, rvReference }) from an observed-frame preparation
 * already made: the velocity is measured on `first` as analyseSpectrum would, and the spectrum
 * shifted to rest is analysed once. The S/N region is shifted with it so the same observed
 * pixels give the headline S/N.
 */
function analyseAtRest(input: PipelineInput, options: AnalyseOptions, first: AnalysisResult, reference: Spectrum1D): AnalysisResult {
  const rvRegion = input.region ?? DEFAULT_CLASSIFICATION_REGION
  const p = first.prepared
  const result = measureSpectrumRadialVelocity({ wavelength: gridWavelengths(p.grid), flux: p.rectified, mask: p.mask }, reference, { grid: p.grid, region: rvRegion })
  const restOptions: AnalyseOptions = { ...options, ...(input.region ? { rvRegion: input.region } : {}) }
  if (!result.found) {
    const analysis = analyseSpectrum(input.spectrum, restOptions)
    // Where analyseSpectrum puts it: before the pseudo-continuum note.
    const at = analysis.warnings.findIndex((w) => w.startsWith('molecular bands dominate'))
    analysis.warnings.splice(at < 0 ? analysis.warnings.length : at, 0, `radial velocity not measured: ${result.reason}`)
    return analysis
  }
  const factor = 1 / (1 + result.velocity / SPEED_OF_LIGHT_KMS)
  const snrRegion = options.snrRegion ?? DEFAULT_CLASSIFICATION_REGION
  const rest = shiftSpectrumToRest(input.spectrum, { velocity: result.velocity })
  const analysis = analyseSpectrum(rest, { ...restOptions, snrRegion: [snrRegion[0] * factor, snrRegion[1] * factor] })
  return { ...analysis, rv: { v: result.velocity, error: result.error } }
}

function matchInput(analysis: AnalysisResult, fwhm: number | undefined) {
  const p = analysis.prepared
  return {
    rectified: p.rectified,
    ...(p.rectifiedError ? { rectifiedError: p.rectifiedError } : {}),
    mask: p.mask,
    snr: analysis.snr,
    ...(fwhm !== undefined ? { fwhm } : {}),
    lines: analysis.lines,
  }
}
