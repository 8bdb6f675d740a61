/**
 * The one entry point for spectrum files: sniffs the format from the content, hands the bytes to
 * the matching reader of the registry, and applies the shared checks.
 */
import { hduName, parseFits, type FitsHdu } from './fits'
import { imageSpectrumProblem, readImageHdu } from './fits-image'
import { readTableHdu, tableLayout } from './fits-table'
import { finalizeSpectrum } from './finalize'
import { textReader } from './text'
import {
  DEFAULT_READ_OPTIONS, SpectrumReadError, type FormatReader, type RawSpectrum, type ReadOptions,
  type ReadResult, type ResolvedReadOptions, type SpectrumFormat, type SpectrumHdu,
} from './types'
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
  return head.length === 2880 && /^.{80}BITPIX  =/s.test(head) && head.includes('NAXIS   =')
}

/** Whether an HDU holds a spectrum, without decoding its data. */
function spectrumKind(hdu: FitsHdu, fileName: string): 'image' | 'table' | string {
  if (hdu.kind === 'image') {
    const problem = imageSpectrumProblem(hdu)
    if (problem) return problem
    if (!hdu.cards.has('CRVAL1') && !hdu.cards.has('COEFF0')) return 'it has no wavelength scale'
    return 'image'
  }
  if (hdu.kind === 'bintable') {
    const layout = tableLayout(hdu, fileName)
    return typeof layout === 'string' ? layout : 'table'
  }
  return `it is a ${hdu.xtension} extension`
}

function pickHdu(hdus: FitsHdu[], wanted: number | string, fileName: string): FitsHdu {
  const hdu = typeof wanted === 'number'
    ? hdus[wanted]
    : hdus.find((h) => (hduName(h) ?? (h.index === 0 ? 'PRIMARY' : '')).toUpperCase() === wanted.trim().toUpperCase())
  if (!hdu) {
    throw new SpectrumReadError('HDU_NOT_FOUND', `${fileName}: there is no HDU ${typeof wanted === 'number' ? wanted : `named '${wanted}'`} (the file has ${hdus.length}, numbered 0–${hdus.length - 1})`)
  }
  return hdu
}

/** FITS files: primary and extension HDUs, images (fits-image.ts) and binary tables (fits-table.ts). */
export const fitsReader: FormatReader = {
  format: 'fits',
  sniff: (bytes) => hasFitsSignature(bytes),
  read(bytes, fileName, options) {
    const hdus = parseFits(bytes, fileName)
    const primary = hdus[0]
    const candidates: SpectrumHdu[] = []
    const reasons: string[] = []
    let firstError: SpectrumReadError | undefined
    for (const h of hdus) {
      let kind: string
      try {
        kind = spectrumKind(h, fileName)
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
    let hdu: FitsHdu
    if (options.hdu !== undefined) {
      hdu = pickHdu(hdus, options.hdu, fileName)
    } else {
      const first = candidates[0]
      if (!first) {
        if (firstError) throw firstError
        throw new SpectrumReadError('NOT_A_SPECTRUM', `${fileName}: no HDU holds a spectrum (${reasons.join('; ')})`)
      }
      hdu = hdus[first.index]!
    }
    let raw: RawSpectrum
    let format: SpectrumFormat
    if (hdu.kind === 'bintable') { raw = readTableHdu(bytes, hdu, primary, fileName, options); format = 'fits-table' }
    else if (hdu.kind === 'image') { raw = readImageHdu(bytes, hdu, primary, fileName, options); format = 'fits-image' }
    else throw new SpectrumReadError('NOT_A_SPECTRUM', `${fileName}: HDU ${hdu.index} is a ${hdu.xtension} extension, not a spectrum`)
    return { raw, format, hdus: candidates }
  },
}

/** The readers, tried in order; FITS first because a FITS header is also printable text. */
export const READERS: readonly FormatReader[] = [fitsReader, textReader]

function resolveOptions(options: ReadOptions): ResolvedReadOptions {
  return {
    maxBytes: options.maxBytes ?? DEFAULT_READ_OPTIONS.maxBytes,
    maxPixels: options.maxPixels ?? DEFAULT_READ_OPTIONS.maxPixels,
    minPixels: options.minPixels ?? DEFAULT_READ_OPTIONS.minPixels,
    hdu: options.hdu,
    assumeVacuum: options.assumeVacuum,
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
  const opts = resolveOptions(options)
  let reader: FormatReader | undefined
  try {
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
