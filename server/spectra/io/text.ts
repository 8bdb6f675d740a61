/**
 * Plain-text spectra: whitespace, comma, semicolon or tab separated columns of wavelength,
 * flux and optionally error, with comment lines and an optional header row.
 */
import { SpectrumReadError, type FormatReader, type RawSpectrum, type ResolvedReadOptions } from './types'
import { angstromsPerUnit, vacuumFromText } from './units'

/** A number as text files write it, Fortran D exponents included (1.0D+03). */
const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([EeDd][+-]?\d+)?$/
const SPECIAL: Record<string, number> = { nan: NaN, '+nan': NaN, '-nan': NaN, inf: Infinity, '+inf': Infinity, '-inf': -Infinity, infinity: Infinity, '-infinity': -Infinity }

/** Parses one numeric token; undefined when it is not a number. */
export function parseNumberToken(token: string): number | undefined {
  if (NUMBER.test(token)) return Number(token.replace(/[Dd]/, 'E'))
  const key = token.toLowerCase()
  return Object.hasOwn(SPECIAL, key) ? SPECIAL[key] : undefined
}

type Delimiter = ',' | ';' | '\t' | 'space'

function sniffDelimiter(line: string): Delimiter {
  if (line.includes('\t') && line.split('\t').filter((s) => s.trim()).length > 1) return '\t'
  if (line.includes(';')) return ';'
  if (line.includes(',')) return ','
  return 'space'
}

function splitLine(line: string, delimiter: Delimiter): string[] {
  if (delimiter === 'space') return line.trim().split(/\s+/)
  const parts = line.split(delimiter).map((s) => s.trim())
  // A trailing delimiter leaves an empty last field; drop it.
  if (parts.length > 1 && parts[parts.length - 1] === '') parts.pop()
  return parts
}

const WAVE_WORDS = /^(wave(length)?s?|wavelen|lambda|lam|wl|loglam|angstroms?|nm)$/
const FLUX_WORDS = /^(flux(_?density)?|f(lam|nu|lambda)?|intensity|counts|spec(trum)?|normali[sz]ed_?flux|norm_?flux|f_lambda)$/
const ERROR_WORDS = /^(err(or)?s?|sigma|unc(ertainty)?|e_?flux|flux_?err(or)?|ivar|noise|stddev|std)$/

interface HeaderColumn { word: string; unit?: string }

/** Longest column name looked at, and longest line accepted: bounds the work on hostile input. */
const MAX_NAME = 64
const MAX_LINE = 10_000

/** Splits "wavelength(nm)", "wave [Angstrom]", "lambda_A" into a name and a unit. */
function parseHeaderToken(token: string): HeaderColumn {
  const t = token.trim().replace(/^["']|["']$/g, '').slice(0, MAX_NAME)
  // Index arithmetic rather than a backtracking regex: names come from untrusted files.
  const close = t.at(-1)
  const open = close === ')' ? t.lastIndexOf('(') : close === ']' ? t.lastIndexOf('[') : close === '}' ? t.lastIndexOf('{') : -1
  if (open > 0) return { word: t.slice(0, open).trim().toLowerCase(), unit: t.slice(open + 1, -1).trim() }
  const under = /^([^_\s]*)[_\s]([A-Za-zµμÅ]+)$/.exec(t)
  if (under && angstromsPerUnit(under[2]!) !== undefined && WAVE_WORDS.test(under[1]!.toLowerCase())) {
    return { word: under[1]!.toLowerCase(), unit: under[2]! }
  }
  return { word: t.toLowerCase() }
}

interface Columns { wave: number; flux: number; error?: number; ivar: boolean; unit?: string; names: string[] }

function columnsFromHeader(tokens: string[], fileName: string, lineNo: number): Columns {
  const parsed = tokens.map(parseHeaderToken)
  const find = (re: RegExp) => parsed.findIndex((c) => re.test(c.word))
  const wave = find(WAVE_WORDS)
  const flux = find(FLUX_WORDS)
  if (wave < 0 || flux < 0) {
    throw new SpectrumReadError('TEXT_MALFORMED', `${fileName}: line ${lineNo} looks like a header (${tokens.join(', ')}) but names no ${wave < 0 ? 'wavelength' : 'flux'} column`)
  }
  const error = find(ERROR_WORDS)
  const out: Columns = { wave, flux, ivar: false, names: tokens }
  const unit = parsed[wave]!.unit ?? (/^(angstroms?|nm)$/.test(parsed[wave]!.word) ? parsed[wave]!.word : undefined)
  if (unit) out.unit = unit
  if (error >= 0) { out.error = error; out.ivar = parsed[error]!.word === 'ivar' }
  return out
}

/** "# wavelength unit: nm", "# units = Angstrom" in comments. */
function unitFromComment(text: string): string | undefined {
  const m = /\bunits?\s?[:=]\s?([A-Za-zµμÅ]+)/i.exec(text)
  return m && angstromsPerUnit(m[1]!) !== undefined ? m[1] : undefined
}

/**
 * Reads a text spectrum. Comment lines start with # or !; the first non-comment line, or the last
 * comment line before the data, may name the columns (wavelength, flux, error or ivar) with a unit
 * in brackets or after an underscore. Without names, columns are wavelength, flux[, error].
 * Delimiter: tab, semicolon, comma or whitespace, sniffed from the first data line.
 * Air or vacuum from words in comments or column names ("vacuum", "air").
 * @throws SpectrumReadError TEXT_MALFORMED, LENGTH_MISMATCH, TOO_MANY_PIXELS, UNKNOWN_UNIT
 */
export function readTextSpectrum(bytes: Uint8Array, fileName: string, options: ResolvedReadOptions): RawSpectrum {
  const text = new TextDecoder('utf-8').decode(bytes)
  const lines = text.split(/\r\n|\r|\n/)
  const comments: string[] = []
  let columns: Columns | undefined
  let delimiter: Delimiter | undefined
  let lastComment: string | undefined
  // Lines bound the arrays: no spectrum can have more rows than the file has lines.
  const capacity = Math.min(lines.length, options.maxPixels)
  const wave = new Float64Array(capacity)
  const flux = new Float64Array(capacity)
  let err: Float64Array | undefined
  let width = 0
  let n = 0
  for (let li = 0; li < lines.length; li++) {
    const line = lines[li]!.replace(/^\uFEFF/, '')
    if (line.length > MAX_LINE) throw new SpectrumReadError('TEXT_MALFORMED', `${fileName}: line ${li + 1} is longer than ${MAX_LINE} characters; not a text table`)
    const trimmed = line.trim()
    if (trimmed === '') continue
    if (trimmed.startsWith('#') || trimmed.startsWith('!')) {
      lastComment = trimmed.replace(/^[#!]+\s*/, '')
      comments.push(lastComment)
      continue
    }
    delimiter ??= sniffDelimiter(trimmed)
    const tokens = splitLine(trimmed, delimiter)
    const values = tokens.map(parseNumberToken)
    if (n === 0 && width === 0) {
      if (values.some((v) => v === undefined)) {
        if (columns) throw new SpectrumReadError('TEXT_MALFORMED', `${fileName}: line ${li + 1} is not numbers: '${trimmed.slice(0, 60)}'`)
        columns = columnsFromHeader(tokens, fileName, li + 1)
        delimiter = undefined
        continue
      }
      if (!columns && lastComment !== undefined) {
        // A commented header row just above the data, e.g. "# wavelength flux error".
        const ct = splitLine(lastComment, sniffDelimiter(lastComment))
        if (ct.length === tokens.length && ct.every((t) => parseNumberToken(t) === undefined)) {
          try { columns = columnsFromHeader(ct, fileName, li) } catch { /* an ordinary comment */ }
        }
      }
      width = tokens.length
      if (!columns) {
        if (width < 2 || width > 3) {
          throw new SpectrumReadError('TEXT_MALFORMED', `${fileName}: line ${li + 1} has ${width} columns; without a header row naming them, 2 or 3 columns (wavelength, flux, error) are expected`)
        }
        columns = width === 3 ? { wave: 0, flux: 1, error: 2, ivar: false, names: [] } : { wave: 0, flux: 1, ivar: false, names: [] }
      }
      const need = Math.max(columns.wave, columns.flux, columns.error ?? 0) + 1
      if (width < need) throw new SpectrumReadError('LENGTH_MISMATCH', `${fileName}: line ${li + 1} has ${width} values but the header names ${columns.names.length} columns`)
      if (columns.error !== undefined) err = new Float64Array(capacity)
    }
    if (tokens.length !== width) {
      throw new SpectrumReadError('LENGTH_MISMATCH', `${fileName}: line ${li + 1} has ${tokens.length} values, expected ${width}`)
    }
    const bad = values.findIndex((v) => v === undefined)
    if (bad >= 0) throw new SpectrumReadError('TEXT_MALFORMED', `${fileName}: line ${li + 1}: '${tokens[bad]!.slice(0, 40)}' is not a number`)
    if (n >= capacity) throw new SpectrumReadError('TOO_MANY_PIXELS', `${fileName}: more than ${options.maxPixels} rows, the limit`)
    const cols = columns!
    wave[n] = values[cols.wave]!
    flux[n] = values[cols.flux]!
    if (err && cols.error !== undefined) err[n] = values[cols.error]!
    n++
  }
  if (n === 0) throw new SpectrumReadError('TEXT_MALFORMED', `${fileName}: no rows of numbers found`)
  const cols = columns!
  const commentText = comments.join(' ')
  const unit = cols.unit ?? unitFromComment(commentText)
  const factor = unit === undefined ? 1 : angstromsPerUnit(unit)
  if (factor === undefined) throw new SpectrumReadError('UNKNOWN_UNIT', `${fileName}: wavelength unit '${unit}' is not one of Angstrom, nm, um, m`)
  const wavelength = wave.slice(0, n)
  if (factor !== 1) for (let i = 0; i < n; i++) wavelength[i] = wavelength[i]! * factor
  const raw: RawSpectrum = {
    wavelength, flux: flux.slice(0, n), vacuum: undefined, vacuumSource: '',
    wavelengthUnit: unit ?? 'Angstrom (assumed)', unitAssumed: unit === undefined, header: {}, notes: [],
  }
  if (err) {
    const e = err.slice(0, n)
    if (cols.ivar) {
      const mask = new Uint8Array(n)
      for (let i = 0; i < n; i++) {
        const iv = e[i]!
        if (iv > 0 && Number.isFinite(iv)) e[i] = 1 / Math.sqrt(iv)
        else { e[i] = Infinity; mask[i] = 1 }
      }
      raw.mask = mask
    }
    raw.error = e
  }
  const vacText = [commentText, cols.names.join(' ')].join(' ')
  const vac = vacuumFromText(vacText)
  if (vac !== undefined) {
    raw.vacuum = vac
    raw.vacuumSource = `the file's text says ${vac ? 'vacuum' : 'air'}`
  }
  if (cols.names.length) raw.notes.push(`columns named ${cols.names.join(', ')}`)
  return raw
}

/** True when the first bytes look like text: no NUL and almost no control bytes. */
export function looksLikeText(bytes: Uint8Array): boolean {
  const n = Math.min(bytes.length, 4096)
  if (n === 0) return false
  let control = 0
  for (let i = 0; i < n; i++) {
    const b = bytes[i]!
    if (b === 0) return false
    if (b < 32 && b !== 9 && b !== 10 && b !== 13 && b !== 12) control++
  }
  return control / n < 0.01
}

export const textReader: FormatReader = {
  format: 'text',
  sniff: (bytes) => looksLikeText(bytes),
  read: (bytes, fileName, options) => ({ raw: readTextSpectrum(bytes, fileName, options), format: 'text' }),
}
