/**
 * The real reference stars of the accuracy benchmark: every star of the shipped observed library
 * (templates/observed-v2), with its published type, read from the source files through the
 * product's readers when the reference folder is present (REFERENCE_DATA_DIR, default
 * ../shared/data), else taken from the library's own copy of its flux. Each star knows the
 * database ids of every standard that is the same star, so that leave-one-star-out never matches
 * a star against itself or another spectrum of itself.
 */
import { existsSync, readFileSync } from 'node:fs'
import { join, resolve } from 'node:path'
import { fileURLToPath } from 'node:url'
import { DEFAULT_GRID, gridWavelengths } from '../shared/grid'
import { parseMK } from '../shared/mk'
import type { Spectrum1D } from '../shared/spectrum'
import { DEFAULT_OBSERVED_DIR, observedLibraryAt } from '../server/spectra/match/load'
import { readSpectrum } from '../server/spectra/io'
import { toSpectrum1D } from '../server/spectra/io/types'
import { classSpan } from './score'

export interface ReferenceStar {
  id: string
  star: string
  source: 'miles' | 'jhc'
  publishedType: string
  typeCode: number
  classCode: number
  classRange: [number, number]
  /** Published Teff (K), log g, [Fe/H] where the source gives them. */
  teff: number | null
  logg: number | null
  feh: number | null
  /** Instrumental resolution of the source, FWHM Å. */
  fwhm: number
  spectrum: Spectrum1D
  /** How the spectrum was read: 'file' through the readers, 'library' from the shipped copy. */
  readFrom: 'file' | 'library'
  /** Library ids (row + 1, as defaultLibrary numbers them) of every standard that is this star. */
  exclude: Set<number>
}

/** One catalogue name for the forms sources use: "HD 5351", "HD005351" → "HD5351". */
export function starKey(name: string): string {
  const s = name.toUpperCase().replace(/\s+/g, '')
  return s.replace(/^([A-Z]+[+-]?)0+(\d)/, '$1$2')
}

export const REFERENCE_DATA_DIR = resolve(process.env.REFERENCE_DATA_DIR ?? fileURLToPath(new URL('../../shared/data', import.meta.url)))

/** Reads a JHC copy: two columns, wavelength in nm as its comment line says. */
function readJhcText(bytes: Uint8Array): Spectrum1D {
  const rows = Buffer.from(bytes)
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

/**
 * Every kept standard of the shipped library as a reference star.
 * @param options.fromFiles read the source files when present @default true; false takes the library's copies, as on a machine without them
 * @param options.retired the standards of earlier versions that this one leaves out instead (they are not in the library, so nothing of them is excluded but other spectra of the same star)
 */
export function referenceStars(observedDir = DEFAULT_OBSERVED_DIR, options: { fromFiles?: boolean; retired?: boolean } = {}): ReferenceStar[] {
  const fromFiles = options.fromFiles ?? true
  const { library, inputs } = observedLibraryAt(observedDir)
  const wl = gridWavelengths(DEFAULT_GRID)
  const byKey = new Map<string, Set<number>>()
  inputs.forEach((s) => {
    const key = starKey(s.star ?? '')
    byKey.set(key, (byKey.get(key) ?? new Set()).add(s.id))
  })
  const folders: Record<string, string> = { miles: 'miles-reference', jhc: 'jhc-reference' }
  return (options.retired ? library.retired : library.standards).map((s, row) => {
    const e = s.entry
    const path = join(REFERENCE_DATA_DIR, folders[e.source]!, e.file)
    let spectrum: Spectrum1D | null = null
    if (fromFiles && existsSync(path)) {
      const bytes = readFileSync(path)
      const read = readSpectrum(bytes, e.file)
      spectrum = read.ok ? toSpectrum1D(read.spectrum) : e.source === 'jhc' ? readJhcText(bytes) : null
    }
    const parsed = parseMK(`A0 ${e.luminosityClass}`)
    const classCode = parsed.ok ? parsed.value.classCode! : e.classCode
    return {
      id: e.id,
      star: e.star,
      source: e.source as 'miles' | 'jhc',
      publishedType: e.publishedType,
      typeCode: e.typeCode,
      classCode,
      classRange: classSpan(classCode),
      teff: e.teff,
      logg: e.logg,
      feh: e.feh,
      fwhm: s.source.resolutionFwhm,
      spectrum: spectrum ?? { wavelength: wl.slice(), flux: Float64Array.from(s.flux, (v) => (Number.isFinite(v) ? v : 0)), mask: Uint8Array.from(s.flux, (v) => (Number.isFinite(v) ? 0 : 1)) },
      readFrom: spectrum ? 'file' : 'library',
      exclude: byKey.get(starKey(e.star)) ?? (options.retired ? new Set<number>() : new Set([row + 1])),
    }
  })
}
