// Runs in a worker thread of the pool: one spectrum in, its pipeline output back. Each thread
// keeps the prepared standards library of the versions it has seen (match/load.ts).
import { preparedLibrary, type LibrarySpec } from '../spectra/match/load'
import { runPipeline, type PipelineInput, type PipelineOutput } from '../spectra/pipeline'

export interface WorkerTask extends PipelineInput {
  library?: LibrarySpec
}

export default function process(task: WorkerTask): PipelineOutput {
  const { library, ...input } = task
  return runPipeline(input, library ? preparedLibrary(library) : undefined)
}
