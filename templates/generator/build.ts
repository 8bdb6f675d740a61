/**
 * Builds the default model standards library into templates/model-v1/ (npm run templates).
 * Deterministic: no randomness, no clock; the same sources give the same bytes.
 */
import { mkdirSync, writeFileSync } from 'node:fs'
import { dirname, join, resolve } from 'node:path'
import { fileURLToPath } from 'node:url'
import { DEFAULT_GRID, type LogGrid } from '../../shared/grid'
import { float32LittleEndian, sha256, type ModelLibraryManifest, type ManifestStandard } from './library'
import { plannedStandards, type PlannedStandard } from './standards'
import { planSynthesis, synthesiseStandard } from './synthesis'

export const GENERATOR_VERSION = '1.0.0'
export const LIBRARY_VERSION = 'model-v1'
/** Instrumental resolution of the library, FWHM Å. */
export const RESOLUTION_FWHM = 1.5
/** Continua are smooth on the library grid: store them 8× coarser (same start, Δlnλ = 8e-4). */
export const CONTINUUM_DECIMATION = 8

export function continuumGridFor(grid: LogGrid): LogGrid {
  return { start: grid.start, step: grid.step * CONTINUUM_DECIMATION, length: Math.ceil((grid.length - 1) / CONTINUUM_DECIMATION) + 1 }
}

/**
 * Synthesises the standards and writes manifest.json, rectified.f32 and continuum.f32 to `outDir`.
 * @param options.only ids to build (all when absent)
 * @returns the manifest written
 */
export function buildLibrary(outDir: string, options: { only?: readonly string[] } = {}): ModelLibraryManifest {
  const grid = DEFAULT_GRID
  const cgrid = continuumGridFor(grid)
  const plan = planSynthesis(grid, cgrid, RESOLUTION_FWHM)
  const planned: PlannedStandard[] = plannedStandards().filter((s) => !options.only || options.only.includes(s.id))
  const rectified = new Float32Array(planned.length * grid.length)
  const continuum = new Float32Array(planned.length * cgrid.length)
  const entries: ManifestStandard[] = planned.map((s, row) => {
    const model = synthesiseStandard(plan, { teff: s.teff, logg: s.logg, vmicro: s.vmicro })
    rectified.set(model.rectified, row * grid.length)
    continuum.set(model.continuum, row * cgrid.length)
    return {
      id: s.id,
      spectralType: s.spectralType,
      letter: s.letter,
      subtype: s.subtype,
      typeCode: s.typeCode,
      luminosityClass: s.luminosityClass,
      Teff: s.teff,
      logg: s.logg,
      vmicro: s.vmicro,
      balmerJump: Math.round(model.balmerJump * 1e4) / 1e4,
      checksum: sha256(float32LittleEndian(model.rectified)),
      continuumChecksum: sha256(float32LittleEndian(model.continuum)),
    }
  })
  const rectifiedBytes = float32LittleEndian(rectified)
  const continuumBytes = float32LittleEndian(continuum)
  const manifest: ModelLibraryManifest = {
    format: 'lineweight-model-library',
    version: LIBRARY_VERSION,
    generatorVersion: GENERATOR_VERSION,
    grid: { ...grid, medium: 'air', unit: 'angstrom' },
    continuumGrid: { ...cgrid, medium: 'air', unit: 'angstrom' },
    resolutionFwhm: RESOLUTION_FWHM,
    rectified: { path: 'rectified.f32', dtype: 'float32le', rows: planned.length, columns: grid.length, sha256: sha256(rectifiedBytes) },
    continuum: {
      path: 'continuum.f32',
      dtype: 'float32le',
      rows: planned.length,
      columns: cgrid.length,
      sha256: sha256(continuumBytes),
      unit: 'erg s-1 cm-2 A-1 (surface flux)',
    },
    standards: entries,
  }
  mkdirSync(outDir, { recursive: true })
  writeFileSync(join(outDir, 'rectified.f32'), rectifiedBytes)
  writeFileSync(join(outDir, 'continuum.f32'), continuumBytes)
  writeFileSync(join(outDir, 'manifest.json'), `${JSON.stringify(manifest, null, 2)}\n`)
  return manifest
}

const here = dirname(fileURLToPath(import.meta.url))
if (process.argv[1] && resolve(process.argv[1]) === resolve(here, 'build.ts')) {
  const started = performance.now()
  const out = resolve(here, '..', LIBRARY_VERSION)
  const manifest = buildLibrary(out)
  const seconds = ((performance.now() - started) / 1000).toFixed(1)
  process.stdout.write(`wrote ${manifest.standards.length} standards to ${out} in ${seconds} s\n`)
}
