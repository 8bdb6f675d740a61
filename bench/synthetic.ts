/**
 * Spectra made for the benchmarks: real spectra degraded to another resolution and S/N, and the
 * self-consistency set made from the library's own standards (mixes of two neighbouring
 * standards of one class, rotated, reddened, shifted, smoothed and noisy; and two-star composites).
 */
import { DEFAULT_GRID, SPEED_OF_LIGHT_KMS, gridWavelengths } from '../shared/grid'
import { extinctionMagnitudes } from '../shared/extinction'
import { seededRandom } from '../shared/random'
import type { Spectrum1D } from '../shared/spectrum'
import { DEFAULT_OBSERVED_DIR, observedLibraryAt } from '../server/jobs/worker'
import type { PreparedMatchLibrary } from '../server/spectra/match'
import { runPipeline } from '../server/spectra/pipeline'
import { smoothSpectrumToFwhm } from '../server/spectra/prepare/smooth'
import { figures, groupTable, type Scored, classSpan } from './score'

/** Deterministic pseudo-random numbers in [0, 1). */
export const rng = seededRandom

const FWHM_PER_SIGMA = 2 * Math.sqrt(2 * Math.LN2)

function gaussian(random: () => number): number {
  return Math.sqrt(-2 * Math.log(random() + 1e-12)) * Math.cos(2 * Math.PI * random())
}

/**
 * A spectrum at resolution `to` (Gaussian of √(to² − from²) Å FWHM, on its own pixels, which need
 * not be evenly spaced) with Gaussian noise added to reach S/N `snr` per pixel (median flux over
 * 4000–5500 Å / σ), errors set accordingly. Unchanged arrays when `to` ≤ `from` and no `snr`.
 */
export function degradeSpectrum(spectrum: Spectrum1D, options: { from: number; to: number; snr?: number; seed: number }): Spectrum1D {
  const { wavelength: w, flux: f } = spectrum
  const n = w.length
  let flux = f
  if (options.to > options.from * 1.001) {
    const sigma = Math.sqrt(options.to ** 2 - options.from ** 2) / FWHM_PER_SIGMA
    flux = new Float64Array(n)
    let lo = 0
    for (let i = 0; i < n; i++) {
      while (w[lo]! < w[i]! - 4 * sigma) lo++
      let s = 0
      let sw = 0
      for (let j = lo; j < n && w[j]! <= w[i]! + 4 * sigma; j++) {
        if (spectrum.mask?.[j] || !Number.isFinite(f[j]!)) continue
        const width = j + 1 < n ? w[j + 1]! - w[j]! : w[j]! - w[j - 1]!
        const k = Math.exp(-0.5 * ((w[j]! - w[i]!) / sigma) ** 2) * width
        s += k * f[j]!
        sw += k
      }
      flux[i] = sw > 0 ? s / sw : Number.NaN
    }
  }
  if (!options.snr) return { ...spectrum, flux }
  const inBand: number[] = []
  for (let i = 0; i < n; i++) if (w[i]! >= 4000 && w[i]! <= 5500 && Number.isFinite(flux[i]!)) inBand.push(flux[i]!)
  inBand.sort((a, b) => a - b)
  const sigma = (inBand[inBand.length >> 1] ?? 1) / options.snr
  const random = rng(options.seed)
  const noisy = Float64Array.from(flux, (v) => v + sigma * gaussian(random))
  return { ...spectrum, flux: noisy, error: new Float64Array(n).fill(sigma) }
}

/**
 * Rotational broadening on a log-λ grid, where a velocity is a fixed number of pixels: the profile
 * G(x) ∝ 2(1 − ε)√(1 − x²) + (πε/2)(1 − x²), x = v / (v sin i), with limb darkening ε = 0.6
 * (Gray, The Observation and Analysis of Stellar Photospheres, 3rd ed., eq. 18.14; from memory).
 */
export function rotateOnGrid(flux: Float64Array, vsini: number, epsilon = 0.6): Float64Array {
  const pixel = SPEED_OF_LIGHT_KMS * DEFAULT_GRID.step
  const half = Math.max(1, Math.floor(vsini / pixel))
  const kernel = new Float64Array(2 * half + 1)
  let total = 0
  for (let k = -half; k <= half; k++) {
    const x = Math.min(1, Math.abs((k * pixel) / vsini))
    const g = 2 * (1 - epsilon) * Math.sqrt(1 - x * x) + ((Math.PI * epsilon) / 2) * (1 - x * x)
    kernel[k + half] = g
    total += g
  }
  const out = new Float64Array(flux.length)
  for (let i = 0; i < flux.length; i++) {
    let s = 0
    let sw = 0
    for (let k = -half; k <= half; k++) {
      const v = flux[i + k]
      if (v === undefined || !Number.isFinite(v)) continue
      s += kernel[k + half]! * v
      sw += kernel[k + half]!
    }
    out[i] = sw > total / 2 ? s / sw : Number.NaN
  }
  return out
}

/** How one self-consistency spectrum departs from the library. */
export interface Perturbation {
  snr: number
  fwhm: number
  rv: number
  ebv: number
  vsini: number
}

/** Observes a rest-frame flux on DEFAULT_GRID (at 2.5 Å) as a 4000-pixel linear spectrum 3800–5600 Å with the perturbation. */
export function observe(rest: Float64Array, p: Perturbation, random: () => number): Spectrum1D {
  const wl = gridWavelengths(DEFAULT_GRID)
  const rotated = p.vsini > 0 ? rotateOnGrid(rest, p.vsini) : rest
  const mask = Uint8Array.from(rotated, (v) => (Number.isFinite(v) ? 0 : 1))
  const filled = Float64Array.from(rotated, (v) => (Number.isFinite(v) ? v : 0))
  const smooth = p.fwhm > 2.5 ? smoothSpectrumToFwhm({ wavelength: wl, flux: filled, mask }, { grid: DEFAULT_GRID, targetFwhm: p.fwhm, inputFwhm: 2.5 }).flux : filled
  const m = 4000
  const wavelength = new Float64Array(m)
  const flux = new Float64Array(m)
  const shift = 1 + p.rv / SPEED_OF_LIGHT_KMS
  let mean = 0
  for (let i = 0; i < m; i++) {
    const obs = 3800 + (1800 * i) / (m - 1)
    wavelength[i] = obs
    const x = Math.log(obs / shift / DEFAULT_GRID.start) / DEFAULT_GRID.step
    const k = Math.min(DEFAULT_GRID.length - 2, Math.max(0, Math.floor(x)))
    flux[i] = (smooth[k]! + (smooth[k + 1]! - smooth[k]!) * (x - k)) * 10 ** (-0.4 * extinctionMagnitudes(obs, { ebv: p.ebv }))
    mean += flux[i]! / m
  }
  const error = new Float64Array(m)
  for (let i = 0; i < m; i++) {
    flux[i] = (flux[i]! / mean) * (1 + gaussian(random) / p.snr)
    error[i] = flux[i]! / p.snr
  }
  return { wavelength, flux, error }
}

const SELF_SEED = 0x5e1f_c0de
const SELF_COUNT = Number(process.env.SELF_COUNT ?? 150)

/**
 * The self-consistency set: `SELF_COUNT` mixes of two neighbouring MILES standards of one class
 * (fraction 0.15–0.85, truth the interpolated type) with S/N 30–150, resolution 2.5–10 Å not given,
 * velocity ±300 km/s, E(B−V) 0–1 (CCM89), and for half the B–F types v sin i 100–250 km/s; then
 * 40 composites of a B–A star and a G–K star at equal flux near 5500 Å, for how often
 * 'possible-composite' is raised. The parents stay in the library: this measures robustness.
 */
export function selfConsistency(library: PreparedMatchLibrary, observedDir = DEFAULT_OBSERVED_DIR): { lines: string[]; figures: ReturnType<typeof figures> } {
  const { library: observed } = observedLibraryAt(observedDir)
  const miles = observed.standards.filter((s) => s.source.key === 'miles')
  const random = rng(SELF_SEED)
  const rows: Scored[] = []
  const rotated: Scored[] = []
  const classes = [...new Set(miles.map((s) => s.entry.luminosityClass))].filter((c) => miles.filter((s) => s.entry.luminosityClass === c).length >= 4)
  while (rows.length < SELF_COUNT) {
    const cls = classes[Math.floor(random() * classes.length)]!
    const members = miles.filter((s) => s.entry.luminosityClass === cls).sort((a, b) => a.entry.typeCode - b.entry.typeCode)
    const j = Math.floor(random() * (members.length - 1))
    const a = members[j]!
    const b = members[j + 1]!
    const t = 0.15 + 0.7 * random()
    const p: Perturbation = { snr: 30 * 5 ** random(), fwhm: 2.5 + 7.5 * random(), rv: -300 + 600 * random(), ebv: random(), vsini: 0 }
    const hot = a.entry.typeCode < 40
    if (hot && random() < 0.5) p.vsini = 100 + 150 * random()
    const rest = Float64Array.from(a.flux, (v, i) => (1 - t) * v + t * b.flux[i]!)
    const spectrum = observe(rest, p, random)
    const s = runPipeline({ spectrum }, library).suggestion!
    const truthClass = a.entry.classCode
    const row: Scored = {
      truthType: a.entry.typeCode + t * (b.entry.typeCode - a.entry.typeCode),
      truthClass,
      truthClassRange: classSpan(truthClass),
      type: s.typeCode,
      classCode: s.classCode,
      sigmaType: s.uncertainty.subtypes,
      sigmaClass: s.uncertainty.classes,
      flags: s.flags,
    }
    rows.push(row)
    if (p.vsini > 0) rotated.push(row)
  }
  const i5500 = gridWavelengths(DEFAULT_GRID).findIndex((w) => w >= 5500)
  const hotStars = miles.filter((s) => s.entry.typeCode < 30 && s.entry.classCode >= 5)
  const coolStars = miles.filter((s) => s.entry.typeCode >= 45 && s.entry.typeCode < 56)
  let detected = 0
  const composites = 40
  for (let k = 0; k < composites; k++) {
    const h = hotStars[Math.floor(random() * hotStars.length)]!
    const c = coolStars[Math.floor(random() * coolStars.length)]!
    const rest = Float64Array.from(h.flux, (v, i) => v / h.flux[i5500]! + c.flux[i]! / c.flux[i5500]!)
    const spectrum = observe(rest, { snr: 100, fwhm: 2.5 + 2.5 * random(), rv: 0, ebv: 0, vsini: 0 }, random)
    if (runPipeline({ spectrum }, library).suggestion!.flags.includes('possible-composite')) detected++
  }
  const f = figures(rows)
  const fr = figures(rotated)
  const falseComposites = rows.filter((r) => r.flags.includes('possible-composite')).length
  return {
    lines: [
      `${rows.length} mixes of neighbouring standards, resolution not given (seed ${SELF_SEED.toString(16)}):`,
      groupTable(rows),
      `  rotating (v sin i 100–250 km/s): n ${fr.n}, ±1 sub ${fr.within1} %, exact class ${fr.exactClass} %`,
      `  composites (B–A dwarf + G–K star, equal flux at 5500 Å): 'possible-composite' on ${detected} of ${composites}; on single stars ${falseComposites} of ${rows.length}`,
    ],
    figures: f,
  }
}
