// Seeded synthetic spectra for the numeric-core tests.
import { gridWavelengths, type LogGrid } from '../../../../shared/grid'
import { readFileSync } from 'node:fs'
import { fileURLToPath } from 'node:url'
import type { Spectrum1D } from '../../../../shared/spectrum'
import { voigtProfile } from '../../../../server/spectra/measure/voigt'
import { seededRandom } from '../../../../shared/random'

export { seededRandom }

/** Standard normal deviates by Box–Muller from a uniform source. */
export function seededNormal(seed: number): () => number {
  const uniform = seededRandom(seed)
  return () => {
    const u = Math.max(uniform(), 1e-300)
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * uniform())
  }
}

export interface InjectedLine {
  centre: number
  /** Equivalent width, Å. */
  ew: number
  sigma: number
  gamma: number
}

/** A spectrum of continuum × (1 − Σ EW·V) with optional Gaussian noise of the given S/N. */
export function syntheticSpectrum(wavelength: Float64Array, lines: InjectedLine[], options: { continuum?: (w: number) => number; snr?: number; seed?: number } = {}): Spectrum1D {
  const { continuum = () => 1, snr, seed = 1 } = options
  const normal = seededNormal(seed)
  const n = wavelength.length
  const flux = new Float64Array(n)
  const error = new Float64Array(n)
  for (let i = 0; i < n; i++) {
    const w = wavelength[i]!
    let f = 1
    for (const line of lines) f -= line.ew * voigtProfile(w - line.centre, line.sigma, line.gamma)
    const c = continuum(w)
    const sigma = snr ? c / snr : 0
    flux[i] = c * f + (snr ? sigma * normal() : 0)
    error[i] = snr ? sigma : 1e-6 * c
  }
  return { wavelength, flux, error }
}

export function linearWavelengths(start: number, end: number, step: number): Float64Array {
  const n = Math.floor((end - start) / step) + 1
  const out = new Float64Array(n)
  for (let i = 0; i < n; i++) out[i] = start + i * step
  return out
}

export function gridSpectrumWavelengths(grid: LogGrid): Float64Array {
  return gridWavelengths(grid)
}

export interface DumpedSpectrum {
  wavelength_air: number[]
  flux: number[]
  error: number[]
  versions: Record<string, string>
}

/** The A0 V standard dumped by tests/reference/specutils_dump_alpha_lyr.py (air wavelengths). */
export function readA0vStandard(): Spectrum1D {
  const path = fileURLToPath(new URL('../../../reference/out/alpha_lyr_air.json', import.meta.url))
  const dump = JSON.parse(readFileSync(path, 'utf8')) as DumpedSpectrum
  return {
    wavelength: Float64Array.from(dump.wavelength_air),
    flux: Float64Array.from(dump.flux, (f) => f * 1e9),
    error: Float64Array.from(dump.error, (e) => e * 1e9),
  }
}

export function readReference<T>(name: string): T {
  const path = fileURLToPath(new URL(`../../../reference/out/${name}`, import.meta.url))
  return JSON.parse(readFileSync(path, 'utf8')) as T
}
