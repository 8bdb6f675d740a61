/**
 * The common log-λ grid that every prepared spectrum and every standard is sampled on.
 * A constant step in ln λ is a constant velocity step, so a radial-velocity shift is a pixel shift.
 */
export interface LogGrid {
  /** First pixel centre, Å (air). */
  start: number
  /** Step in natural-log wavelength. */
  step: number
  /** Number of pixels. */
  length: number
}

export const SPEED_OF_LIGHT_KMS = 299_792.458

/** Builds a grid covering [min, max] Å with a constant ln-λ step. */
export function makeLogGrid(min: number, max: number, step: number): LogGrid {
  if (!(min > 0) || !(max > min)) throw new Error('grid range must satisfy 0 < min < max')
  if (!(step > 0)) throw new Error('grid step must be positive')
  return { start: min, step, length: Math.floor(Math.log(max / min) / step) + 1 }
}

/**
 * Default grid: 3700–7000 Å, Δln λ = 1e-4 (≈ 30 km/s a pixel, 0.4 Å at 4000 Å), fine enough to
 * hold the standards at ~1.5 Å FWHM with about four pixels across the resolution element.
 */
export const DEFAULT_GRID: LogGrid = makeLogGrid(3700, 7000, 1e-4)

/** Wavelength of pixel i, Å. */
export function gridWavelength(grid: LogGrid, i: number): number {
  return grid.start * Math.exp(grid.step * i)
}

/** Wavelengths of the grids asked for, by start, step and length: a copy costs far less than an exp per pixel. */
const wavelengthsByGrid = new Map<string, Float64Array>()

/** All pixel wavelengths, Å: an array of the caller's own. */
export function gridWavelengths(grid: LogGrid): Float64Array {
  const key = `${grid.start} ${grid.step} ${grid.length}`
  let wavelengths = wavelengthsByGrid.get(key)
  if (!wavelengths) {
    wavelengths = new Float64Array(grid.length)
    for (let i = 0; i < grid.length; i++) wavelengths[i] = grid.start * Math.exp(grid.step * i)
    if (wavelengthsByGrid.size >= 16) wavelengthsByGrid.delete(wavelengthsByGrid.keys().next().value!)
    wavelengthsByGrid.set(key, wavelengths)
  }
  return wavelengths.slice()
}

/** Fractional pixel index of wavelength λ (Å). */
export function gridIndex(grid: LogGrid, wavelength: number): number {
  return Math.log(wavelength / grid.start) / grid.step
}

/** Classification region used by default when a campaign sets none, Å (air). */
export const DEFAULT_CLASSIFICATION_REGION: readonly [number, number] = [3850, 5000]

/**
 * Region over which a spectrum is matched instead of the default one when its nearest standard is
 * G0 or later (type code ≥ {@link LATE_TYPE_FROM}), it reaches past Hα, and its campaign keeps the
 * default region, Å (air): in cool stars Mg b, Na D and Hα change with temperature more clearly
 * than the crowded blue does. Chosen on the odd-numbered MILES stars (bench/accuracy.ts).
 */
export const LATE_TYPE_REGION: readonly [number, number] = [3850, 6800]

/** Type code from which {@link LATE_TYPE_REGION} applies (G0). */
export const LATE_TYPE_FROM = 40

/**
 * Bounds of a campaign's classification region, Å: the optical range the file readers accept
 * (OPTICAL_LIMITS of server/spectra/io/finalize.ts; a test keeps the two equal).
 */
export const CAMPAIGN_REGION_LIMITS: readonly [number, number] = [3000, 11000]
