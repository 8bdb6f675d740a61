/**
 * The on-disk layout of a model standards library and its loader (see templates/README.md).
 */
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import type { LuminosityClass, SpectralLetter } from '../../shared/calibration'
import type { LogGrid } from '../../shared/grid'
import { readFloat32, type ManifestFile } from '../format'

export { float32LittleEndian, sha256, type ManifestFile } from '../format'

/** One standard as listed in manifest.json; rows of the data files follow this order. */
export interface ManifestStandard {
  id: string
  spectralType: string
  letter: SpectralLetter
  subtype: number
  typeCode: number
  luminosityClass: LuminosityClass
  /** K. */
  Teff: number
  /** log10 g, cgs. */
  logg: number
  /** Microturbulence, km s⁻¹. */
  vmicro: number
  /** Balmer jump 2.5 log(F₃₆₅₀/F₃₆₄₀) of the model continuum, mag. */
  balmerJump: number
  /** SHA-256 (hex) of this standard's row of rectified.f32. */
  checksum: string
  /** SHA-256 (hex) of this standard's row of continuum.f32. */
  continuumChecksum: string
}

export interface ModelLibraryManifest {
  format: 'lineweight-model-library'
  version: string
  generatorVersion: string
  /** Wavelengths in Å, air; λ_i = start · exp(step · i). */
  grid: LogGrid & { medium: 'air'; unit: 'angstrom' }
  continuumGrid: LogGrid & { medium: 'air'; unit: 'angstrom' }
  /** Instrumental resolution of the rectified spectra, FWHM Å (constant in Å). */
  resolutionFwhm: number
  rectified: ManifestFile
  continuum: ManifestFile & { unit: 'erg s-1 cm-2 A-1 (surface flux)' }
  standards: ManifestStandard[]
}

/** A loaded standard: views into the library arrays. */
export interface ModelStandard {
  entry: ManifestStandard
  /** Continuum-normalised flux on `grid`. */
  rectified: Float32Array
  /** Continuum surface flux on `grid`, interpolated from the stored continuum grid. */
  continuum: Float32Array
}

export interface ModelLibrary {
  manifest: ModelLibraryManifest
  grid: LogGrid
  /** All rectified rows, standards × grid.length. */
  rectified: Float32Array
  /** All continuum rows on the stored continuum grid, standards × continuumGrid.length. */
  storedContinuum: Float32Array
  standards: ModelStandard[]
}

/**
 * Loads a model library written by the generator: reads manifest.json and the two float32
 * files, checks sizes (and SHA-256 when `verify`), and returns the arrays with one view per
 * standard. The continuum is interpolated linearly in ln F from the stored coarse grid onto
 * the library grid.
 * @param dir directory holding manifest.json
 * @param options.verify check the file SHA-256 digests @default true
 */
export function loadModelLibrary(dir: string, options: { verify?: boolean } = {}): ModelLibrary {
  const verify = options.verify ?? true
  const manifest = JSON.parse(readFileSync(join(dir, 'manifest.json'), 'utf8')) as ModelLibraryManifest
  if (manifest.format !== 'lineweight-model-library') throw new Error(`${dir}/manifest.json is not a model library manifest`)
  const n = manifest.standards.length
  const grid: LogGrid = { start: manifest.grid.start, step: manifest.grid.step, length: manifest.grid.length }
  const cgrid: LogGrid = { start: manifest.continuumGrid.start, step: manifest.continuumGrid.step, length: manifest.continuumGrid.length }
  if (manifest.rectified.rows !== n || manifest.rectified.columns !== grid.length) throw new Error('rectified.f32 shape does not match the manifest')
  if (manifest.continuum.rows !== n || manifest.continuum.columns !== cgrid.length) throw new Error('continuum.f32 shape does not match the manifest')
  const rectified = readFloat32(join(dir, manifest.rectified.path), manifest.rectified, verify)
  const storedContinuum = readFloat32(join(dir, manifest.continuum.path), manifest.continuum, verify)
  const standards: ModelStandard[] = manifest.standards.map((entry, row) => {
    const stored = storedContinuum.subarray(row * cgrid.length, (row + 1) * cgrid.length)
    return {
      entry,
      rectified: rectified.subarray(row * grid.length, (row + 1) * grid.length),
      continuum: continuumOnGrid(stored, cgrid, grid),
    }
  })
  return { manifest, grid, rectified, storedContinuum, standards }
}

/** Interpolates a continuum linearly in ln F against ln λ from one log grid onto another. */
export function continuumOnGrid(values: Float32Array, from: LogGrid, to: LogGrid): Float32Array {
  const out = new Float32Array(to.length)
  for (let i = 0; i < to.length; i++) {
    const x = (Math.log(to.start / from.start) + i * to.step) / from.step
    const j = Math.min(from.length - 2, Math.max(0, Math.floor(x)))
    const t = x - j
    const a = Math.log(values[j]!)
    const b = Math.log(values[j + 1]!)
    out[i] = Math.exp(a + (b - a) * t)
  }
  return out
}
