/**
 * The on-disk layout of an observed standards library (templates/observed-v2/, see
 * templates/README.md) and its loader.
 */
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import type { LogGrid } from '../../shared/grid'
import { readFloat32, type ManifestFile } from '../format'

/** Where a library's spectra come from. */
export interface ObservedSource {
  /** Short key used in standard ids, e.g. "miles". */
  key: string
  /** Library name and version, e.g. "MILES v9.1". */
  name: string
  /** Publications to cite. */
  reference: string
  /** Where the copies used here were taken from. */
  copiedFrom: string
  /** Instrumental resolution of the spectra, FWHM Å. */
  resolutionFwhm: number
  /** What else a user should know about these spectra. */
  note: string
}

/** One star of a source as the manifest lists it, kept or not. */
export interface ObservedEntry {
  /** Unique id, "<source>-<file stem>". */
  id: string
  source: string
  /** Star name as the source gives it. */
  star: string
  /** File name inside the source's folder. */
  file: string
  /** Spectral type exactly as the source publishes it. */
  publishedType: string
  /** Why the star is not a standard of this version; absent for kept stars. */
  excludedBecause?: string
  /** The version from which a standard of earlier versions is left out (its row stays in flux.f32). */
  retiredIn?: string
  /** Row of flux.f32 for kept stars and for retired ones. */
  row?: number
  spectralType?: string
  typeCode?: number
  luminosityClass?: string
  classCode?: number
  /** Published atmospheric parameters where the source gives them. */
  teff: number | null
  logg: number | null
  feh: number | null
  /** Wavelength range the star covers on the grid, Å. */
  coverage?: [number, number]
  /** SHA-256 of this row's bytes in flux.f32. */
  checksum?: string
}

export interface ObservedLibraryManifest {
  format: 'lineweight-observed-library'
  version: string
  builderVersion: string
  /** Wavelengths in Å, air; λ_i = start · exp(step · i). */
  grid: LogGrid & { medium: 'air'; unit: 'angstrom' }
  /** Flux normalised to a median of 1 over `normalisation` Å; NaN outside the star's coverage. */
  normalisation: [number, number]
  flux: ManifestFile
  sources: ObservedSource[]
  /** Every star of every source, kept or not, in source order. */
  entries: ObservedEntry[]
  /** The screening rule, in words. */
  screening: string
  /** Shipped versions built before this one (their standards are this file's rows, retired ones included). */
  earlierVersions?: string[]
}

/** A kept standard with a view into the flux array. */
export interface ObservedStandard {
  entry: ObservedEntry & Required<Pick<ObservedEntry, 'row' | 'spectralType' | 'typeCode' | 'luminosityClass' | 'classCode'>>
  source: ObservedSource
  /** Normalised flux on `grid` (NaN outside coverage). */
  flux: Float32Array
}

export interface ObservedLibrary {
  manifest: ObservedLibraryManifest
  grid: LogGrid
  /** The standards of this version, in row order. */
  standards: ObservedStandard[]
  /** Standards of earlier versions left out of this one (entry.retiredIn), for re-making those versions. */
  retired: ObservedStandard[]
}

/**
 * Loads an observed library: reads manifest.json and flux.f32, checks the size (and SHA-256 when
 * `verify`), and returns one view per standard of the version and per retired one, in row order.
 * @param dir directory holding manifest.json
 * @param options.verify check the file's SHA-256 @default true
 */
export function loadObservedLibrary(dir: string, options: { verify?: boolean } = {}): ObservedLibrary {
  const manifest = JSON.parse(readFileSync(join(dir, 'manifest.json'), 'utf8')) as ObservedLibraryManifest
  if (manifest.format !== 'lineweight-observed-library') throw new Error(`${dir}/manifest.json is not an observed library manifest`)
  const grid: LogGrid = { start: manifest.grid.start, step: manifest.grid.step, length: manifest.grid.length }
  if (manifest.flux.columns !== grid.length) throw new Error('flux.f32 shape does not match the grid')
  const flux = readFloat32(join(dir, manifest.flux.path), manifest.flux, options.verify ?? true)
  const sources = new Map(manifest.sources.map((s) => [s.key, s]))
  const standards: ObservedStandard[] = []
  const retired: ObservedStandard[] = []
  for (const entry of manifest.entries) {
    if (entry.row === undefined) continue
    const source = sources.get(entry.source)
    if (!source) throw new Error(`standard ${entry.id} names an unknown source ${entry.source}`)
    const view = { entry: entry as ObservedStandard['entry'], source, flux: flux.subarray(entry.row * grid.length, (entry.row + 1) * grid.length) }
    ;(entry.retiredIn ? retired : standards).push(view)
  }
  if (standards.length + retired.length !== manifest.flux.rows) throw new Error(`the manifest lists ${standards.length + retired.length} rows for ${manifest.flux.rows} in flux.f32`)
  return { manifest, grid, standards, retired }
}
