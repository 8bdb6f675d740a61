/**
 * Checks shared by every reader, applied to what a format reader produced: lengths, order,
 * finite values, pixel counts, optical range, air/vacuum, coverage of the classification region.
 */
import { vacuumToAirArray } from '../../../shared/airvac'
import {
  SpectrumReadError,
  type MediumEvidence,
  type RawSpectrum,
  type ReadDecisions,
  type ReadMask,
  type ReadMeta,
  type ReadSuccess,
  type ResolvedReadOptions,
  type SpectrumFormat,
  type SpectrumHdu,
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

/** What the observer can do when the wavelengths cannot be optical. */
function unitHint(raw: RawSpectrum, min: number, max: number): string {
  const choose = 'choose the wavelength unit when you submit (--unit with npm run classify), or name it in the file (CUNIT1, TUNITn, or a "wavelength (nm)" column header)'
  if (!raw.unitAssumed) return `; the file says the unit is ${raw.wavelengthUnit} (${raw.unitSource}): if that is wrong, ${choose}`
  if (min >= 300 && max <= 1200) return `; they look like nm but the file names no unit: ${choose}`
  if (min >= 0.3 && max <= 1.2) return `; they look like µm but the file names no unit: ${choose}`
  return `; no unit was given, so Å was assumed: ${choose}`
}

const said = (vacuum: boolean) => (vacuum ? 'vacuum' : 'air')

/**
 * Air or vacuum from the evidence a reader collected: the strongest statement wins (an explicit
 * keyword or column name over header words, over the layout's convention, over the generic
 * CTYPE WAVE that many writers also put on air wavelengths); anything that says otherwise is
 * reported as a contradiction. Nothing said: air, the common case for ground-based spectra.
 */
export function decideMedium(evidence: readonly MediumEvidence[], choice: boolean | undefined): ReadDecisions['medium'] {
  const strongest = evidence.reduce<MediumEvidence | undefined>((best, e) => (!best || e.strength > best.strength ? e : best), undefined)
  if (choice !== undefined) {
    const out: ReadDecisions['medium'] = { vacuum: choice, why: `your choice (${said(choice)})` }
    const against = evidence.filter((e) => e.vacuum !== choice)
    if (against.length) out.conflict = `the file says ${against.map((e) => `${said(e.vacuum)} (${e.source})`).join(', ')}; your choice was used`
    return out
  }
  if (!strongest) return { vacuum: false, why: 'the file does not say; air assumed (common practice for ground-based spectra)' }
  const out: ReadDecisions['medium'] = { vacuum: strongest.vacuum, why: strongest.source }
  const against = evidence.filter((e) => e.vacuum !== strongest.vacuum && !e.inferred)
  if (against.length) {
    const reason = against.every((e) => e.strength < strongest.strength) ? `${strongest.source} is the stronger statement` : `the statements weigh the same; the first one was taken`
    out.conflict = `the header contradicts itself: ${strongest.source} says ${said(strongest.vacuum)} but ${against.map((e) => e.source).join(', ')} says ${said(!strongest.vacuum)}; ${said(strongest.vacuum)} was taken because ${reason}. If that is wrong, choose the medium (Wavelengths on upload, --medium with npm run classify)`
  }
  return out
}

const fmt = (x: number) => (Math.abs(x) >= 1e5 || Math.abs(x) < 0.1 ? x.toExponential(3) : x.toFixed(1))

/**
 * Turns a reader's raw arrays into the accepted spectrum, or throws the refusal.
 * Descending wavelengths are reversed (common practice); any other disorder is refused.
 * Vacuum wavelengths are converted to air with Morton (2000) via shared/airvac.
 * @throws SpectrumReadError LENGTH_MISMATCH, TOO_FEW_PIXELS, TOO_MANY_PIXELS, BAD_WAVELENGTHS,
 *   UNSORTED_WAVELENGTHS, DUPLICATE_WAVELENGTHS, NOT_OPTICAL, NO_VALID_FLUX, NO_COVERAGE
 */
export function finalizeSpectrum(raw: RawSpectrum, options: ResolvedReadOptions, fileName: string, format: SpectrumFormat, hdus?: SpectrumHdu[]): ReadSuccess {
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
    reverse(w)
    reverse(raw.flux)
    if (raw.error) reverse(raw.error)
    if (raw.mask) reverse(raw.mask)
    for (const set of raw.flagSets ?? []) reverse(set.flags)
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
  let invalid = 0
  for (let i = 0; i < n; i++) {
    if (mask[i]) continue
    const f = flux[i]!
    const e = err ? err[i]! : 0
    if (!Number.isFinite(f) || !(e >= 0)) {
      mask[i] = 1
      invalid++
    }
  }
  const medium = decideMedium(raw.medium, options.assumeVacuum)
  const vacuum = medium.vacuum
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
  const masks: ReadMask[] = raw.masks.slice()
  const warnings = raw.warnings.slice()
  if (invalid > 0) masks.push({ source: 'flux and error values', rule: 'NaN, infinite flux or negative error is unusable', pixels: invalid })
  // A quality convention applied to a file that follows another would flag everything: then warn, never refuse.
  const usable = (m: Uint8Array) => {
    let good = 0
    for (let i = 0; i < n; i++) if (!m[i] && flux[i] !== 0) good++
    return good > 0 && regionCoverage(air, m, options.classificationRegion) >= Math.min(options.minCoverage, regionCoverage(air, mask, options.classificationRegion))
  }
  for (const set of raw.flagSets ?? []) {
    const trial = mask.slice()
    let added = 0
    for (let i = 0; i < n; i++)
      if (set.flags[i] && !trial[i]) {
        trial[i] = 1
        added++
      }
    if (added === 0) {
      masks.push({ source: set.source, rule: set.rule, pixels: 0 })
      continue
    }
    if (!usable(trial)) {
      warnings.push(`${set.source} was not applied: by the rule "${set.rule}" it flags ${added} of ${n} pixels and would leave too little to classify. Check which convention the file follows.`)
      continue
    }
    mask.set(trial)
    masks.push({ source: set.source, rule: set.rule, pixels: added })
  }
  let masked = 0
  let nonZero = 0
  for (let i = 0; i < n; i++) {
    if (mask[i]) masked++
    else if (flux[i] !== 0) nonZero++
  }
  if (nonZero === 0) {
    const why = masked === n ? 'every flux value is NaN or flagged' : 'every valid flux value is zero'
    throw new SpectrumReadError('NO_VALID_FLUX', `${fileName}: ${why}`)
  }
  const vacuumSource = medium.why
  if (medium.conflict) warnings.push(medium.conflict)
  const coverage = regionCoverage(air, masked ? mask : undefined, options.classificationRegion)
  if (coverage < options.minCoverage) {
    const [lo, hi] = options.classificationRegion
    throw new SpectrumReadError(
      'NO_COVERAGE',
      `${fileName}: valid pixels cover ${(coverage * 100).toFixed(0)} % of ${lo}–${hi} Å (the spectrum runs ${fmt(air[0]!)}–${fmt(air[n - 1]!)} Å); at least ${(options.minCoverage * 100).toFixed(0)} % is needed, as the MK criteria lie there${raw.coverageHint ?? ''}`,
    )
  }
  const decisions: ReadDecisions = {
    source: raw.source,
    wavelengthSolution: raw.solution,
    unit: { unit: raw.wavelengthUnit, why: raw.unitSource },
    medium,
    masks,
    ignored: raw.ignored,
    warnings,
  }
  if (raw.hdu !== undefined) decisions.hdu = { index: raw.hdu, ...(raw.hduName ? { name: raw.hduName } : {}), why: raw.hduWhy ?? 'the only HDU holding a spectrum' }
  if (raw.aperture) decisions.aperture = raw.aperture
  if (raw.errorSource) decisions.errors = raw.errorSource
  const notes = raw.notes.concat(noteLines(decisions))
  const meta: ReadMeta = {
    format,
    vacuumConverted: vacuum,
    vacuumSource,
    wavelengthUnit: raw.wavelengthUnit,
    header: raw.header,
    pixels: n,
    maskedPixels: masked,
    coverage,
    reversed,
    notes,
    decisions,
  }
  if (raw.hdu !== undefined) meta.hdu = raw.hdu
  if (hdus) meta.hdus = hdus
  if (raw.fluxUnit) meta.fluxUnit = raw.fluxUnit
  const spectrum: ReadSuccess['spectrum'] = { wavelengthAir: air, flux }
  if (err) spectrum.error = err
  if (masked) spectrum.mask = mask
  return { ok: true, spectrum, meta }
}

/** The decisions as short lines, for clients that only show notes. */
function noteLines(d: ReadDecisions): string[] {
  const out: string[] = []
  if (d.hdu) out.push(`HDU ${d.hdu.index}${d.hdu.name ? ` (${d.hdu.name})` : ''}: ${d.hdu.why}`)
  if (d.aperture) out.push(`${d.aperture.number === 'merged' ? `${d.aperture.of} orders merged` : `aperture ${d.aperture.number} of ${d.aperture.of}`}: ${d.aperture.why}`)
  out.push(`wavelengths: ${d.wavelengthSolution}; unit ${d.unit.unit} (${d.unit.why}); ${d.medium.vacuum ? 'vacuum, converted to air' : 'air'} (${d.medium.why})`)
  for (const m of d.masks) if (m.pixels > 0) out.push(`${m.source}: ${m.pixels} pixels masked (${m.rule})`)
  for (const i of d.ignored) out.push(`not used: ${i}`)
  return out
}
