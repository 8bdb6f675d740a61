import type { Spectrum1D } from '../../shared/spectrum'
import { analyseSpectrum, type AnalyseOptions, type AnalysisResult } from './analyse'
import { matchSpectrum, standardOnGrid, type MatchResult, type PreparedMatchLibrary } from './match'

/** Version of the numeric pipeline; stored with every measurement and suggestion it makes. */
export const PIPELINE_VERSION = '1.1.0'

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
 * benchmark share it. With a library: analyse, match coarsely, analyse again with the best
 * standard as the radial-velocity reference (shifted to rest), and match that. Spectra sharper
 * than the library's sharpest level are smoothed to it first, so lines are measured as the
 * standards were.
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
  let analysis = analyseSpectrum(input.spectrum, options)
  steps.analyse = (performance.now() - t) / 1000
  let suggestion: MatchResult | null = null
  if (library) {
    const fwhm = input.inputFwhm !== undefined ? Math.max(input.inputFwhm, sharpest ?? 0) : undefined
    const matchOptions = input.region ? { region: input.region } : {}
    t = performance.now()
    const coarse = matchSpectrum(library, matchInput(analysis, fwhm), matchOptions)
    steps.match = (performance.now() - t) / 1000
    const row = library.standards.findIndex((s) => s.id === coarse.bestStandardId)
    const level = library.levels.find((l) => l.fwhm === coarse.levelFwhm) ?? library.levels[0]!
    t = performance.now()
    analysis = analyseSpectrum(input.spectrum, { ...options, rvReference: standardOnGrid(library, level, row), ...(input.region ? { rvRegion: input.region } : {}) })
    steps.analyseRest = (performance.now() - t) / 1000
    t = performance.now()
    suggestion = matchSpectrum(library, matchInput(analysis, coarse.levelFwhm), matchOptions)
    steps.matchRest = (performance.now() - t) / 1000
  }
  return { pipelineVersion: PIPELINE_VERSION, analysis, suggestion, seconds: (performance.now() - started) / 1000, steps }
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
