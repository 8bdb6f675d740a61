// Runs in a worker thread of the pool: one spectrum in, its pipeline output back.
import { runPipeline, type PipelineInput, type PipelineOutput } from '../spectra/pipeline'

export default function process(input: PipelineInput): PipelineOutput {
  return runPipeline(input)
}
