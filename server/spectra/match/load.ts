// Standards libraries as the matcher takes them, loaded from disk: the shipped observed library
// (the default), the retired model grid, and a published version's spec. The one part of the
// numeric core that reads files (through the templates' loaders), so match/index.ts does not
// export it; each thread keeps what it loaded, keyed by directory and by version id.
import { fileURLToPath } from 'node:url'
import { DEFAULT_GRID } from '../../../shared/grid'
import { loadModelLibrary, type ModelLibrary } from '../../../templates/generator/library'
import { loadObservedLibrary, type ObservedLibrary } from '../../../templates/observed/library'
import { modelMatchInputs, observedMatchInputs, prepareMatchLibrary, type MatchStandardInput, type PreparedMatchLibrary } from './library'

/** Directory of the model library (kept for library versions published before the observed library). */
export const DEFAULT_MODEL_DIR = fileURLToPath(new URL('../../../templates/model-v1', import.meta.url))
/** Directory of the shipped observed library, the default standards. */
export const DEFAULT_OBSERVED_DIR = fileURLToPath(new URL('../../../templates/observed-v2', import.meta.url))

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

const modelLibraries = new Map<string, ModelLibrary>()
const observedLibraries = new Map<string, { library: ObservedLibrary; inputs: MatchStandardInput[]; retired: MatchStandardInput[] }>()
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

/**
 * The observed library in `dir` with its standards rectified as matcher inputs (ids = index + 1),
 * and the standards of earlier versions it leaves out (ids after those), loaded once per thread.
 */
export function observedLibraryAt(dir: string): { library: ObservedLibrary; inputs: MatchStandardInput[]; retired: MatchStandardInput[] } {
  let entry = observedLibraries.get(dir)
  if (!entry) {
    const library = loadObservedLibrary(dir)
    const n = library.standards.length
    entry = { library, inputs: observedMatchInputs(library), retired: observedMatchInputs({ grid: library.grid, standards: library.retired }, (_t, k) => n + k + 1) }
    observedLibraries.set(dir, entry)
  }
  return entry
}

/** A shipped standard's matcher input by template id, whether in the current version or retired from it. */
export function observedInputByTemplate(dir: string, templateId: string): MatchStandardInput | undefined {
  const { inputs, retired } = observedLibraryAt(dir)
  return inputs.find((i) => i.templateId === templateId) ?? retired.find((i) => i.templateId === templateId)
}

/** The prepared library of a version, if this thread has built it. */
export function cachedPreparedLibrary(versionId: number): PreparedMatchLibrary | undefined {
  return prepared.get(versionId)
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
    const { inputs: current, retired } = observedLibraryAt(spec.observedDir)
    for (const input of [...current, ...retired]) {
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
