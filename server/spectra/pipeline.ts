import type { Spectrum1D } from '../../shared/spectrum'
import { analyseSpectrum, type AnalysisResult } from './analyse'

/** Version of the numeric pipeline; stored with every measurement and suggestion it makes. */
export const PIPELINE_VERSION = '1.0.0'

export interface PipelineInput {
  spectrum: Spectrum1D
  /** Instrumental resolution, FWHM Å, when the observer or the header gave it. */
  inputFwhm?: number
}

export interface PipelineOutput {
  pipelineVersion: string
  analysis: AnalysisResult
  seconds: number
}

/** Resolution in Å FWHM from what the observer gave: FWHM directly, or R = λ/Δλ at 4500 Å. */
export function resolutionFwhm(fwhm: number | null | undefined, resolvingPower: number | null | undefined): number | undefined {
  if (fwhm && fwhm > 0) return fwhm
  if (resolvingPower && resolvingPower > 0) return 4500 / resolvingPower
  return undefined
}

/** Runs every step of the numeric core on one spectrum; pure, so the CLI, the workers and the benchmark share it. */
export function runPipeline(input: PipelineInput): PipelineOutput {
  const started = performance.now()
  const analysis = analyseSpectrum(input.spectrum, input.inputFwhm !== undefined ? { inputFwhm: input.inputFwhm } : {})
  return { pipelineVersion: PIPELINE_VERSION, analysis, seconds: (performance.now() - started) / 1000 }
}
