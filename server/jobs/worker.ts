// Runs in a worker thread of the pool: one spectrum in, its pipeline output back. Each thread
// keeps the prepared standards library of the versions it has seen, keyed by version id.
import { fileURLToPath } from 'node:url'
import { DEFAULT_GRID } from '../../shared/grid'
import { loadModelLibrary, type ModelLibrary } from '../../templates/generator/library'
import { loadObservedLibrary, type ObservedLibrary } from '../../templates/observed/library'
import { modelMatchInputs, observedMatchInputs, prepareMatchLibrary, type MatchStandardInput, type PreparedMatchLibrary } from '../spectra/match'
import { runPipeline, type PipelineInput, type PipelineOutput } from '../spectra/pipeline'

/** Directory of the model library (kept for library versions published before the observed library). */
export const DEFAULT_MODEL_DIR = fileURLToPath(new URL('../../templates/model-v1', import.meta.url))
/** Directory of the shipped observed library, the default standards. */
export const DEFAULT_OBSERVED_DIR = fileURLToPath(new URL('../../templates/observed-v1', import.meta.url))

/** An observed standard made from an uploaded spectrum, with its frozen rectified flux. */
export interface UploadedStandardSpec {
  standardId: number
  spectralType: string
  typeCode: number
  luminosityClass: string
  classCode: number
  teff: number | null
  logg: number | null
  feh: number | null
  origin: string
  rectified: Float32Array
  resolutionFwhm: number
  /** The instrument it is a standard of (promoted from its agreed spectra), or null. */
  instrumentId: number | null
  /** The object the spectrum is of, for promoted standards. */
  star: string | null
  /** S/N of the spectrum a promoted standard was made from (its noise is taken out of the χ²). */
  snr: number | null
}

/** A library version as sent to a worker: shipped standards by id, uploaded standards with their arrays. */
export interface LibrarySpec {
  versionId: number
  name: string
  modelDir: string
  /** Model standards of this version: database id and manifest id. */
  models: { standardId: number; modelId: string }[]
  observedDir: string
  /** Shipped observed standards of this version: database id and template id. */
  templates: { standardId: number; templateId: string }[]
  observed: UploadedStandardSpec[]
}

export interface WorkerTask extends PipelineInput {
  library?: LibrarySpec
}

const modelLibraries = new Map<string, ModelLibrary>()
const observedLibraries = new Map<string, { library: ObservedLibrary; inputs: MatchStandardInput[] }>()
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

/** The observed library in `dir` with its standards rectified as matcher inputs (ids = row + 1), loaded once per thread. */
export function observedLibraryAt(dir: string): { library: ObservedLibrary; inputs: MatchStandardInput[] } {
  let entry = observedLibraries.get(dir)
  if (!entry) {
    const library = loadObservedLibrary(dir)
    entry = { library, inputs: observedMatchInputs(library) }
    observedLibraries.set(dir, entry)
  }
  return entry
}

/** Builds (or takes from this thread's cache) the prepared library of a version. */
export function preparedLibrary(spec: LibrarySpec): PreparedMatchLibrary {
  const cached = prepared.get(spec.versionId)
  if (cached) return cached
  const inputs: MatchStandardInput[] = []
  if (spec.models.length > 0) {
    const ids = new Map(spec.models.map((m) => [m.modelId, m.standardId]))
    inputs.push(...modelMatchInputs(modelLibraryAt(spec.modelDir), (modelId) => ids.get(modelId)))
  }
  if (spec.templates.length > 0) {
    const ids = new Map(spec.templates.map((t) => [t.templateId, t.standardId]))
    for (const input of observedLibraryAt(spec.observedDir).inputs) {
      const id = ids.get(input.templateId!)
      if (id !== undefined) inputs.push({ ...input, id })
    }
  }
  for (const o of spec.observed) {
    inputs.push({
      id: o.standardId,
      modelId: null,
      templateId: null,
      source: 'observed',
      star: o.star,
      instrumentId: o.instrumentId,
      snr: o.snr,
      origin: o.origin,
      spectralType: o.spectralType,
      typeCode: o.typeCode,
      luminosityClass: o.luminosityClass,
      classCode: o.classCode,
      teff: o.teff,
      logg: o.logg,
      feh: o.feh,
      rectified: o.rectified,
      resolutionFwhm: o.resolutionFwhm,
    })
  }
  const lib = prepareMatchLibrary(inputs, { versionId: spec.versionId, versionName: spec.name, grid: DEFAULT_GRID })
  // Versions are immutable once published, so old entries only cost memory: keep the two latest.
  if (prepared.size >= 2) prepared.delete(prepared.keys().next().value!)
  prepared.set(spec.versionId, lib)
  return lib
}

/** The default library without a database: every shipped observed standard, ids = row number + 1. */
export function defaultLibrary(observedDir = DEFAULT_OBSERVED_DIR): PreparedMatchLibrary {
  const { library, inputs } = observedLibraryAt(observedDir)
  return prepareMatchLibrary(inputs, { versionId: 0, versionName: library.manifest.version, grid: DEFAULT_GRID })
}

export default function process(task: WorkerTask): PipelineOutput {
  const { library, ...input } = task
  return runPipeline(input, library ? preparedLibrary(library) : undefined)
}
