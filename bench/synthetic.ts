import { seededRandom } from '../shared/random'
/**
 * The made-up spectra of the accuracy and tuning sets: a linear mix of two neighbouring model
 * standards of one luminosity class (rectified flux × continuum), smoothed to the drawn FWHM,
 * Doppler-shifted, resampled linearly in λ, reddened with CCM89, scaled to unit mean and given
 * Gaussian noise. Each set draws its own perturbations from its own seed; the draws happen in a
 * fixed order so a seed always gives the same set.
 */
import { DEFAULT_GRID, SPEED_OF_LIGHT_KMS, gridWavelengths } from '../shared/grid'
import { extinctionMagnitudes } from '../shared/extinction'
import { DEFAULT_MODEL_DIR, modelLibraryAt } from '../server/jobs/worker'
import { smoothSpectrumToFwhm } from '../server/spectra/prepare/smooth'

/** Deterministic pseudo-random numbers in [0, 1). */
export const rng = seededRandom

export const CLASSES = ['Ia', 'Ib', 'II', 'III', 'IV', 'V']


/** How one spectrum departs from the grid: drawn by each set after the class and the pair of standards. */
export interface Perturbation {
  /** Mixing fraction of the second (later-type) standard. */
  t: number
  snr: number
  /** Resolution, Å FWHM; the models are at 1.5 Å. */
  fwhm: number
  /** Radial velocity, km/s. */
  rv: number
  ebv: number
  /** R_V; undefined for the CCM89 default. */
  rV?: number
  /** First and last observed wavelength, Å, and the pixel count. */
  lo: number
  hi: number
  pixels: number
}

export interface SyntheticSpectrum {
  truthType: number
  truthClass: string
  perturbation: Perturbation
  spectrum: { wavelength: Float64Array; flux: Float64Array }
}

const models = modelLibraryAt(DEFAULT_MODEL_DIR)
const wl = gridWavelengths(DEFAULT_GRID)

/** One made-up spectrum: class, pair of standards, then `draw`'s perturbations, then the noise. */
export function syntheticSpectrum(random: () => number, draw: (random: () => number) => Perturbation): SyntheticSpectrum {
  const cls = CLASSES[Math.floor(random() * CLASSES.length)]!
  const rows = models.standards.filter((s) => s.entry.luminosityClass === cls).sort((a, b) => a.entry.typeCode - b.entry.typeCode)
  const j = Math.floor(random() * (rows.length - 1))
  const a = rows[j]!
  const b = rows[j + 1]!
  const p = draw(random)
  const { t, snr, fwhm, rv, ebv, rV, lo, hi, pixels: m } = p
  const truthType = a.entry.typeCode + t * (b.entry.typeCode - a.entry.typeCode)
  const n = DEFAULT_GRID.length
  const rest = new Float64Array(n)
  for (let i = 0; i < n; i++) rest[i] = ((1 - t) * a.rectified[i]! + t * b.rectified[i]!) * ((1 - t) * a.continuum[i]! + t * b.continuum[i]!)
  const smooth = fwhm > 1.5 ? smoothSpectrumToFwhm({ wavelength: wl, flux: rest }, { grid: DEFAULT_GRID, targetFwhm: fwhm, inputFwhm: 1.5 }).flux : rest
  const wavelength = new Float64Array(m)
  const flux = new Float64Array(m)
  const shift = 1 + rv / SPEED_OF_LIGHT_KMS
  let mean = 0
  for (let i = 0; i < m; i++) {
    const obs = lo + ((hi - lo) * i) / (m - 1)
    wavelength[i] = obs
    const x = Math.log(obs / shift / DEFAULT_GRID.start) / DEFAULT_GRID.step
    const k = Math.min(n - 2, Math.max(0, Math.floor(x)))
    flux[i] = (smooth[k]! + (smooth[k + 1]! - smooth[k]!) * (x - k)) * 10 ** (-0.4 * extinctionMagnitudes(obs, { ebv, rv: rV }))
    mean += flux[i]! / m
  }
  for (let i = 0; i < m; i++) {
    const g = Math.sqrt(-2 * Math.log(random() + 1e-12)) * Math.cos(2 * Math.PI * random())
    flux[i] = (flux[i]! / mean) * (1 + g / snr)
  }
  return { truthType, truthClass: cls, perturbation: p, spectrum: { wavelength, flux } }
}
