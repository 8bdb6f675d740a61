import { gridIndex, gridWavelengths, type LogGrid } from '../../../shared/grid'
import { fitSpectrumContinuum } from '../prepare/continuum'
import { smoothSpectrumToFwhm } from '../prepare/smooth'
import { CRITERIA, criterionValue } from './criteria'
import { balmerHalfDepthWidth } from './flags'

/** One standard as the matcher needs it: its classification, provenance and rectified flux on the library grid. */
export interface MatchStandardInput {
  /** Row id of the standard (database id, or the row number + 1 when there is no database). */
  id: number
  /** Model id from a model library manifest, or null. */
  modelId: string | null
  /** Id in a shipped observed library (templates/observed-v2), or null. */
  templateId: string | null
  source: 'model' | 'observed'
  /** Star name, for observed standards. */
  star: string | null
  /** Where the spectrum comes from ("MILES stellar library v9.1", "uploaded spectrum 12"). */
  origin: string | null
  spectralType: string
  /** O0 = 0 … M0 = 60 (shared/calibration.ts). */
  typeCode: number
  luminosityClass: string
  /** Ia = 1, Iab = 1.5, Ib = 2, II = 3, III = 4, IV = 5, V = 6 (shared/mk.ts); intermediate classes take the mean. */
  classCode: number
  /** Published atmospheric parameters, where known: K, log10 cgs, dex. */
  teff: number | null
  logg: number | null
  feh: number | null
  /** Continuum-normalised flux on the library grid; NaN where undefined. */
  rectified: ArrayLike<number>
  /** The continuum `rectified` was divided by, on the grid, when known: the library's coarser levels then smooth the flux and rectify it again, as a spectrum of that resolution is. */
  continuum?: ArrayLike<number>
  /** Resolution of `rectified`, FWHM Å. */
  resolutionFwhm: number
  /**
   * The instrument whose own standard this is (a team's agreed spectrum promoted for its
   * instrument), or null/absent for a standard every spectrum is matched against (instrument.ts).
   */
  instrumentId?: number | null
  /**
   * S/N per pixel of the standard's own spectrum, where its noise is not negligible (a team's
   * spectrum); the matcher takes that noise out of its χ². Absent for the shipped standards.
   */
  snr?: number | null
}

export interface MatchLibraryOptions {
  /** Library version id (recorded in every suggestion). */
  versionId: number
  /** Library version name, e.g. "observed-v1". */
  versionName: string
  grid: LogGrid
  /**
   * Resolutions the standards are brought to, FWHM Å. A standard takes part at every level at
   * least as coarse as itself. @default a ladder in steps of 2^¼ from the sharpest standard to
   * 20 Å, with each standard's own resolution as a level (see resolutionLadder)
   */
  resolutions?: readonly number[]
  /** Wavelength span kept, Å; every campaign region must lie inside it. @default [3750, 6950] (LATE_TYPE_REGION and a margin) */
  span?: readonly [number, number]
  /** Decimation of the coarse blocks used to screen standards, pixels. @default 4 */
  coarseStep?: number
}

/** A standard's classification and provenance, without its arrays. */
export type MatchStandardInfo = Omit<MatchStandardInput, 'rectified' | 'continuum'>

/** One resolution level of a prepared library: the standards usable at it, brought to its resolution. */
export interface LibraryLevel {
  /** FWHM Å. */
  fwhm: number
  /** Standards (indices into `library.standards`) usable at this level, in order. */
  rows: Int32Array
  /** Row-major, rows × `pixels`, float32; NaN where a standard has no data. */
  flux: Float32Array
  /** Criterion values: criteria × rows (NaN when not measurable). */
  criteria: Float64Array
  /** Every `coarseStep`-th pixel of `flux`, rows × `coarsePixels`, for the cheap first pass of the search. */
  coarse: Float32Array
  /**
   * Per row: the rms residual (rectified units) of the best level-and-depth fit of this standard by
   * its nearest other standard at this level, over 3900–5500 Å on the coarse pixels. The spread of
   * these residuals among standards of one type says how well a normal star can be fitted.
   */
  neighbourResidual: Float64Array
  /** Per row: the mean width of Hδ, Hγ, Hβ at half depth, Å (flags.ts balmerHalfDepthWidth). */
  balmerWidth: Float64Array
  /** Sorted distinct type codes at this level. */
  typeCodes: number[]
}

/** Everything matching needs for one library version; levels are prepared on first use and kept. */
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
  /** Level resolutions, FWHM Å, ascending. */
  resolutions: number[]
  /** The level of resolution `fwhm` (one of `resolutions`), prepared on first use. */
  level(fwhm: number): LibraryLevel
  /** The type codes of the standards that serve level `fwhm`, ascending, without preparing it (an instrument's view of the library may hold fewer). */
  typeCodesAt(fwhm: number): number[]
  /**
   * Standard `k`'s flux at level `fwhm` over the span, as the level holds it (null when it is not in
   * the level): from the level when it is prepared, else smoothed alone, so that a few standards at
   * every level cost no level's preparation.
   */
  standardFlux(fwhm: number, k: number): Float32Array | null
  /** Decimation of the coarse blocks, pixels. */
  coarseStep: number
  /** Pixels per standard in a coarse block: ⌈pixels / coarseStep⌉. */
  coarsePixels: number
  /**
   * The library as a spectrum that covers only `range` (Å) sees it: every standard with a known
   * continuum smoothed, cut to the range and rectified there again, as the spectrum was (a
   * continuum fitted over part of a spectrum differs from one fitted over all of it, most near the
   * ends and in cool stars). Ranges are rounded to 25 Å; this library itself when the range
   * reaches both ends of the grid; eight views are kept.
   */
  rectifiedOver(range: readonly [number, number]): PreparedMatchLibrary
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
 * Resolution levels for a set of standards, FWHM Å: a ladder in steps of 2^¼ (19 %) from the
 * sharpest standard's resolution to `max`, with each standard's own resolution added as a level
 * and ladder steps within 8 % of such a level dropped. A spectrum is matched at the level at or
 * just above its own resolution, so the two are never more than one step apart.
 */
export function resolutionLadder(own: readonly number[], max = 20): number[] {
  const sharpest = Math.min(...own)
  const levels = [...new Set(own.map((r) => Math.round(r * 100) / 100))]
  for (let r = sharpest; r <= max * 1.001; r *= 2 ** 0.25) {
    const x = Math.round(r * 100) / 100
    if (levels.every((l) => Math.abs(Math.log(l / x)) > Math.log(1.08))) levels.push(x)
  }
  return levels.sort((a, b) => a - b)
}

/**
 * Prepares a library version for matching: applies {@link replaceModelsByObserved}, cuts every
 * standard to the span and, level by level on first use, smooths each standard sharper than the
 * level with a Gaussian of √(level² − own²) Å (smoothSpectrumToFwhm) — its flux, rectified again
 * in ln F as spectra are, where its continuum is known — measures the line criteria
 * (criteria.ts) and each standard's residual against its nearest neighbour.
 * Cost per level: about 1–2 s for 350 standards; done once per version and thread.
 * @throws when no standard is given, or a standard's array does not match the grid
 */
export function prepareMatchLibrary(inputs: readonly MatchStandardInput[], options: MatchLibraryOptions): PreparedMatchLibrary {
  const { grid, span = [3750, 6950], coarseStep = 4 } = options
  const kept = replaceModelsByObserved(inputs)
  if (kept.length === 0) throw new Error('a library needs at least one standard')
  for (const s of kept) if (s.rectified.length !== grid.length) throw new Error(`standard ${s.spectralType} has ${s.rectified.length} pixels, the grid ${grid.length}`)
  const resolutions = [...(options.resolutions ?? resolutionLadder(kept.map((s) => s.resolutionFwhm)))].sort((a, b) => a - b)
  const offset = Math.max(0, Math.ceil(gridIndex(grid, span[0])))
  const end = Math.min(grid.length, Math.floor(gridIndex(grid, span[1])) + 1)
  const pixels = end - offset
  const all = gridWavelengths(grid)
  const wavelength = all.slice(offset, end)
  const coarsePixels = Math.ceil(pixels / coarseStep)
  const sources = kept.map((s) => Float64Array.from(s.rectified))
  const continua = kept.map((s) => (s.continuum && s.continuum.length === grid.length ? s.continuum : null))
  const standards = kept.map(({ rectified: _r, continuum: _c, ...info }) => info)
  // A standard up to 30 % coarser than the level still serves it: an estimated resolution may fall just short of the level where the only standards of some types (the O stars, at 15 Å) are.
  const servesLevel = (s: MatchStandardInfo, fwhm: number) => s.resolutionFwhm <= fwhm * 1.3
  const rowsAt = (fwhm: number): number[] => {
    const rowList: number[] = []
    standards.forEach((s, k) => {
      if (servesLevel(s, fwhm)) rowList.push(k)
    })
    return rowList
  }
  const typeCodesAt = (fwhm: number): number[] => [...new Set(rowsAt(fwhm).map((k) => standards[k]!.typeCode))].sort((a, b) => a - b)
  /** Standard `k` at level `fwhm` over the span: smoothed where it is sharper, and rectified over `range` again when one is given. */
  const smoothedAt = (k: number, fwhm: number, range: readonly [number, number] | null): Float64Array => {
    const flux = sources[k]!
    const own = standards[k]!.resolutionFwhm
    let smoothed: Float64Array = flux
    const continuum = continua[k]
    if (range && continuum) smoothed = rectifyOver(flux, continuum, fwhm > own * 1.001 ? { targetFwhm: fwhm, inputFwhm: own } : null, range)
    else if (fwhm > own * 1.001) {
      const mask = new Uint8Array(flux.length)
      for (let i = 0; i < flux.length; i++) if (!Number.isFinite(flux[i]!) || (continuum && !Number.isFinite(continuum[i]!))) mask[i] = 1
      if (continuum) {
        // Smoothed as flux and rectified again, as a spectrum of this resolution is: blended lines
        // move a fitted continuum, so smoothing the rectified flux would not give what a spectrum shows.
        const raw = Float64Array.from(flux, (v, i) => (mask[i] ? 0 : v * continuum[i]!))
        const blurred = smoothSpectrumToFwhm({ wavelength: all, flux: raw, mask }, { grid, targetFwhm: fwhm, inputFwhm: own })
        const fit = fitSpectrumContinuum(blurred, { space: 'log' })
        smoothed = Float64Array.from(fit.rectified, (v, i) => (blurred.mask![i] ? Number.NaN : v))
      } else {
        smoothed = smoothSpectrumToFwhm({ wavelength: all, flux, mask }, { grid, targetFwhm: fwhm, inputFwhm: own }).flux
      }
    }
    return smoothed.subarray(offset, end)
  }
  const prepareLevel = (fwhm: number, range: readonly [number, number] | null): LibraryLevel => {
    const rowList = rowsAt(fwhm)
    const rows = Int32Array.from(rowList)
    const n = rows.length
    const level: LibraryLevel = {
      fwhm,
      rows,
      flux: new Float32Array(n * pixels),
      criteria: new Float64Array(CRITERIA.length * n),
      coarse: new Float32Array(n * coarsePixels),
      neighbourResidual: new Float64Array(n),
      balmerWidth: new Float64Array(n),
      typeCodes: typeCodesAt(fwhm),
    }
    rows.forEach((k, r) => {
      const slice = smoothedAt(k, fwhm, range)
      level.flux.set(slice, r * pixels)
      for (let j = 0; j < coarsePixels; j++) level.coarse[r * coarsePixels + j] = slice[j * coarseStep]!
      CRITERIA.forEach((c, ci) => {
        level.criteria[ci * n + r] = criterionValue(c, slice, wavelength)
      })
      level.balmerWidth[r] = balmerHalfDepthWidth(slice, wavelength)
    })
    fillNeighbourResiduals(level, standards, wavelength, coarseStep, coarsePixels)
    return level
  }

  /** Standards (their flux times their continuum) smoothed to a level, cut to `range` and rectified again there. */
  const rectifyOver = (flux: Float64Array, continuum: ArrayLike<number>, smoothing: { targetFwhm: number; inputFwhm: number } | null, range: readonly [number, number]) => {
    const mask = new Uint8Array(flux.length)
    for (let i = 0; i < flux.length; i++) if (!Number.isFinite(flux[i]!) || !Number.isFinite(continuum[i]!)) mask[i] = 1
    const raw = Float64Array.from(flux, (v, i) => (mask[i] ? 0 : v * continuum[i]!))
    const blurred = smoothing ? smoothSpectrumToFwhm({ wavelength: all, flux: raw, mask }, { grid, ...smoothing }) : { wavelength: all, flux: raw, mask }
    const cut = Uint8Array.from(blurred.mask!, (m, i) => (m || all[i]! < range[0] || all[i]! > range[1] ? 1 : 0))
    const fit = fitSpectrumContinuum({ wavelength: all, flux: blurred.flux, mask: cut }, { space: 'log' })
    return Float64Array.from(fit.rectified, (v, i) => (cut[i] ? Number.NaN : v))
  }

  const views = new Map<string, PreparedMatchLibrary>()
  const view = (range: readonly [number, number] | null): PreparedMatchLibrary => {
    const levels = new Map<number, LibraryLevel>()
    // Standards smoothed one at a time, per level, until so many are asked for that the whole level is prepared.
    const loose = new Map<number, Map<number, Float32Array>>()
    const mustBeLevel = (fwhm: number) => {
      if (!resolutions.includes(fwhm)) throw new Error(`${fwhm} Å is not a level of this library (${resolutions.join(', ')})`)
    }
    const levelOf = (fwhm: number): LibraryLevel => {
      let level = levels.get(fwhm)
      if (!level) {
        mustBeLevel(fwhm)
        level = prepareLevel(fwhm, range)
        levels.set(fwhm, level)
        loose.delete(fwhm)
      }
      return level
    }
    return {
      versionId: options.versionId,
      versionName: options.versionName,
      grid,
      offset,
      pixels,
      wavelength,
      standards,
      resolutions,
      level: levelOf,
      typeCodesAt,
      standardFlux(fwhm: number, k: number): Float32Array | null {
        mustBeLevel(fwhm)
        if (!servesLevel(standards[k]!, fwhm)) return null
        if (!levels.has(fwhm)) {
          let rows = loose.get(fwhm)
          if (!rows) loose.set(fwhm, (rows = new Map()))
          let flux = rows.get(k)
          if (!flux && rows.size < LOOSE_STANDARDS) rows.set(k, (flux = Float32Array.from(smoothedAt(k, fwhm, range))))
          if (flux) return flux
        }
        const level = levelOf(fwhm)
        const r = level.rows.indexOf(k)
        return level.flux.subarray(r * pixels, (r + 1) * pixels)
      },
      coarseStep,
      coarsePixels,
      rectifiedOver(wanted: readonly [number, number]): PreparedMatchLibrary {
        const lo = Math.max(all[0]!, Math.round(wanted[0] / RANGE_STEP) * RANGE_STEP)
        const hi = Math.min(all[all.length - 1]!, Math.round(wanted[1] / RANGE_STEP) * RANGE_STEP)
        if (lo - all[0]! < RANGE_STEP && all[all.length - 1]! - hi < RANGE_STEP) return full
        const key = `${lo}-${hi}`
        let hit = views.get(key)
        if (!hit) {
          if (views.size >= 8) views.delete(views.keys().next().value!)
          views.set(key, (hit = view([lo, hi])))
        }
        return hit
      },
    }
  }
  const full = view(null)
  return full
}

/** Standards a view smooths one at a time at a level (standardFlux) before it prepares the whole level. */
const LOOSE_STANDARDS = 36

/** Ranges the standards are rectified over are rounded to this many Å, so that spectra of one setting share them. */
const RANGE_STEP = 25

/** Where LibraryLevel.neighbourResidual is measured, Å. */
export const NEIGHBOUR_RESIDUAL_RANGE: readonly [number, number] = [3900, 5500]

/** Residual of each row against its nearest other row (another star), on the coarse pixels of 3900–5500 Å. */
export function fillNeighbourResiduals(level: LibraryLevel, standards: readonly MatchStandardInfo[], wavelength: Float64Array, step: number, cp: number): void {
  const [from, to] = coarseSpan(wavelength, step, cp, NEIGHBOUR_RESIDUAL_RANGE)
  level.neighbourResidual.set(neighbourResiduals(level, standards, cp, from, to))
}

/** The coarse pixels from..to (exclusive) of `range`, Å. */
function coarseSpan(wavelength: Float64Array, step: number, cp: number, range: readonly [number, number]): [number, number] {
  let from = 0
  while (from < cp && wavelength[from * step]! < range[0]) from++
  let to = from
  while (to < cp && wavelength[to * step]! < range[1]) to++
  return [from, to]
}

const regionResiduals = new WeakMap<LibraryLevel, Map<string, Float64Array>>()

/**
 * The neighbour residuals of a level over another region than NEIGHBOUR_RESIDUAL_RANGE (a
 * campaign's, or the part of the default one a spectrum covers), so that a fit is judged against
 * fits over the same lines: the blue holds more lines than 3900–5500 Å, and every fit there
 * leaves more residual. Ends are rounded to 8 coarse pixels and the result is kept per level.
 */
export function neighbourResidualsOver(library: PreparedMatchLibrary, level: LibraryLevel, region: readonly [number, number]): Float64Array {
  const cp = library.coarsePixels
  const span = coarseSpan(library.wavelength, library.coarseStep, cp, region)
  const from = Math.floor(span[0] / 8) * 8
  const to = Math.min(cp, Math.ceil(span[1] / 8) * 8)
  let cache = regionResiduals.get(level)
  if (!cache) regionResiduals.set(level, (cache = new Map()))
  const key = `${from}-${to}`
  let residuals = cache.get(key)
  if (!residuals) {
    residuals = neighbourResiduals(level, library.standards, cp, from, to)
    if (cache.size >= 32) cache.delete(cache.keys().next().value!)
    cache.set(key, residuals)
  }
  return residuals
}

/** Residual of each row against its nearest other row (another star), on coarse pixels from..to. */
function neighbourResiduals(level: LibraryLevel, standards: readonly MatchStandardInfo[], cp: number, from: number, to: number): Float64Array {
  const n = level.rows.length
  const out = new Float64Array(n)
  const c = level.coarse
  for (let a = 0; a < n; a++) {
    let best = Infinity
    const starA = standards[level.rows[a]!]!.star
    for (let b = 0; b < n; b++) {
      if (b === a || (starA !== null && standards[level.rows[b]!]!.star === starA)) continue
      let m = 0,
        sx = 0,
        sy = 0,
        sxx = 0,
        sxy = 0,
        syy = 0
      for (let j = from; j < to; j++) {
        const y = c[a * cp + j]!
        const x = c[b * cp + j]!
        if (x !== x || y !== y) continue
        m++
        sx += x
        sy += y
        sxx += x * x
        sxy += x * y
        syy += y * y
      }
      if (m < 10) continue
      const vx = sxx - (sx * sx) / m
      const cxy = sxy - (sx * sy) / m
      const r = (syy - (sy * sy) / m - (vx > 0 ? (cxy * cxy) / vx : 0)) / m
      if (r < best) best = r
    }
    out[a] = Number.isFinite(best) ? Math.sqrt(Math.max(0, best)) : Number.NaN
  }
  return out
}

/**
 * The level for a spectrum of resolution `fwhm`: the sharpest level at least as coarse, else the
 * coarsest. Never a sharper one: a spectrum cannot be sharpened, and standards sharper than it
 * leave residuals at every line.
 */
export function levelFor(library: PreparedMatchLibrary, fwhm: number | undefined): number {
  const r = library.resolutions
  if (fwhm === undefined || !(fwhm > 0)) return r[0]!
  return r.find((l) => l >= fwhm * 0.999) ?? r[r.length - 1]!
}

/** What {@link modelMatchInputs} needs of a loaded model library (templates/generator/library.ts). */
export interface ModelLibraryLike {
  manifest: { resolutionFwhm: number }
  standards: ReadonlyArray<{ entry: { id: string; spectralType: string; typeCode: number; luminosityClass: string; Teff: number; logg: number }; rectified: Float32Array }>
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
      templateId: null,
      source: 'model',
      star: null,
      origin: 'model standard',
      spectralType: s.entry.spectralType,
      typeCode: s.entry.typeCode,
      luminosityClass: s.entry.luminosityClass,
      classCode: CLASS_CODES[s.entry.luminosityClass] ?? Number.NaN,
      teff: s.entry.Teff,
      logg: s.entry.logg,
      feh: 0,
      rectified: s.rectified,
      resolutionFwhm: library.manifest.resolutionFwhm,
    })
  })
  return out
}

/** Class codes of the model library's classes (shared/mk.ts classCodeOf). */
const CLASS_CODES: Record<string, number> = { Ia: 1, Iab: 1.5, Ib: 2, II: 3, III: 4, IV: 5, V: 6 }

/** What {@link observedMatchInputs} needs of a loaded observed library (templates/observed/library.ts). */
export interface ObservedLibraryLike {
  grid: LogGrid
  standards: ReadonlyArray<{
    entry: { id: string; star: string; spectralType: string; typeCode: number; luminosityClass: string; classCode: number; teff: number | null; logg: number | null; feh: number | null }
    source: { name: string; resolutionFwhm: number }
    flux: Float32Array
  }>
}

/**
 * The standards of an observed library as matcher inputs, each rectified with the same continuum
 * fit the spectra get (fitSpectrumContinuum in ln F, about 2 ms a standard); `idOf` gives each template
 * id its database id (default: the row number + 1), and templates it returns undefined for are left out.
 */
export function observedMatchInputs(library: ObservedLibraryLike, idOf: (templateId: string, row: number) => number | undefined = (_t, row) => row + 1): MatchStandardInput[] {
  const wavelength = gridWavelengths(library.grid)
  const out: MatchStandardInput[] = []
  library.standards.forEach((s, row) => {
    const id = idOf(s.entry.id, row)
    if (id === undefined) return
    const flux = Float64Array.from(s.flux, (v) => (Number.isFinite(v) ? v : 0))
    const mask = Uint8Array.from(s.flux, (v) => (Number.isFinite(v) ? 0 : 1))
    const { rectified, continuum } = fitSpectrumContinuum({ wavelength, flux, mask }, { space: 'log' })
    out.push({
      id,
      modelId: null,
      templateId: s.entry.id,
      source: 'observed',
      star: s.entry.star,
      origin: s.source.name,
      spectralType: s.entry.spectralType,
      typeCode: s.entry.typeCode,
      luminosityClass: s.entry.luminosityClass,
      classCode: s.entry.classCode,
      teff: s.entry.teff,
      logg: s.entry.logg,
      feh: s.entry.feh,
      rectified: Float64Array.from(rectified, (v, i) => (mask[i] ? Number.NaN : v)),
      continuum: Float64Array.from(continuum, (v, i) => (mask[i] ? Number.NaN : v)),
      resolutionFwhm: s.source.resolutionFwhm,
    })
  })
  return out
}
