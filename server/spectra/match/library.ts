import { gridIndex, gridWavelengths, type LogGrid } from '../../../shared/grid'
import { smoothSpectrumToFwhm } from '../prepare/smooth'
import { CRITERIA, criterionValue } from './criteria'

/** One standard as the matcher needs it: its classification and its rectified flux on the library grid. */
export interface MatchStandardInput {
  /** Row id of the standard (database id, or the row number when there is no database). */
  id: number
  /** Model id from the manifest, or null for an observed standard. */
  modelId: string | null
  source: 'model' | 'observed'
  spectralType: string
  /** O0 = 0 … M0 = 60 (shared/calibration.ts). */
  typeCode: number
  luminosityClass: string
  /** Ia = 1, Ib = 2, II = 3, III = 4, IV = 5, V = 6 (shared/mk.ts). */
  classCode: number
  /** Continuum-normalised flux on the library grid; NaN where undefined. */
  rectified: ArrayLike<number>
  /** Resolution of `rectified`, FWHM Å. */
  resolutionFwhm: number
}

export interface MatchLibraryOptions {
  /** Library version id (recorded in every suggestion). */
  versionId: number
  /** Library version name, e.g. "model-v1". */
  versionName: string
  grid: LogGrid
  /**
   * Resolutions the standards are smoothed to, FWHM Å; a spectrum is matched at the nearest one.
   * @default [1.5, 2, 3, 4, 5, 6, 8]
   */
  resolutions?: readonly number[]
  /** Wavelength span kept, Å; every campaign region must lie inside it. @default [3750, 5600] */
  span?: readonly [number, number]
  /**
   * Decimation of the coarse blocks used to screen standards, pixels. 4 keeps about one pixel
   * per resolution element at the sharpest level (1.5 Å ≈ 3.4 pixels at 4400 Å). @default 4
   */
  coarseStep?: number
}

/** A standard's classification, without its arrays. */
export type MatchStandardInfo = Omit<MatchStandardInput, 'rectified' | 'resolutionFwhm'>

/** One resolution level of a prepared library: all standards' flux over the span, standards × pixels. */
export interface LibraryLevel {
  /** FWHM Å. */
  fwhm: number
  /** Row-major, standards × `pixels`, float32; NaN where a standard has no data. */
  flux: Float32Array
  /** Criterion values per standard: criteria × standards (NaN when not measurable). */
  criteria: Float64Array
  /**
   * Every `coarseStep`-th pixel of `flux` (span pixels 0, step, 2·step, …), standards ×
   * `coarsePixels`, for the cheap first pass of the search (see matchSpectrum).
   */
  coarse: Float32Array
}

/** Everything matching needs for one library version, computed once and shared by every spectrum. */
export interface PreparedMatchLibrary {
  versionId: number
  versionName: string
  grid: LogGrid
  /** First grid pixel of the stored span. */
  offset: number
  /** Pixels in the span. */
  pixels: number
  /** Wavelengths of the span, Å. */
  wavelength: Float64Array
  standards: MatchStandardInfo[]
  levels: LibraryLevel[]
  /** Sorted distinct class codes and type codes present. */
  classCodes: number[]
  typeCodes: number[]
  /** Decimation of the coarse blocks, pixels. @default 4 */
  coarseStep: number
  /** Pixels per standard in a coarse block: ⌈pixels / coarseStep⌉. */
  coarsePixels: number
  /** The (type, class) points of the grid and which standards sit at each (see {@link GridPoints}). */
  points: GridPoints
}

/**
 * The (type, class) points of a library, computed once so that matching needs no maps or
 * string keys per spectrum. Points are numbered in order of class code, then type code.
 */
export interface GridPoints {
  typeCode: Float64Array
  classCode: Float64Array
  /** Point of each standard. */
  ofStandard: Int32Array
  /** Standards of point p: members[start[p] … start[p + 1]). */
  start: Int32Array
  members: Int32Array
  /** Point at the next lower (earlier) / higher (later) type code within the same class; −1 at the ends. */
  earlier: Int32Array
  later: Int32Array
}

/**
 * Observed standards that share type and class with a model standard replace it: a library keeps
 * the observed spectrum of a (type, class) point when it has one.
 */
export function replaceModelsByObserved<T extends Pick<MatchStandardInput, 'source' | 'typeCode' | 'classCode'>>(standards: readonly T[]): T[] {
  const observed = new Set(standards.filter((s) => s.source === 'observed').map((s) => `${s.typeCode}|${s.classCode}`))
  return standards.filter((s) => s.source === 'observed' || !observed.has(`${s.typeCode}|${s.classCode}`))
}

/**
 * Prepares a library version for matching: applies {@link replaceModelsByObserved}, cuts every
 * standard to the span, and smooths it with a Gaussian to each resolution level
 * (√(target² − own²) Å, see smoothSpectrumToFwhm; a standard already broader than a level is kept
 * as it is). Also measures each line criterion (see criteria.ts) on every standard and level,
 * so that a spectrum's criteria compare with standards seen at its own resolution.
 * Cost: about 1–3 s for 211 standards and seven levels; done once per version and cached.
 * @throws when no standard is given, or a standard's array does not match the grid
 */
export function prepareMatchLibrary(inputs: readonly MatchStandardInput[], options: MatchLibraryOptions): PreparedMatchLibrary {
  const { grid, resolutions = [1.5, 2, 3, 4, 5, 6, 8], span = [3750, 5600], coarseStep = 4 } = options
  const kept = replaceModelsByObserved(inputs)
  if (kept.length === 0) throw new Error('a library needs at least one standard')
  const offset = Math.max(0, Math.ceil(gridIndex(grid, span[0])))
  const end = Math.min(grid.length, Math.floor(gridIndex(grid, span[1])) + 1)
  const pixels = end - offset
  const all = gridWavelengths(grid)
  const wavelength = all.slice(offset, end)
  const coarsePixels = Math.ceil(pixels / coarseStep)
  const levels: LibraryLevel[] = [...resolutions].sort((a, b) => a - b).map((fwhm) => ({
    fwhm,
    flux: new Float32Array(kept.length * pixels),
    criteria: new Float64Array(CRITERIA.length * kept.length),
    coarse: new Float32Array(kept.length * coarsePixels),
  }))
  kept.forEach((s, row) => {
    if (s.rectified.length !== grid.length) throw new Error(`standard ${s.spectralType} has ${s.rectified.length} pixels, the grid ${grid.length}`)
    const flux = Float64Array.from(s.rectified)
    const mask = new Uint8Array(flux.length)
    for (let i = 0; i < flux.length; i++) if (!Number.isFinite(flux[i]!)) mask[i] = 1
    for (const level of levels) {
      const smoothed =
        level.fwhm > s.resolutionFwhm
          ? smoothSpectrumToFwhm({ wavelength: all, flux, mask }, { grid, targetFwhm: level.fwhm, inputFwhm: s.resolutionFwhm }).flux
          : flux
      const slice = smoothed.subarray(offset, end)
      level.flux.set(slice, row * pixels)
      for (let j = 0; j < coarsePixels; j++) level.coarse[row * coarsePixels + j] = slice[j * coarseStep]!
      CRITERIA.forEach((c, k) => {
        level.criteria[k * kept.length + row] = criterionValue(c, slice, wavelength)
      })
    }
  })
  const standards = kept.map(({ rectified: _r, resolutionFwhm: _f, ...info }) => info)
  return {
    versionId: options.versionId,
    versionName: options.versionName,
    grid,
    offset,
    pixels,
    wavelength,
    standards,
    levels,
    classCodes: [...new Set(standards.map((s) => s.classCode))].sort((a, b) => a - b),
    typeCodes: [...new Set(standards.map((s) => s.typeCode))].sort((a, b) => a - b),
    coarseStep,
    coarsePixels,
    points: gridPoints(standards),
  }
}

function gridPoints(standards: readonly MatchStandardInfo[]): GridPoints {
  const keys = [...new Map(standards.map((s) => [`${s.classCode}|${s.typeCode}`, s])).values()]
    .map((s) => ({ typeCode: s.typeCode, classCode: s.classCode }))
    .sort((a, b) => a.classCode - b.classCode || a.typeCode - b.typeCode)
  const index = new Map(keys.map((k, p) => [`${k.classCode}|${k.typeCode}`, p]))
  const np = keys.length
  const ofStandard = Int32Array.from(standards, (s) => index.get(`${s.classCode}|${s.typeCode}`)!)
  const start = new Int32Array(np + 1)
  for (const p of ofStandard) start[p + 1] = start[p + 1]! + 1
  for (let p = 0; p < np; p++) start[p + 1] = start[p + 1]! + start[p]!
  const fill = start.slice(0, np)
  const members = new Int32Array(standards.length)
  ofStandard.forEach((p, k) => {
    members[fill[p]!] = k
    fill[p] = fill[p]! + 1
  })
  const earlier = new Int32Array(np).fill(-1)
  const later = new Int32Array(np).fill(-1)
  for (let p = 1; p < np; p++) {
    if (keys[p]!.classCode === keys[p - 1]!.classCode) {
      earlier[p] = p - 1
      later[p - 1] = p
    }
  }
  return {
    typeCode: Float64Array.from(keys, (k) => k.typeCode),
    classCode: Float64Array.from(keys, (k) => k.classCode),
    ofStandard,
    start,
    members,
    earlier,
    later,
  }
}

/** The level whose resolution is nearest `fwhm` (in ln FWHM), or the sharpest when `fwhm` is unknown. */
export function nearestLevel(library: PreparedMatchLibrary, fwhm: number | undefined): LibraryLevel {
  const levels = library.levels
  if (fwhm === undefined || !(fwhm > 0)) return levels[0]!
  let best = levels[0]!
  for (const l of levels) if (Math.abs(Math.log(l.fwhm / fwhm)) < Math.abs(Math.log(best.fwhm / fwhm))) best = l
  return best
}

/** What {@link modelMatchInputs} needs of a loaded model library (templates/generator/library.ts). */
export interface ModelLibraryLike {
  manifest: { resolutionFwhm: number }
  standards: ReadonlyArray<{ entry: { id: string; spectralType: string; typeCode: number; luminosityClass: string }; rectified: Float32Array }>
}

/**
 * The standards of a model library as matcher inputs; `idOf` gives each model id its database id
 * (default: the row number + 1), and models it returns undefined for are left out.
 */
export function modelMatchInputs(library: ModelLibraryLike, idOf: (modelId: string, row: number) => number | undefined = (_m, row) => row + 1): MatchStandardInput[] {
  const out: MatchStandardInput[] = []
  library.standards.forEach((s, row) => {
    const id = idOf(s.entry.id, row)
    if (id === undefined) return
    out.push({
      id,
      modelId: s.entry.id,
      source: 'model',
      spectralType: s.entry.spectralType,
      typeCode: s.entry.typeCode,
      luminosityClass: s.entry.luminosityClass,
      classCode: CLASS_CODES[s.entry.luminosityClass] ?? Number.NaN,
      rectified: s.rectified,
      resolutionFwhm: library.manifest.resolutionFwhm,
    })
  })
  return out
}

/** Class codes of the library's classes (shared/mk.ts classCodeOf). */
const CLASS_CODES: Record<string, number> = { Ia: 1, Iab: 1.5, Ib: 2, II: 3, III: 4, IV: 5, V: 6 }
