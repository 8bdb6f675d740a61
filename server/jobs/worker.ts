// Runs in a worker thread of the pool: one spectrum in, its pipeline output back. Each thread
// keeps the prepared standards library of the versions it has seen (match/load.ts).
import type { AnalysisResult, PreparedSpectrum } from '../spectra/analyse'
import { preparedLibrary, type LibrarySpec } from '../spectra/match/load'
import { runPipeline, type PipelineInput, type PipelineOutput } from '../spectra/pipeline'

export interface WorkerTask extends PipelineInput {
  library?: LibrarySpec
}

/** The prepared arrays a measurement stores, in the float32 it stores them in. */
export type StoredPrepared = Pick<PreparedSpectrum, 'grid' | 'mask'> & { flux: Float32Array; continuum: Float32Array; rectified: Float32Array }

/** A pipeline output as a processing thread sends it back to be stored: its prepared arrays as stored. */
export type StoredPipelineOutput = Omit<PipelineOutput, 'analysis'> & { analysis: Omit<AnalysisResult, 'prepared'> & { prepared: StoredPrepared } }

/**
 * The output with only what a measurement stores of the prepared spectrum, in float32: a half to a
 * third of the bytes that were copied back to the main thread and collected there for every spectrum.
 */
export function forStorage(output: PipelineOutput): StoredPipelineOutput {
  const { grid, mask, flux, continuum, rectified } = output.analysis.prepared
  return { ...output, analysis: { ...output.analysis, prepared: { grid, mask, flux: new Float32Array(flux), continuum: new Float32Array(continuum), rectified: new Float32Array(rectified) } } }
}

export default function process(task: WorkerTask): StoredPipelineOutput {
  const { library, ...input } = task
  return forStorage(runPipeline(input, library ? preparedLibrary(library) : undefined))
}
