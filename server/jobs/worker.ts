// Runs in a worker thread of the pool: one spectrum in, its pipeline output back. Each thread
// keeps the prepared standards library of the versions it has seen (match/load.ts).
import { deserialize, serialize } from 'node:v8'
import type { AnalysisResult, PreparedSpectrum } from '../spectra/analyse'
import { cachedPreparedLibrary, preparedLibrary, type LibrarySpec } from '../spectra/match/load'
import { runPipeline, type PipelineInput, type PipelineOutput } from '../spectra/pipeline'

/**
 * A library version's spec as a task carries it: serialized once into shared memory. Copying a task
 * to a thread then shares these bytes instead of cloning a spec of several hundred objects (and every
 * uploaded standard's array) for each spectrum; a thread reads them only for a version it has not prepared.
 */
export interface SharedLibrarySpec {
  versionId: number
  bytes: SharedArrayBuffer
}

export function shareLibrarySpec(spec: LibrarySpec): SharedLibrarySpec {
  const serialized = serialize(spec)
  const bytes = new SharedArrayBuffer(serialized.length)
  new Uint8Array(bytes).set(serialized)
  return { versionId: spec.versionId, bytes }
}

export function readLibrarySpec(shared: SharedLibrarySpec): LibrarySpec {
  return deserialize(new Uint8Array(shared.bytes)) as LibrarySpec
}

export interface WorkerTask extends PipelineInput {
  library?: SharedLibrarySpec
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
  const prepared = library ? (cachedPreparedLibrary(library.versionId) ?? preparedLibrary(readLibrarySpec(library))) : undefined
  return forStorage(runPipeline(input, prepared))
}
