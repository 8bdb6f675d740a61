/**
 * Checks shared by every reader, applied to what a format reader produced: lengths, order,
 * finite values, pixel counts, optical range, air/vacuum, coverage of the classification region.
 */
import { vacuumToAirArray } from '../../../shared/airvac'
import {
  SpectrumReadError, type RawSpectrum, type ReadMeta, type ReadSuccess, type ResolvedReadOptions,
  type SpectrumFormat, type SpectrumHdu,
} from './types'

/** Beyond these, after unit handling, no part of the spectrum can be optical (Å). */
export const OPTICAL_LIMITS: readonly [number, number] = [3000, 11000]

function reverse(a: Float64Array | Uint8Array): void {
  a.reverse()
}

/**
 * Fraction of `region` (Å) spanned by intervals between neighbouring valid pixels. Gaps where
 * either neighbour is masked do not count, so a spectrum with a hole across Hβ covers less.
 */
export function regionCoverage(wavelength: Float64Array, mask: Uint8Array | undefined, region: readonly [number, number]): number {
  const [lo, hi] = region
  if (!(hi > lo)) return 0
  let covered = 0
  for (let i = 1; i < wavelength.length; i++) {
    if (mask && (mask[i] || mask[i - 1])) continue
    const a = Math.max(wavelength[i - 1]!, lo)
    const b = Math.min(wavelength[i]!, hi)
    if (b > a) covered += b - a
  }
  return covered / (hi - lo)
}

function unitHint(raw: RawSpectrum, min: number, max: number): string {
  if (!raw.unitAssumed) return ''
  if (min >= 300 && max <= 1200) return '; they look like nm: name the unit in the file'
  if (min >= 0.3 && max <= 1.2) return '; they look like µm: name the unit in the file'
  return '; no unit was given, so Å was assumed'
}

const fmt = (x: number) => (Math.abs(x) >= 1e5 || Math.abs(x) < 0.1 ? x.toExponential(3) : x.toFixed(1))

/**
 * Turns a reader's raw arrays into the accepted spectrum, or throws the refusal.
 * Descending wavelengths are reversed (common practice); any other disorder is refused.
 * Vacuum wavelengths are converted to air with Morton (2000) via shared/airvac.
 * @throws SpectrumReadError LENGTH_MISMATCH, TOO_FEW_PIXELS, TOO_MANY_PIXELS, BAD_WAVELENGTHS,
 *   UNSORTED_WAVELENGTHS, DUPLICATE_WAVELENGTHS, NOT_OPTICAL, NO_VALID_FLUX, NO_COVERAGE
 */
export function finalizeSpectrum(
  raw: RawSpectrum, options: ResolvedReadOptions, fileName: string, format: SpectrumFormat, hdus?: SpectrumHdu[],
): ReadSuccess {
  const n = raw.wavelength.length
  if (raw.flux.length !== n || (raw.error && raw.error.length !== n) || (raw.mask && raw.mask.length !== n)) {
    throw new SpectrumReadError('LENGTH_MISMATCH', `${fileName}: ${n} wavelengths but ${raw.flux.length} flux values${raw.error ? ` and ${raw.error.length} errors` : ''}`)
  }
  if (n > options.maxPixels) throw new SpectrumReadError('TOO_MANY_PIXELS', `${fileName}: ${n} pixels is more than the limit of ${options.maxPixels}`)
  if (n < options.minPixels) throw new SpectrumReadError('TOO_FEW_PIXELS', `${fileName}: ${n} pixels is fewer than the minimum of ${options.minPixels}`)
  const w = raw.wavelength
  for (let i = 0; i < n; i++) {
    const x = w[i]!
    if (!Number.isFinite(x) || x <= 0) {
      throw new SpectrumReadError('BAD_WAVELENGTHS', `${fileName}: wavelength ${i + 1} is ${x}; every wavelength must be a positive number`)
    }
  }
  const reversed = w[n - 1]! < w[0]!
  if (reversed) {
    reverse(w); reverse(raw.flux)
    if (raw.error) reverse(raw.error)
    if (raw.mask) reverse(raw.mask)
  }
  for (let i = 1; i < n; i++) {
    const a = w[i - 1]!
    const b = w[i]!
    if (b === a) throw new SpectrumReadError('DUPLICATE_WAVELENGTHS', `${fileName}: wavelength ${fmt(b)} Å appears twice (pixels ${i} and ${i + 1})`)
    if (b < a) throw new SpectrumReadError('UNSORTED_WAVELENGTHS', `${fileName}: wavelengths are not in order (${fmt(a)} Å is followed by ${fmt(b)} Å at pixel ${i + 1})`)
  }
  const min = w[0]!
  const max = w[n - 1]!
  if (max < OPTICAL_LIMITS[0] || min > OPTICAL_LIMITS[1]) {
    throw new SpectrumReadError('NOT_OPTICAL', `${fileName}: wavelengths run from ${fmt(min)} to ${fmt(max)} Å, which cannot be an optical spectrum${unitHint(raw, min, max)}`)
  }
  const mask = raw.mask ?? new Uint8Array(n)
  const flux = raw.flux
  const err = raw.error
  let masked = 0
  let nonZero = 0
  for (let i = 0; i < n; i++) {
    const f = flux[i]!
    if (!Number.isFinite(f)) mask[i] = 1
    if (err) {
      const e = err[i]!
      if (!(e >= 0) || Number.isNaN(e)) mask[i] = 1
    }
    if (mask[i]) masked++
    else if (f !== 0) nonZero++
  }
  if (nonZero === 0) {
    const why = masked === n ? 'every flux value is NaN or flagged' : 'every valid flux value is zero'
    throw new SpectrumReadError('NO_VALID_FLUX', `${fileName}: ${why}`)
  }
  let vacuum: boolean
  let vacuumSource: string
  if (options.assumeVacuum !== undefined) {
    vacuum = options.assumeVacuum
    vacuumSource = `user's choice (${vacuum ? 'vacuum' : 'air'})`
  } else if (raw.vacuum !== undefined) {
    vacuum = raw.vacuum
    vacuumSource = raw.vacuumSource
  } else {
    vacuum = false
    vacuumSource = 'the file does not say; air assumed'
  }
  let air = w
  if (vacuum) {
    air = vacuumToAirArray(w)
    // vacuumToAir leaves λ < 2000 Å alone, so finely spaced pixels either side of 2000 Å could
    // fall out of order; refuse rather than silently reorder.
    for (let i = 1; i < n; i++) {
      if (!(air[i]! > air[i - 1]!)) {
        throw new SpectrumReadError('UNSORTED_WAVELENGTHS', `${fileName}: wavelengths near ${fmt(w[i]!)} Å fall out of order after the vacuum-to-air change`)
      }
    }
  }
  const coverage = regionCoverage(air, masked ? mask : undefined, options.classificationRegion)
  if (coverage < options.minCoverage) {
    const [lo, hi] = options.classificationRegion
    throw new SpectrumReadError('NO_COVERAGE', `${fileName}: valid pixels cover ${(coverage * 100).toFixed(0)} % of ${lo}–${hi} Å (the spectrum runs ${fmt(air[0]!)}–${fmt(air[n - 1]!)} Å); at least ${(options.minCoverage * 100).toFixed(0)} % is needed`)
  }
  const meta: ReadMeta = {
    format, vacuumConverted: vacuum, vacuumSource, wavelengthUnit: raw.wavelengthUnit, header: raw.header,
    pixels: n, maskedPixels: masked, coverage, reversed, notes: raw.notes,
  }
  if (raw.hdu !== undefined) meta.hdu = raw.hdu
  if (hdus) meta.hdus = hdus
  if (raw.fluxUnit) meta.fluxUnit = raw.fluxUnit
  const spectrum: ReadSuccess['spectrum'] = { wavelengthAir: air, flux }
  if (err) spectrum.error = err
  if (masked) spectrum.mask = mask
  return { ok: true, spectrum, meta }
}
