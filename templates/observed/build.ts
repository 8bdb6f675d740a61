/**
 * Builds the observed standards library templates/observed-v2/ from real spectra of published
 * type (npm run templates:observed). The reference folder (default ../shared/data, or
 * REFERENCE_DATA_DIR) holds one folder per source with an index.csv; see SOURCES for what each is.
 * Deterministic: the same files give the same bytes.
 */
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs'
import { dirname, join, resolve } from 'node:path'
import { fileURLToPath } from 'node:url'
import { DEFAULT_GRID, gridWavelength, gridWavelengths, type LogGrid } from '../../shared/grid'
import { readSpectrum } from '../../server/spectra/io'
import { toSpectrum1D } from '../../server/spectra/io/types'
import { fitSpectrumContinuum } from '../../server/spectra/prepare/continuum'
import { rebinSpectrumToLogGrid } from '../../server/spectra/prepare/rebin'
import type { Spectrum1D } from '../../shared/spectrum'
import { float32LittleEndian, sha256 } from '../format'
import type { ObservedEntry, ObservedLibraryManifest, ObservedSource } from './library'
import { screenParameters, screenPublishedType } from './screen'

export const BUILDER_VERSION = '2.0.0'
export const LIBRARY_VERSION = 'observed-v2'
/** The versions built before this one, whose standards stay loadable (their rows stay in flux.f32). */
export const EARLIER_VERSIONS: readonly string[] = ['observed-v1']
/** The first version that screens the published parameters (screenParameters). */
const PARAMETER_SCREEN_SINCE = 'observed-v2'
/** Range over which each spectrum is scaled to a median of 1, Å. */
const NORMALISATION: [number, number] = [4500, 5500]

export const SOURCES: readonly (ObservedSource & { folder: string })[] = [
  {
    key: 'miles',
    folder: 'miles-reference',
    name: 'MILES stellar library v9.1',
    reference: 'Sánchez-Blázquez et al. 2006, MNRAS 371, 703; Falcón-Barroso et al. 2011, A&A 532, A95',
    copiedFrom: 'template data of the public repository sdss/mangadap (mangadap/data/spectral_templates/miles/, paramsMILES_v9.1.txt)',
    resolutionFwhm: 2.5,
    note: 'Flux-calibrated 1-D spectra, 3540.5–7409.6 Å air, 0.9 Å/pixel. Types as published with the library (heterogeneous literature sources); Teff, log g, [Fe/H] from its parameter table.',
  },
  {
    key: 'jhc',
    folder: 'jhc-reference',
    name: 'Jacoby, Hunter & Christian library (CDS III/92)',
    reference: 'Jacoby, Hunter & Christian 1984, ApJS 56, 257',
    copiedFrom: 'jacoby_spectra/ and jacoby-list.dat of the public repository macro-consortium/pyscope',
    resolutionFwhm: 15,
    note: 'These copies were smoothed with a 21-pixel Hanning window (about 15 Å FWHM instead of 4.5 Å) and their wavelength zero point re-derived from the Balmer lines (about ±1 Å).',
  },
]

/**
 * A star whose spectrum is further from its nearest neighbour in the same source than this many
 * times the median nearest-neighbour distance of the stars within three subtypes of it (at least
 * three such stars) is taken as a damaged spectrum and left out.
 */
const OUTLIER_FACTOR = 20

function readCsv(path: string): Record<string, string>[] {
  const [head, ...rows] = readFileSync(path, 'utf8').trim().split(/\r?\n/)
  const keys = head!.split(',')
  return rows.map((r) => {
    const values = r.split(',')
    return Object.fromEntries(keys.map((k, i) => [k, (values[i] ?? '').trim()]))
  })
}

const num = (s: string | undefined) => (s === undefined || s === '' || !Number.isFinite(Number(s)) ? null : Number(s))

/** Reads one source spectrum: FITS through the product's readers; the JHC text copies give wavelengths in nm. */
function readSourceSpectrum(source: string, path: string, file: string): Spectrum1D {
  const bytes = readFileSync(path)
  if (source === 'jhc') {
    // "# Wavelength [nm]    Normalized Amplitude": two columns, nm.
    const rows = bytes
      .toString('utf8')
      .split(/\r?\n/)
      .filter((l) => l.trim() !== '' && !l.startsWith('#'))
    const wavelength = new Float64Array(rows.length)
    const flux = new Float64Array(rows.length)
    rows.forEach((l, i) => {
      const [w, f] = l.trim().split(/\s+/)
      wavelength[i] = Number(w) * 10
      flux[i] = Number(f)
    })
    return { wavelength, flux }
  }
  const read = readSpectrum(bytes, file)
  if (!read.ok) throw new Error(`${file}: ${read.message}`)
  return toSpectrum1D(read.spectrum)
}

/** Rebins onto the grid and scales to a median of 1 over NORMALISATION; NaN where not covered. */
function onGrid(spectrum: Spectrum1D, grid: LogGrid): { flux: Float32Array; coverage: [number, number] } {
  const rebinned = rebinSpectrumToLogGrid(spectrum, { grid })
  const values: number[] = []
  let first = -1
  let last = -1
  for (let i = 0; i < grid.length; i++) {
    if (rebinned.mask![i] !== 0) continue
    if (first < 0) first = i
    last = i
    const lambda = gridWavelength(grid, i)
    if (lambda >= NORMALISATION[0] && lambda <= NORMALISATION[1]) values.push(rebinned.flux[i]!)
  }
  values.sort((a, b) => a - b)
  const median = values[values.length >> 1] ?? Number.NaN
  const flux = Float32Array.from(rebinned.flux, (v, i) => (rebinned.mask![i] !== 0 ? Number.NaN : v / median))
  return { flux, coverage: [round2(gridWavelength(grid, first)), round2(gridWavelength(grid, last))] }
}

const round2 = (x: number) => Math.round(x * 100) / 100

/**
 * Per-pixel residual of the best level-and-depth fit of one rectified spectrum by another over
 * 3900–5500 Å: the distance used to spot damaged spectra.
 */
function residual(a: Float64Array, b: Float64Array, from: number, to: number): number {
  let n = 0
  let sx = 0
  let sy = 0
  let sxx = 0
  let sxy = 0
  let syy = 0
  for (let i = from; i < to; i++) {
    const x = b[i]!
    const y = a[i]!
    if (!Number.isFinite(x) || !Number.isFinite(y)) continue
    n++
    sx += x
    sy += y
    sxx += x * x
    sxy += x * y
    syy += y * y
  }
  const vx = sxx - (sx * sx) / n
  const cxy = sxy - (sx * sy) / n
  const vy = syy - (sy * sy) / n
  return (vy - (cxy * cxy) / vx) / n
}

function rectify(flux: Float32Array, wavelength: Float64Array): Float64Array {
  const f = Float64Array.from(flux, (v) => (Number.isFinite(v) ? v : 0))
  const mask = Uint8Array.from(flux, (v) => (Number.isFinite(v) ? 0 : 1))
  return fitSpectrumContinuum({ wavelength, flux: f, mask }).rectified
}

/**
 * Reads every source, screens each published type (screen.ts), leaves out damaged spectra, and
 * writes manifest.json and flux.f32 to `outDir`.
 * @returns the manifest written
 */
export function buildObservedLibrary(dataDir: string, outDir: string): ObservedLibraryManifest {
  const grid = DEFAULT_GRID
  const wavelength = gridWavelengths(grid)
  const entries: ObservedEntry[] = []
  const fluxes: Float32Array[] = []
  for (const source of SOURCES) {
    const folder = join(dataDir, source.folder)
    const rows = readCsv(join(folder, 'index.csv'))
    const kept: { entry: ObservedEntry; flux: Float32Array }[] = []
    for (const row of rows) {
      const file = row.file!
      const published = source.key === 'miles' ? row.spectral_type_as_published! : `${row.spectral_type} ${row.luminosity_class}`.trim()
      const entry: ObservedEntry = {
        id: `${source.key}-${file.replace(/(-Jacoby-spec)?\.(fits|csv)$/i, '').replace(/^miles-/, '')}`,
        source: source.key,
        star: row.star!.replace(/\s+/g, ' ').trim(),
        file,
        publishedType: published,
        teff: num(row.teff_k),
        logg: num(row.logg),
        feh: num(row.fe_h),
      }
      entries.push(entry)
      const screen = screenPublishedType(published, source.key === 'miles' && row.peculiar !== '0')
      if (!screen.ok) {
        entry.excludedBecause = screen.reason!
        continue
      }
      Object.assign(entry, { spectralType: screen.spectralType, typeCode: screen.typeCode, luminosityClass: screen.luminosityClass, classCode: screen.classCode })
      const { flux, coverage } = onGrid(readSourceSpectrum(source.key, join(folder, file), file), grid)
      entry.coverage = coverage
      kept.push({ entry, flux })
    }
    // Damaged spectra: far from every other star of the source although stars of nearby type exist.
    const from = wavelength.findIndex((l) => l >= 3900)
    const to = wavelength.findIndex((l) => l >= 5500)
    const rectified = kept.map((k) => rectify(k.flux, wavelength))
    const nearest = kept.map((k, i) => {
      let best = Infinity
      kept.forEach((o, j) => {
        if (j !== i && o.entry.star !== k.entry.star) best = Math.min(best, residual(rectified[i]!, rectified[j]!, from, to))
      })
      return best
    })
    kept.forEach((k, i) => {
      // Typical distance between stars of nearby type: spectra change fastest among M types.
      const local = kept
        .map((o, j) => (j !== i && Math.abs(o.entry.typeCode! - k.entry.typeCode!) <= 3 ? nearest[j]! : Number.NaN))
        .filter(Number.isFinite)
        .sort((a, b) => a - b)
      const median = local[local.length >> 1]
      if (local.length >= 3 && nearest[i]! > OUTLIER_FACTOR * median!) {
        k.entry.excludedBecause = `spectrum unlike any other of its library (nearest residual ${(nearest[i]! / median!).toFixed(0)}× the median of stars within three subtypes): taken as damaged or unusual`
        for (const key of ['spectralType', 'typeCode', 'luminosityClass', 'classCode', 'coverage'] as const) delete k.entry[key]
        return
      }
      k.entry.row = fluxes.length
      k.entry.checksum = sha256(float32LittleEndian(k.flux))
      fluxes.push(k.flux)
      // Standards of observed-v1 that contradict their own parameters: the row stays for that version.
      const contradiction = screenParameters({ teff: k.entry.teff, logg: k.entry.logg, feh: k.entry.feh, typeCode: k.entry.typeCode!, classCode: k.entry.classCode! })
      if (contradiction) {
        k.entry.excludedBecause = contradiction
        k.entry.retiredIn = PARAMETER_SCREEN_SINCE
      }
    })
  }
  const all = new Float32Array(fluxes.length * grid.length)
  fluxes.forEach((f, row) => all.set(f, row * grid.length))
  const bytes = float32LittleEndian(all)
  const manifest: ObservedLibraryManifest = {
    format: 'lineweight-observed-library',
    version: LIBRARY_VERSION,
    builderVersion: BUILDER_VERSION,
    grid: { ...grid, medium: 'air', unit: 'angstrom' },
    normalisation: NORMALISATION,
    flux: { path: 'flux.f32', dtype: 'float32le', rows: fluxes.length, columns: grid.length, sha256: sha256(bytes) },
    sources: SOURCES.map(({ folder: _f, ...s }) => s),
    entries,
    earlierVersions: [...EARLIER_VERSIONS],
    screening:
      'Kept: a normal MK type with one subtype and a luminosity class Ia–V (a range of at most one step, e.g. IV-V). ' +
      'Left out: types the source flags as peculiar; emission, peculiar, weak-line and other suffixes; uncertain (":" "?") or truncated ("...") types; ' +
      'composites; variables; abundance notes (CN, Ba, CH, Fe-); subdwarfs, horizontal-branch stars and hypergiants; type ranges; ' +
      `spectra whose nearest neighbour in their source is more than ${OUTLIER_FACTOR}× further than is usual for stars within three subtypes of them (damaged); ` +
      'and, from observed-v2 on, stars whose published parameters contradict their published type: metal-poor stars of types A0 and later ([Fe/H] ≤ −1, outside the near-solar composition the MK standards are defined on), ' +
      'class IV–V with log g < 3 and class III or brighter with log g ≥ 4.3 (these keep their row in flux.f32, marked retiredIn, so that versions made before can still be re-made).',
  }
  mkdirSync(outDir, { recursive: true })
  writeFileSync(join(outDir, 'flux.f32'), bytes)
  writeFileSync(join(outDir, 'manifest.json'), `${JSON.stringify(manifest, null, 1)}\n`)
  return manifest
}

const here = dirname(fileURLToPath(import.meta.url))
if (process.argv[1] && resolve(process.argv[1]) === resolve(here, 'build.ts')) {
  const dataDir = resolve(process.env.REFERENCE_DATA_DIR ?? resolve(here, '../../../shared/data'))
  if (!existsSync(dataDir)) {
    process.stderr.write(`no reference data at ${dataDir}: set REFERENCE_DATA_DIR\n`)
    process.exit(2)
  }
  const started = performance.now()
  const out = resolve(here, '..', LIBRARY_VERSION)
  const manifest = buildObservedLibrary(dataDir, out)
  const kept = manifest.entries.filter((e) => e.row !== undefined && e.excludedBecause === undefined).length
  const retired = manifest.entries.filter((e) => e.retiredIn !== undefined)
  for (const e of manifest.entries.filter((x) => x.excludedBecause?.startsWith('spectrum unlike') || x.retiredIn)) process.stdout.write(`left out ${e.id} ${e.publishedType}: ${e.excludedBecause}\n`)
  process.stdout.write(
    `wrote ${kept} standards of ${manifest.entries.length} stars (and ${retired.length} rows of earlier versions' standards) to ${out} in ${((performance.now() - started) / 1000).toFixed(1)} s\n`,
  )
}
