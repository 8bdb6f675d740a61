/**
 * The one entry point for spectrum files: sniffs the format from the content, hands the bytes to
 * the matching reader of the registry, and applies the shared checks.
 */
import { hduName, parseFits, type FitsHdu } from './fits'
import { companionRole, imageSpectrumProblem, readImageHdu, type ImageContext } from './fits-image'
import { readTableHdu, tableLayout } from './fits-table'
import { finalizeSpectrum } from './finalize'
import { spanCoverage } from './solution'
import { textReader } from './text'
import {
  DEFAULT_READ_OPTIONS,
  SpectrumReadError,
  type FormatReader,
  type RawSpectrum,
  type ReadOptions,
  type ReadResult,
  type ResolvedReadOptions,
  type SpectrumFormat,
  type SpectrumHdu,
} from './types'
import { angstromsPerUnit } from './units'
import { gunzipBounded, isGzip } from './zip'

const FITS_SIGNATURE = 'SIMPLE  ='

function hasFitsSignature(bytes: Uint8Array): boolean {
  if (bytes.length < FITS_SIGNATURE.length) return false
  for (let i = 0; i < FITS_SIGNATURE.length; i++) if (bytes[i] !== FITS_SIGNATURE.charCodeAt(i)) return false
  return true
}

/** FITS cards (BITPIX and NAXIS at their fixed columns) in the first block, whatever the first card says. */
function looksLikeFitsHeader(bytes: Uint8Array): boolean {
  const head = new TextDecoder('latin1').decode(bytes.subarray(0, 2880))
  return head.length === 2880 && head.startsWith('BITPIX  =', 80) && head.includes('NAXIS   =')
}

const describe = (h: FitsHdu) => `HDU ${h.index}${hduName(h) ? ` (${hduName(h)})` : ''}`

/** Whether an HDU holds a spectrum, without decoding its data (companion images do not). */
function spectrumKind(ctx: ImageContext, hdu: FitsHdu): 'image' | 'table' | string {
  if (hdu.kind === 'image') {
    const role = companionRole(hdu)
    if (role) return `the ${role} of another image`
    if (hdu.naxis.length === 0) return 'it holds no data'
    return imageSpectrumProblem(hdu, ctx) ?? 'image'
  }
  if (hdu.kind === 'bintable' || hdu.kind === 'ascii') {
    const layout = tableLayout(hdu, ctx.fileName)
    return typeof layout === 'string' ? layout : 'table'
  }
  return `it is a ${hdu.xtension} extension`
}

function pickHdu(hdus: FitsHdu[], wanted: number | string, fileName: string): FitsHdu {
  const hdu = typeof wanted === 'number' ? hdus[wanted] : hdus.find((h) => (hduName(h) ?? (h.index === 0 ? 'PRIMARY' : '')).toUpperCase() === wanted.trim().toUpperCase())
  if (!hdu) {
    throw new SpectrumReadError(
      'HDU_NOT_FOUND',
      `${fileName}: there is no HDU ${typeof wanted === 'number' ? wanted : `named '${wanted}'`} (the file has ${hdus.length}, numbered 0–${hdus.length - 1})`,
    )
  }
  return hdu
}

function readHdu(ctx: ImageContext, hdu: FitsHdu): { raw: RawSpectrum; format: SpectrumFormat } {
  if (hdu.kind === 'bintable' || hdu.kind === 'ascii') return { raw: readTableHdu(ctx.bytes, hdu, ctx.primary, ctx.fileName, ctx.options), format: 'fits-table' }
  if (hdu.kind === 'image') return { raw: readImageHdu(ctx, hdu), format: 'fits-image' }
  throw new SpectrumReadError('NOT_A_SPECTRUM', `${ctx.fileName}: HDU ${hdu.index} is a ${hdu.xtension} extension, not a spectrum`)
}

const range = (w: Float64Array) => {
  let lo = Infinity
  let hi = -Infinity
  for (const v of w) {
    if (v < lo) lo = v
    if (v > hi) hi = v
  }
  return `${lo.toFixed(0)}–${hi.toFixed(0)} Å`
}

/**
 * FITS files: primary and extension HDUs, images (fits-image.ts) and tables (fits-table.ts).
 * Without a choice, the first HDU holding a spectrum that covers the classification region is read
 * (a two-arm file whose first arm is red gives its blue arm); the others are named.
 */
export const fitsReader: FormatReader = {
  format: 'fits',
  sniff: (bytes) => hasFitsSignature(bytes),
  read(bytes, fileName, options) {
    const hdus = parseFits(bytes, fileName)
    const ctx: ImageContext = { bytes, hdus, primary: hdus[0]!, fileName, options }
    const candidates: SpectrumHdu[] = []
    const reasons: string[] = []
    let firstError: SpectrumReadError | undefined
    for (const h of hdus) {
      let kind: string
      try {
        kind = spectrumKind(ctx, h)
      } catch (err) {
        if (!(err instanceof SpectrumReadError)) throw err
        firstError ??= err
        kind = err.message
      }
      if (kind === 'image' || kind === 'table') {
        const entry: SpectrumHdu = { index: h.index, kind }
        const name = hduName(h)
        if (name) entry.name = name
        candidates.push(entry)
      } else reasons.push(`HDU ${h.index}: ${kind}`)
    }
    const notSpectra = hdus.filter((h) => !candidates.some((c) => c.index === h.index) && h.naxis.length > 0 && !(h.index === 0 && h.naxis.every((v) => v === 0)))
    if (options.hdu !== undefined) {
      const hdu = pickHdu(hdus, options.hdu, fileName)
      const { raw, format } = readHdu(ctx, hdu)
      raw.hduWhy = 'your choice'
      for (const c of candidates) if (c.index !== hdu.index) raw.ignored.push(`HDU ${c.index}${c.name ? ` (${c.name})` : ''}: another spectrum`)
      return { raw, format, hdus: candidates }
    }
    if (candidates.length === 0) {
      if (firstError) throw firstError
      throw new SpectrumReadError('NOT_A_SPECTRUM', `${fileName}: no HDU holds a spectrum (${reasons.join('; ')})`)
    }
    // The first candidate that covers the classification region; failures and misses are remembered.
    const tried: { hdu: FitsHdu; raw?: RawSpectrum; format?: SpectrumFormat; error?: SpectrumReadError; coverage: number }[] = []
    let chosen: (typeof tried)[number] | undefined
    for (const c of candidates) {
      const hdu = hdus[c.index]!
      try {
        const { raw, format } = readHdu(ctx, hdu)
        const coverage = spanCoverage(raw.wavelength, options.classificationRegion)
        tried.push({ hdu, raw, format, coverage })
        if (coverage >= options.minCoverage) {
          chosen = tried[tried.length - 1]
          break
        }
      } catch (err) {
        if (!(err instanceof SpectrumReadError)) throw err
        tried.push({ hdu, error: err, coverage: 0 })
      }
    }
    const readable = tried.filter((t) => t.raw)
    if (!chosen) {
      if (readable.length === 0) throw tried[0]!.error!
      chosen = readable[0]!
    }
    const raw = chosen.raw!
    const others = tried.filter((t) => t !== chosen)
    const first = candidates[0]!.index === chosen.hdu.index
    raw.hduWhy =
      candidates.length === 1
        ? 'the only HDU holding a spectrum'
        : first
          ? 'the first HDU holding a spectrum, and it covers the classification region'
          : `the first HDU that covers the classification region (${others
              .filter((t) => t.hdu.index < chosen.hdu.index)
              .map((t) => describe(t.hdu))
              .join(', ')} ${others.length === 1 ? 'does' : 'do'} not)`
    for (const t of others) {
      raw.ignored.push(
        `${describe(t.hdu)}: ${t.raw ? `another spectrum (${range(t.raw.wavelength)})` : `could not be read (${t.error!.message.replace(`${fileName}: `, '')})`}; pick it with the HDU option`,
      )
    }
    const triedIndex = new Set(tried.map((t) => t.hdu.index))
    for (const c of candidates) {
      if (!triedIndex.has(c.index)) raw.ignored.push(`HDU ${c.index}${c.name ? ` (${c.name})` : ''}: another spectrum; pick it with the HDU option`)
    }
    for (const h of notSpectra) if (!companionRole(h)) raw.ignored.push(`${describe(h)}: not a spectrum`)
    if (readable.length > 1 || candidates.length > 1) {
      raw.coverageHint = `; the spectra in the file: ${[...readable.map((t) => `${describe(t.hdu)} ${range(t.raw!.wavelength)}`)].join(', ')} (pick one with the HDU option)`
    }
    return { raw, format: chosen.format!, hdus: candidates }
  },
}

/** The readers, tried in order; FITS first because a FITS header is also printable text. */
export const READERS: readonly FormatReader[] = [fitsReader, textReader]

function resolveUnit(unit: string | undefined): ResolvedReadOptions['unitFactor'] {
  if (unit === undefined || unit.trim() === '') return undefined
  const factor = angstromsPerUnit(unit)
  if (factor === undefined) throw new SpectrumReadError('UNKNOWN_UNIT', `the wavelength unit '${unit}' you chose is not one of Angstrom, nm, um, m`)
  return { unit: unit.trim(), factor }
}

function resolveOptions(options: ReadOptions): ResolvedReadOptions {
  return {
    maxBytes: options.maxBytes ?? DEFAULT_READ_OPTIONS.maxBytes,
    maxPixels: options.maxPixels ?? DEFAULT_READ_OPTIONS.maxPixels,
    minPixels: options.minPixels ?? DEFAULT_READ_OPTIONS.minPixels,
    hdu: options.hdu,
    aperture: options.aperture,
    assumeVacuum: options.assumeVacuum,
    unitFactor: resolveUnit(options.wavelengthUnit),
    classificationRegion: options.classificationRegion ?? DEFAULT_READ_OPTIONS.classificationRegion,
    minCoverage: options.minCoverage ?? DEFAULT_READ_OPTIONS.minCoverage,
  }
}

/**
 * Reads one spectrum file held in memory and returns it with wavelengths in Å (air, ascending),
 * or a typed refusal whose message names the file and the problem. Never throws on bad input.
 * Formats are told apart by content: FITS by its 'SIMPLE  =' first card (FITS Standard 4.0 §4.4.1),
 * gzip by its magic bytes (decompressed with the same size limit), otherwise text.
 * @param bytes the whole file
 * @param fileName used in messages only
 * @param options see {@link ReadOptions}: maxBytes 50 MB, maxPixels 2 000 000, minPixels 100,
 *   classificationRegion [3900, 4900] Å with minCoverage 0.8, hdu first spectrum, assumeVacuum from the file
 */
export function readSpectrum(bytes: Uint8Array, fileName: string, options: ReadOptions = {}): ReadResult {
  let reader: FormatReader | undefined
  try {
    const opts = resolveOptions(options)
    if (bytes.length === 0) throw new SpectrumReadError('EMPTY_FILE', `${fileName} is empty`)
    if (bytes.length > opts.maxBytes) {
      throw new SpectrumReadError('FILE_TOO_LARGE', `${fileName} is ${bytes.length} bytes; the limit is ${opts.maxBytes}`)
    }
    if (isGzip(bytes)) {
      let inner: Uint8Array | undefined
      try {
        inner = gunzipBounded(bytes, opts.maxBytes)
      } catch (err) {
        throw new SpectrumReadError('UNKNOWN_FORMAT', `${fileName}: gzip data could not be read (${(err as Error).message})`)
      }
      if (!inner) throw new SpectrumReadError('FILE_TOO_LARGE', `${fileName} decompresses to more than ${opts.maxBytes} bytes, the limit`)
      return readSpectrum(inner, fileName.replace(/\.gz$/i, ''), options)
    }
    reader = READERS.find((r) => r.sniff(bytes, fileName))
    if (reader?.format === 'text' && looksLikeFitsHeader(bytes)) {
      throw new SpectrumReadError('FITS_MALFORMED', `${fileName}: looks like a FITS header but does not start with 'SIMPLE  ='`)
    }
    if (!reader) {
      throw new SpectrumReadError('UNKNOWN_FORMAT', `${fileName} is neither FITS (it does not start with 'SIMPLE  =') nor a text table`)
    }
    const { raw, format, hdus } = reader.read(bytes, fileName, opts)
    return finalizeSpectrum(raw, opts, fileName, format, hdus)
  } catch (err) {
    if (err instanceof SpectrumReadError) return { ok: false, code: err.code, message: err.message }
    // A reader bug or a corner of the format nobody foresaw: still a refusal, never a crash.
    return {
      ok: false,
      code: reader?.format === 'text' ? 'TEXT_MALFORMED' : 'FITS_MALFORMED',
      message: `${fileName} could not be read: unexpected error (${(err as Error).message})`,
    }
  }
}
