// Runs in a worker thread of the pool: one spectrum in, its pipeline output back. Each thread
// keeps the prepared standards library of the versions it has seen, keyed by version id.
import { fileURLToPath } from 'node:url'
import { DEFAULT_GRID } from '../../shared/grid'
import { loadModelLibrary, type ModelLibrary } from '../../templates/generator/library'
import { modelMatchInputs, prepareMatchLibrary, type MatchStandardInput, type PreparedMatchLibrary } from '../spectra/match'
import { runPipeline, type PipelineInput, type PipelineOutput } from '../spectra/pipeline'

/** Directory of the default model library. */
export const DEFAULT_MODEL_DIR = fileURLToPath(new URL('../../templates/model-v1', import.meta.url))

/** A library version as sent to a worker: the model standards by id, observed standards with their arrays. */
export interface LibrarySpec {
  versionId: number
  name: string
  modelDir: string
  /** Model standards of this version: database id and manifest id. */
  models: { standardId: number; modelId: string }[]
  /** Observed standards with their frozen rectified flux on the library grid. */
  observed: { standardId: number; spectralType: string; typeCode: number; luminosityClass: string; classCode: number; rectified: Float32Array; resolutionFwhm: number }[]
}

export interface WorkerTask extends PipelineInput {
  library?: LibrarySpec
}

const modelLibraries = new Map<string, ModelLibrary>()
const prepared = new Map<number, PreparedMatchLibrary>()

/** The model library in `dir`, loaded once per thread. */
export function modelLibraryAt(dir: string): ModelLibrary {
  let lib = modelLibraries.get(dir)
  if (!lib) {
    lib = loadModelLibrary(dir)
    modelLibraries.set(dir, lib)
  }
  return lib
}

/** Builds (or takes from this thread's cache) the prepared library of a version. */
export function preparedLibrary(spec: LibrarySpec): PreparedMatchLibrary {
  const cached = prepared.get(spec.versionId)
  if (cached) return cached
  const models = modelLibraryAt(spec.modelDir)
  const ids = new Map(spec.models.map((m) => [m.modelId, m.standardId]))
  const inputs: MatchStandardInput[] = [
    ...modelMatchInputs(models, (modelId) => ids.get(modelId)),
    ...spec.observed.map((o) => ({ id: o.standardId, modelId: null, source: 'observed' as const, spectralType: o.spectralType, typeCode: o.typeCode, luminosityClass: o.luminosityClass, classCode: o.classCode, rectified: o.rectified, resolutionFwhm: o.resolutionFwhm })),
  ]
  const lib = prepareMatchLibrary(inputs, { versionId: spec.versionId, versionName: spec.name, grid: models.grid })
  // Versions are immutable once published, so old entries only cost memory: keep the two latest.
  if (prepared.size >= 2) prepared.delete(prepared.keys().next().value!)
  prepared.set(spec.versionId, lib)
  return lib
}

/** The default model library without a database: every model standard, ids = row number + 1. */
export function defaultLibrary(modelDir = DEFAULT_MODEL_DIR): PreparedMatchLibrary {
  const models = modelLibraryAt(modelDir)
  return prepareMatchLibrary(modelMatchInputs(models), { versionId: 0, versionName: models.manifest.version, grid: DEFAULT_GRID })
}

export default function process(task: WorkerTask): PipelineOutput {
  const { library, ...input } = task
  return runPipeline(input, library ? preparedLibrary(library) : undefined)
}
