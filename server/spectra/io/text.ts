/**
 * Plain-text spectra: columns of wavelength, flux and optionally error or inverse variance,
 * separated by whitespace, commas, semicolons, tabs or '|', with the preambles text writers put
 * in front: comment lines (#, !), keyword lines without # ("OBJECT = …", "Object: …"), a header
 * row (optionally followed by a units row), IPAC tables (\keywords and |name|type|unit|null| rows),
 * astropy ECSV and fixed-width tables. Decimal commas are read where the separator is not a comma.
 */
import { type FlagSet } from './quality'
import { describeDispersion, fitDispersion } from './solution'
import { SpectrumReadError, type FormatReader, type HeaderValue, type MediumEvidence, type RawSpectrum, type ResolvedReadOptions } from './types'
import { angstromsPerUnit, vacuumFromText } from './units'

/** A number as text files write it, Fortran D exponents included (1.0D+03). */
const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([EeDd][+-]?\d+)?$/
const DECIMAL_COMMA = /^[+-]?\d+,\d+([Ee][+-]?\d+)?$/
const SPECIAL: Record<string, number> = {
  nan: NaN,
  '+nan': NaN,
  '-nan': NaN,
  inf: Infinity,
  '+inf': Infinity,
  '-inf': -Infinity,
  infinity: Infinity,
  '-infinity': -Infinity,
  null: NaN,
  '--': NaN,
  'n/a': NaN,
}

/** Parses one numeric token; undefined when it is not a number. */
export function parseNumberToken(token: string): number | undefined {
  // Fortran's D exponent (1.5D3) is the only form NUMBER admits that Number() does not read.
  if (NUMBER.test(token)) return Number(token.includes('D') || token.includes('d') ? token.replace(/[Dd]/, 'E') : token)
  const key = token.toLowerCase()
  return Object.hasOwn(SPECIAL, key) ? SPECIAL[key] : undefined
}

type Delimiter = ',' | ';' | '\t' | '|' | 'space'

function sniffDelimiter(line: string): Delimiter {
  if (line.startsWith('|')) return '|'
  if (line.includes('\t') && line.split('\t').filter((s) => s.trim()).length > 1) return '\t'
  if (line.includes(';')) return ';'
  // "3800,5 1,23": commas inside space-separated numbers are decimal commas.
  if (
    line.includes(',') &&
    !line
      .trim()
      .split(/\s+/)
      .every((t) => DECIMAL_COMMA.test(t))
  )
    return ','
  return 'space'
}

function splitLine(line: string, delimiter: Delimiter): string[] {
  if (delimiter === 'space') return line.trim().split(/\s+/)
  const parts = line.split(delimiter).map((s) => s.trim())
  if (delimiter === '|' && parts[0] === '') parts.shift()
  // A trailing delimiter leaves an empty last field; drop it.
  if (parts.length > 1 && parts[parts.length - 1] === '') parts.pop()
  return parts
}

const WAVE_WORDS = /^(wave(length)?s?|wavelen|lambda|lam|wl|loglam|λ|(wave(length)?|lambda)[ _-]?(vac(uum)?|air)|(vac(uum)?|air)[ _-]?(wave(length)?s?|lambda)|angstroms?|nm)$/
const FLUX_WORDS =
  /^(flux(_?density)?|fluxes|f(lam|nu|lambda)?|intensity|counts|spec(trum)?|normali[sz]ed[ _]?(flux|amplitude|intensity)|norm[ _]?flux|relative[ _]?flux|rel[ _]?flux|amplitude|f_lambda)$/
const ERROR_WORDS = /^(err(or)?s?|sigma|sig|unc(ertainty)?|e_?flux|flux_?err(or)?|noise|stddev|std)$/
const IVAR_WORDS = /^(ivar|invvar|inverse[ _]variance)$/
const VARIANCE_WORDS = /^(var|variance)$/

/** Longest column name looked at, and longest line accepted: bounds the work on hostile input. */
const MAX_NAME = 64
const MAX_LINE = 10_000
/** Lines of preamble (comments, keywords, header rows) looked at before the data must start. */
const MAX_PREAMBLE = 500

interface HeaderColumn {
  word: string
  unit?: string
  raw: string
}

/** Splits "wavelength(nm)", "wave [Angstrom]", "λ (Å)", "lambda_A" into a name and a unit. */
function parseHeaderToken(token: string): HeaderColumn {
  const t = token
    .trim()
    .replace(/^["']|["']$/g, '')
    .slice(0, MAX_NAME)
  // Index arithmetic rather than a backtracking regex: names come from untrusted files.
  const close = t.at(-1)
  const open = close === ')' ? t.lastIndexOf('(') : close === ']' ? t.lastIndexOf('[') : close === '}' ? t.lastIndexOf('{') : -1
  if (open > 0) return { word: t.slice(0, open).trim().toLowerCase(), unit: t.slice(open + 1, -1).trim(), raw: t }
  const under = /^([^_\s]*)[_\s]([A-Za-zµμÅ]+)$/.exec(t)
  if (under && angstromsPerUnit(under[2]!) !== undefined && WAVE_WORDS.test(under[1]!.toLowerCase())) {
    return { word: under[1]!.toLowerCase(), unit: under[2]!, raw: t }
  }
  return { word: t.toLowerCase(), raw: t }
}

/**
 * Tokens of a header line for a table `width` columns wide: by its own delimiter, else by runs of
 * two or more spaces ("Wavelength [nm]    Normalized Amplitude"), else by whitespace with bracketed
 * units joined to the name before them.
 */
function headerTokens(line: string, width: number): string[] {
  const d = sniffDelimiter(line)
  if (d !== 'space') return splitLine(line, d)
  const wide = line.trim().split(/\s{2,}|\t/)
  if (wide.length === width) return wide
  const out: string[] = []
  for (const tok of line.trim().split(/\s+/)) {
    if (out.length > 0 && /^[[({].*[\])}]$/.test(tok)) out[out.length - 1] += ` ${tok}`
    else out.push(tok)
  }
  return out
}

interface Columns {
  wave: number
  flux: number
  error?: number
  errorKind: 'sigma' | 'ivar' | 'variance'
  unit?: string
  names: string[]
  unitFrom?: string
  guessed?: string
}

function columnsFromNames(tokens: string[], guess = true): Columns | string {
  const parsed = tokens.map(parseHeaderToken)
  const find = (re: RegExp) => parsed.findIndex((c) => re.test(c.word))
  const wave = find(WAVE_WORDS)
  if (wave < 0) return `names no wavelength column (${tokens.join(', ')})`
  let flux = find(FLUX_WORDS)
  let guessed: string | undefined
  if (flux < 0) {
    if (tokens.length !== 2 || !guess) return `names no flux column (${tokens.join(', ')})`
    flux = 1 - wave
    guessed = `the column '${tokens[flux]}' was taken as the flux (the only other one)`
  }
  const out: Columns = { wave, flux, errorKind: 'sigma', names: tokens }
  if (guessed) out.guessed = guessed
  const sigma = find(ERROR_WORDS)
  const ivar = find(IVAR_WORDS)
  const variance = find(VARIANCE_WORDS)
  if (sigma >= 0) out.error = sigma
  else if (ivar >= 0) {
    out.error = ivar
    out.errorKind = 'ivar'
  } else if (variance >= 0) {
    out.error = variance
    out.errorKind = 'variance'
  }
  const w = parsed[wave]!
  const unit = w.unit ?? (/^(angstroms?|nm)$/.test(w.word) ? w.word : undefined)
  if (unit) {
    out.unit = unit
    out.unitFrom = `the column header '${w.raw}'`
  }
  return out
}

const KEYWORD_LINE = /^\\?([A-Za-z][A-Za-z0-9_ .-]{0,39}?)\s*(=|:)\s*(.*)$/
const TYPE_WORDS = /^(double|real|float|int|integer|long|char|date|r|i|d|c|f)$/i

/** Observation keywords a preamble may give, by the names text writers use (common practice). */
// prettier-ignore
const KEPT: Record<string, string> = {
  OBJECT: 'OBJECT', OBJNAME: 'OBJECT', TARGET: 'OBJECT', STAR: 'OBJECT', RA: 'RA', DEC: 'DEC', 'DATE-OBS': 'DATE-OBS',
  DATE: 'DATE-OBS', 'DATE_OBS': 'DATE-OBS', EXPTIME: 'EXPTIME', EXPOSURE: 'EXPTIME', INSTRUME: 'INSTRUME',
  INSTRUMENT: 'INSTRUME', TELESCOP: 'TELESCOP', TELESCOPE: 'TELESCOP', OBSERVER: 'OBSERVER',
}
const UNIT_KEYS = /^(cunit1|waveunit|wunit|xunit|xunits|wavelength[ _]units?|wave[ _]units?|units?|lambda[ _]units?)$/i
const MEDIUM_KEYS = /^(airorvac|vacuum|wavelength[ _]medium|medium|air[ _]?or[ _]?vac(uum)?)$/i

function cleanValue(v: string): string {
  const t = v.trim()
  if (t.startsWith("'") || t.startsWith('"')) return t.slice(1, t.indexOf(t[0]!, 1) > 0 ? t.indexOf(t[0]!, 1) : undefined).trim()
  const slash = t.indexOf(' /')
  return (slash >= 0 ? t.slice(0, slash) : t).trim()
}

/** Decodes as UTF-8 when the bytes are valid UTF-8, else as Windows-1252 (Latin-1 files with Å). */
function decodeText(bytes: Uint8Array): { text: string; encoding: string } {
  try {
    return { text: new TextDecoder('utf-8', { fatal: true }).decode(bytes), encoding: 'UTF-8' }
  } catch {
    return { text: new TextDecoder('windows-1252').decode(bytes), encoding: 'Latin-1' }
  }
}

/**
 * Reads a text spectrum (see the module comment for the layouts). Without names, columns are
 * wavelength, flux[, error]. The wavelength unit comes from the observer, the column header,
 * a units row (IPAC, ECSV), a keyword line (CUNIT1, "Wavelength unit:"), a comment naming it
 * ("# Wavelength [nm] …", "# units: nm"), else Å is assumed. Air or vacuum from column names
 * (wave_vac, wave_air), keyword lines (AIRORVAC, VACUUM) and comments.
 * @throws SpectrumReadError TEXT_MALFORMED, LENGTH_MISMATCH, TOO_MANY_PIXELS, UNKNOWN_UNIT
 */
export function readTextSpectrum(bytes: Uint8Array, fileName: string, options: ResolvedReadOptions): RawSpectrum {
  const { text, encoding } = decodeText(bytes)
  const lines = text.split(/\r\n|\r|\n/)
  const comments: string[] = []
  const keywords: [string, string][] = []
  const headerLines: string[] = []
  const ecsvUnits = new Map<string, string>()
  let ecsv = false
  let lastComment: string | undefined
  let delimiter: Delimiter | undefined
  let decimalComma = false
  // Lines bound the arrays: no spectrum can have more rows than the file has lines.
  const capacity = Math.min(lines.length, options.maxPixels)
  let cols: number[][] = []
  let width = 0
  let n = 0
  let preamble = 0
  for (let li = 0; li < lines.length; li++) {
    const line = li === 0 ? lines[li]!.replace(/^\uFEFF/, '') : lines[li]!
    if (line.length > MAX_LINE) throw new SpectrumReadError('TEXT_MALFORMED', `${fileName}: line ${li + 1} is longer than ${MAX_LINE} characters; not a text table`)
    const trimmed = line.trim()
    if (trimmed === '') continue
    if (trimmed.startsWith('#') || trimmed.startsWith('!') || (trimmed.startsWith('\\') && !KEYWORD_LINE.test(trimmed.slice(1)))) {
      const body = trimmed.replace(/^[#!\\]+\s*/, '')
      if (/^%ECSV\b/.test(body)) ecsv = true
      if (ecsv) {
        const name = /name:\s*([^,}\s]+)/.exec(body)?.[1]
        const unit = /unit:\s*([^,}]+)/.exec(body)?.[1]?.trim()
        if (name && unit) ecsvUnits.set(name.toLowerCase(), unit)
      } else if (body) {
        lastComment = body
        comments.push(body)
      }
      continue
    }
    if (n === 0) {
      if (++preamble > MAX_PREAMBLE) throw new SpectrumReadError('TEXT_MALFORMED', `${fileName}: no rows of numbers in the first ${MAX_PREAMBLE} lines`)
      const d = sniffDelimiter(trimmed)
      let tokens = splitLine(trimmed, d)
      const comma = d !== ',' && tokens.some((t) => DECIMAL_COMMA.test(t))
      if (comma) tokens = tokens.map((t) => t.replace(',', '.'))
      // The data start at a row of numbers; a row of only nulls (an IPAC null row) is header.
      if (tokens.length === 0 || tokens.some((t) => parseNumberToken(t) === undefined) || !tokens.some((t) => NUMBER.test(t))) {
        const kw = headerLines.length === 0 && !trimmed.startsWith('|') ? KEYWORD_LINE.exec(trimmed.replace(/^\\/, '')) : null
        if (kw) keywords.push([kw[1]!.trim(), cleanValue(kw[3]!)])
        else headerLines.push(trimmed)
        continue
      }
      delimiter = d
      decimalComma = comma
      width = tokens.length
      cols = Array.from({ length: width }, () => [])
    }
    let tokens = splitLine(trimmed, delimiter!)
    if (decimalComma) tokens = tokens.map((t) => t.replace(',', '.'))
    if (tokens.length !== width) {
      throw new SpectrumReadError('LENGTH_MISMATCH', `${fileName}: line ${li + 1} has ${tokens.length} values, expected ${width}`)
    }
    if (n >= capacity) throw new SpectrumReadError('TOO_MANY_PIXELS', `${fileName}: more than ${options.maxPixels} rows, the limit`)
    for (let c = 0; c < width; c++) {
      const v = tokens[c] === '' && delimiter !== 'space' ? NaN : parseNumberToken(tokens[c]!)
      if (v === undefined) throw new SpectrumReadError('TEXT_MALFORMED', `${fileName}: line ${li + 1}: '${tokens[c]!.slice(0, 40)}' is not a number`)
      cols[c]!.push(v)
    }
    n++
  }
  if (n === 0) throw new SpectrumReadError('TEXT_MALFORMED', `${fileName}: no rows of numbers found`)

  // Column names: a header row, else the comment just above the data; units from a units row.
  const notes: string[] = []
  let columns: Columns | undefined
  let headerWhy = ''
  const rows = headerLines.map((l) => headerTokens(l, width))
  const named = rows.find((r) => r.length >= 2)
  if (named) {
    const found = columnsFromNames(named)
    if (typeof found === 'string') throw new SpectrumReadError('TEXT_MALFORMED', `${fileName}: the header row ${found}; name the columns wavelength and flux (with the unit, e.g. "wavelength (nm)")`)
    columns = found
    headerWhy = `header row '${named.join(' | ')}'`
    for (const r of rows.slice(rows.indexOf(named) + 1)) {
      if (r.length !== named.length || r.every((t) => TYPE_WORDS.test(t) || /^null$/i.test(t))) continue
      const u = r[columns.wave]!.replace(/^[[(]|[\])]$/g, '')
      if (!columns.unit && angstromsPerUnit(u) !== undefined) {
        columns.unit = u
        columns.unitFrom = `the units row under the header ('${r.join(' | ')}')`
      }
    }
  } else if (lastComment !== undefined) {
    const tokens = headerTokens(lastComment, width)
    if (tokens.length === width && tokens.every((t) => parseNumberToken(t) === undefined)) {
      // A comment is only a header when it names the flux too, or gives the wavelength's unit.
      const found = columnsFromNames(
        tokens,
        tokens.some((t) => parseHeaderToken(t).unit !== undefined),
      )
      if (typeof found !== 'string') {
        columns = found
        headerWhy = `commented header '${lastComment}'`
      }
    }
  }
  if (columns && Math.max(columns.wave, columns.flux, columns.error ?? 0) >= width) {
    throw new SpectrumReadError('LENGTH_MISMATCH', `${fileName}: the header names ${columns.names.length} columns but the rows have ${width} values`)
  }
  if (!columns) {
    if (width < 2 || width > 3) {
      throw new SpectrumReadError(
        'TEXT_MALFORMED',
        `${fileName}: the rows have ${width} columns; without a header row naming them, 2 or 3 columns (wavelength, flux, error) are expected: add a header row such as "wavelength flux error"`,
      )
    }
    columns = width === 3 ? { wave: 0, flux: 1, error: 2, errorKind: 'sigma', names: [] } : { wave: 0, flux: 1, errorKind: 'sigma', names: [] }
    headerWhy = 'no header: columns taken as wavelength, flux' + (width === 3 ? ', error' : '')
  }
  if (columns.guessed) notes.push(columns.guessed)
  if (ecsv && columns.names.length) {
    const u = ecsvUnits.get(parseHeaderToken(columns.names[columns.wave]!).word)
    if (u && !columns.unit) {
      columns.unit = u
      columns.unitFrom = 'the ECSV header'
    }
  }

  // Keywords of the preamble.
  const header: Record<string, HeaderValue> = {}
  const medium: MediumEvidence[] = []
  let keywordUnit: { unit: string; key: string } | undefined
  for (const [key, value] of keywords) {
    const k = key.toUpperCase().replace(/\s+/g, ' ')
    if (UNIT_KEYS.test(key) && angstromsPerUnit(value) !== undefined) keywordUnit ??= { unit: value, key }
    else if (MEDIUM_KEYS.test(key)) {
      // VACUUM = T/F is a yes/no; AIRORVAC and "medium" name the medium.
      const yesNo = /^vacuum$/i.test(key)
      const v = yesNo && /^(t|true|yes|1)$/i.test(value) ? true : yesNo && /^(f|false|no|0)$/i.test(value) ? false : vacuumFromText(value)
      if (v !== undefined) medium.push({ vacuum: v, source: `${key} = ${value}`, strength: 3 })
    }
    const kept = KEPT[k] ?? KEPT[k.replace(/ /g, '_')]
    if (kept && header[kept] === undefined) {
      const num = parseNumberToken(value.replace(/\s*s(ec(onds?)?)?$/i, ''))
      header[kept] = kept === 'EXPTIME' && num !== undefined ? num : value
    }
  }
  const unitFromComment = comments.map((c) => /\bunits?\s?[:=]\s?([A-Za-zµμÅ]+)/i.exec(c)?.[1]).find((u) => u !== undefined && angstromsPerUnit(u) !== undefined)
  const commentHeaderUnit = comments
    .map(
      (c) =>
        headerTokens(c, width)
          .map(parseHeaderToken)
          .find((h) => WAVE_WORDS.test(h.word) && h.unit && angstromsPerUnit(h.unit) !== undefined)?.unit,
    )
    .find((u) => u !== undefined)

  let unit: string | undefined
  let unitSource: string
  if (options.unitFactor) {
    unit = options.unitFactor.unit
    unitSource = 'your choice'
  } else if (columns.unit) {
    unit = columns.unit
    unitSource = columns.unitFrom!
  } else if (keywordUnit) {
    unit = keywordUnit.unit
    unitSource = `the keyword line ${keywordUnit.key}`
  } else if (commentHeaderUnit) {
    unit = commentHeaderUnit
    unitSource = 'the commented column header'
  } else if (unitFromComment) {
    unit = unitFromComment
    unitSource = 'a comment line'
  } else unitSource = 'assumed Å: the file names no unit'
  const factor = options.unitFactor?.factor ?? (unit === undefined ? 1 : angstromsPerUnit(unit))
  if (factor === undefined)
    throw new SpectrumReadError('UNKNOWN_UNIT', `${fileName}: wavelength unit '${unit}' is not one of Angstrom, nm, um, m; choose the unit when you submit (--unit with npm run classify)`)

  // A loop: TypedArray.from with a mapping function is many times slower.
  const waves = cols[columns.wave]!
  const wavelength = new Float64Array(waves.length)
  for (let i = 0; i < waves.length; i++) wavelength[i] = waves[i]! * factor
  const flux = Float64Array.from(cols[columns.flux]!)
  const waveName = columns.names[columns.wave] ? parseHeaderToken(columns.names[columns.wave]!).word : ''
  if (/vac/.test(waveName)) medium.push({ vacuum: true, source: `column name '${columns.names[columns.wave]}'`, strength: 3 })
  else if (/air/.test(waveName)) medium.push({ vacuum: false, source: `column name '${columns.names[columns.wave]}'`, strength: 3 })
  for (const c of comments) {
    const v = vacuumFromText(c)
    if (v !== undefined) medium.push({ vacuum: v, source: `the comment "${c.slice(0, 80)}"`, strength: 2 })
  }
  const flagSets: FlagSet[] = []
  const ignored: string[] = []
  const raw: RawSpectrum = {
    wavelength,
    flux,
    medium: medium.sort((a, b) => b.strength - a.strength),
    wavelengthUnit: unit ?? 'Angstrom (assumed)',
    unitSource,
    unitAssumed: unit === undefined,
    header,
    notes,
    masks: [],
    ignored,
    warnings: [],
    flagSets,
    source: `text table (${encoding}${delimiter === 'space' ? ', whitespace' : delimiter === '\t' ? ', tab' : `, '${delimiter}'`}-separated${decimalComma ? ', decimal commas' : ''}), ${width} columns, ${n} rows; ${headerWhy}`,
    solution: `${columns.names[columns.wave] ? `column '${columns.names[columns.wave]}'` : 'column 1'} (${describeDispersion(fitDispersion(wavelength))})`,
  }
  if (columns.error !== undefined) {
    const e = Float64Array.from(cols[columns.error]!)
    const name = columns.names[columns.error] ?? `column ${columns.error + 1}`
    if (columns.errorKind === 'ivar') {
      const zero = new Uint8Array(n)
      for (let i = 0; i < n; i++) {
        const iv = e[i]!
        if (iv > 0 && Number.isFinite(iv)) e[i] = 1 / Math.sqrt(iv)
        else {
          e[i] = Infinity
          zero[i] = 1
        }
      }
      flagSets.push({ source: `${name} column`, rule: 'inverse variance 0 means no data', flags: zero })
      raw.errorSource = `${name}: error = 1/√${name}`
    } else if (columns.errorKind === 'variance') {
      for (let i = 0; i < n; i++) e[i] = e[i]! >= 0 ? Math.sqrt(e[i]!) : NaN
      raw.errorSource = `${name}: error = √${name}`
    } else raw.errorSource = `${columns.names.length ? `column '${name}'` : 'column 3'} (1σ)`
    raw.error = e
  }
  const used = new Set([columns.wave, columns.flux, columns.error])
  const unused = columns.names.filter((_, i) => !used.has(i))
  if (unused.length) ignored.push(`column${unused.length > 1 ? 's' : ''} ${unused.join(', ')}`)
  if (keywords.length) notes.push(`keyword lines before the data: ${keywords.map(([k]) => k).join(', ')}`)
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
