/**
 * FITS container: header cards, HDU boundaries and bounded data access.
 * Parsed here rather than through a general FITS library so that every size a header
 * claims is checked against the bytes the file holds before anything is allocated.
 * Layout and keyword rules: FITS Standard 4.0 (IAU FITS Working Group, 2018).
 */
import { SpectrumReadError, type HeaderValue } from './types'

export const BLOCK = 2880
const CARD = 80

export interface FitsHdu {
  index: number
  kind: 'image' | 'bintable' | 'other'
  /** XTENSION value, or 'PRIMARY'. */
  xtension: string
  /** Keyword → value; the first occurrence wins, as in astropy. */
  cards: Map<string, HeaderValue>
  /** Keyword → card comment. */
  comments: Map<string, string>
  /** COMMENT and HISTORY text, in order. */
  commentary: string[]
  bitpix: number
  naxis: number[]
  dataOffset: number
  dataBytes: number
}

const TEXT = new TextDecoder('latin1')

function parseValue(field: string): { value: HeaderValue | undefined; comment: string } {
  const s = field.trimStart()
  if (s.startsWith("'")) {
    // A string ends at a single quote not followed by another ('' is an escaped quote).
    let out = ''
    let i = 1
    for (; i < s.length; i++) {
      const ch = s[i]!
      if (ch === "'") {
        if (s[i + 1] === "'") { out += "'"; i++; continue }
        break
      }
      out += ch
    }
    const rest = s.slice(i + 1)
    const slash = rest.indexOf('/')
    return { value: out.replace(/\s+$/, ''), comment: slash >= 0 ? rest.slice(slash + 1).trim() : '' }
  }
  const slash = s.indexOf('/')
  const token = (slash >= 0 ? s.slice(0, slash) : s).trim()
  const comment = slash >= 0 ? s.slice(slash + 1).trim() : ''
  if (token === 'T') return { value: true, comment }
  if (token === 'F') return { value: false, comment }
  if (/^[+-]?(\d+\.?\d*|\.\d+)([EeDd][+-]?\d+)?$/.test(token)) {
    return { value: Number(token.replace(/[Dd]/, 'E')), comment }
  }
  return { value: undefined, comment }
}

function intCard(cards: Map<string, HeaderValue>, key: string, hduIndex: number, fileName: string): number {
  const v = cards.get(key)
  if (typeof v !== 'number' || !Number.isInteger(v)) {
    throw new SpectrumReadError('FITS_MALFORMED', `${fileName}: HDU ${hduIndex} has no valid integer ${key} keyword`)
  }
  return v
}

/** Reads one header starting at `offset`; returns the cards and where the data begin. */
function parseHeader(bytes: Uint8Array, offset: number, index: number, fileName: string) {
  const cards = new Map<string, HeaderValue>()
  const comments = new Map<string, string>()
  const commentary: string[] = []
  let first = ''
  let pos = offset
  for (;;) {
    if (pos + BLOCK > bytes.length) {
      throw new SpectrumReadError('FITS_TRUNCATED', `${fileName}: the header of HDU ${index} is cut off before its END card`)
    }
    const block = TEXT.decode(bytes.subarray(pos, pos + BLOCK))
    pos += BLOCK
    for (let c = 0; c < BLOCK; c += CARD) {
      const card = block.slice(c, c + CARD)
      const key = card.slice(0, 8).trimEnd()
      if (first === '') first = key || ' '
      if (key === 'END') return { cards, comments, commentary, first, dataOffset: pos }
      if (key === 'COMMENT' || key === 'HISTORY' || key === '') {
        const text = card.slice(8).trim()
        if (text) commentary.push(text)
        continue
      }
      if (card.slice(8, 10) !== '= ') continue
      const { value, comment } = parseValue(card.slice(10))
      if (value !== undefined && !cards.has(key)) cards.set(key, value)
      if (comment && !comments.has(key)) comments.set(key, comment)
    }
  }
}

/**
 * Splits a FITS file into HDUs, checking each header's claimed data size against the bytes
 * present. Trailing bytes that do not start an extension are ignored, as FITS readers commonly do.
 * Throws SpectrumReadError FITS_MALFORMED / FITS_TRUNCATED / FITS_UNSUPPORTED.
 */
export function parseFits(bytes: Uint8Array, fileName: string): FitsHdu[] {
  const hdus: FitsHdu[] = []
  let offset = 0
  while (offset < bytes.length) {
    const index = hdus.length
    if (index > 0) {
      // Another HDU only if the next block starts with an XTENSION card.
      if (bytes.length - offset < BLOCK || TEXT.decode(bytes.subarray(offset, offset + 10)) !== 'XTENSION= ') break
    }
    const h = parseHeader(bytes, offset, index, fileName)
    if (index === 0 && (h.first !== 'SIMPLE' || h.cards.get('SIMPLE') !== true)) {
      throw new SpectrumReadError('FITS_MALFORMED', `${fileName}: the primary header does not start with SIMPLE = T`)
    }
    const bitpix = intCard(h.cards, 'BITPIX', index, fileName)
    if (![8, 16, 32, 64, -32, -64].includes(bitpix)) {
      throw new SpectrumReadError('FITS_MALFORMED', `${fileName}: HDU ${index} has BITPIX = ${bitpix}, which FITS does not allow`)
    }
    const nAxes = intCard(h.cards, 'NAXIS', index, fileName)
    if (nAxes < 0 || nAxes > 999) {
      throw new SpectrumReadError('FITS_MALFORMED', `${fileName}: HDU ${index} has NAXIS = ${nAxes}, outside 0–999`)
    }
    const naxis: number[] = []
    const available = bytes.length - h.dataOffset
    // Running product in bytes, stopped as soon as it passes what the file holds: never trust it further.
    let elems = nAxes > 0 ? 1 : 0
    let empty = false
    for (let k = 1; k <= nAxes; k++) {
      const n = intCard(h.cards, `NAXIS${k}`, index, fileName)
      if (n < 0) throw new SpectrumReadError('FITS_MALFORMED', `${fileName}: HDU ${index} has a negative NAXIS${k}`)
      naxis.push(n)
      if (n === 0) empty = true
      elems *= n
      if (elems * (Math.abs(bitpix) / 8) > available) elems = Infinity
    }
    if (empty) elems = 0
    const xtension = index === 0 ? 'PRIMARY' : String(h.cards.get('XTENSION') ?? '').trim().toUpperCase()
    let pcount = 0
    let gcount = 1
    if (index > 0) {
      pcount = intCard(h.cards, 'PCOUNT', index, fileName)
      gcount = intCard(h.cards, 'GCOUNT', index, fileName)
      if (pcount < 0 || gcount < 0) throw new SpectrumReadError('FITS_MALFORMED', `${fileName}: HDU ${index} has a negative PCOUNT or GCOUNT`)
    } else if (h.cards.get('GROUPS') === true && naxis[0] === 0) {
      throw new SpectrumReadError('FITS_UNSUPPORTED', `${fileName}: random-groups FITS is not a spectrum format`)
    }
    const dataBytes = (Math.abs(bitpix) / 8) * gcount * (pcount + elems)
    if (!(dataBytes <= available)) {
      throw new SpectrumReadError(
        'FITS_TRUNCATED',
        `${fileName}: HDU ${index} claims more data than the file holds (${available} bytes left after its header)`,
      )
    }
    const kind: FitsHdu['kind'] =
      xtension === 'PRIMARY' || xtension === 'IMAGE' ? 'image' : xtension === 'BINTABLE' ? 'bintable' : 'other'
    hdus.push({
      index, kind, xtension, cards: h.cards, comments: h.comments, commentary: h.commentary,
      bitpix, naxis, dataOffset: h.dataOffset, dataBytes,
    })
    offset = h.dataOffset + Math.ceil(dataBytes / BLOCK) * BLOCK
  }
  return hdus
}

export function cardNumber(hdu: FitsHdu, key: string): number | undefined {
  const v = hdu.cards.get(key)
  return typeof v === 'number' && Number.isFinite(v) ? v : undefined
}

export function cardString(hdu: FitsHdu, key: string): string | undefined {
  const v = hdu.cards.get(key)
  return typeof v === 'string' ? v.trim() : undefined
}

/** EXTNAME, trimmed, if any. */
export function hduName(hdu: FitsHdu): string | undefined {
  const name = cardString(hdu, 'EXTNAME')
  return name ? name : undefined
}

/**
 * Decodes `count` big-endian pixels of an image HDU starting at pixel `first`, applying
 * BSCALE/BZERO (FITS Standard §5.3) and turning BLANK integers into NaN.
 * The caller has already bounded `count`; the range is checked against the HDU's data here.
 */
export function readImagePixels(bytes: Uint8Array, hdu: FitsHdu, first: number, count: number): Float64Array {
  const size = Math.abs(hdu.bitpix) / 8
  if (first < 0 || (first + count) * size > hdu.dataBytes) {
    throw new SpectrumReadError('FITS_TRUNCATED', `HDU ${hdu.index} has fewer pixels than its header says`)
  }
  const view = new DataView(bytes.buffer, bytes.byteOffset + hdu.dataOffset + first * size, count * size)
  const scale = cardNumber(hdu, 'BSCALE') ?? 1
  const zero = cardNumber(hdu, 'BZERO') ?? 0
  const blank = hdu.bitpix > 0 ? cardNumber(hdu, 'BLANK') : undefined
  const out = new Float64Array(count)
  for (let i = 0; i < count; i++) {
    let raw: number
    switch (hdu.bitpix) {
      case 8: raw = view.getUint8(i); break
      case 16: raw = view.getInt16(i * 2); break
      case 32: raw = view.getInt32(i * 4); break
      case 64: raw = Number(view.getBigInt64(i * 8)); break
      case -32: raw = view.getFloat32(i * 4); break
      default: raw = view.getFloat64(i * 8)
    }
    out[i] = raw === blank ? NaN : zero + scale * raw
  }
  return out
}

export interface TableColumn {
  /** 1-based column number. */
  number: number
  name: string
  type: string
  repeat: number
  /** Byte offset within a row. */
  offset: number
  unit?: string
  comment?: string
}

const TYPE_BYTES: Record<string, number> = { L: 1, B: 1, I: 2, J: 4, K: 8, A: 1, E: 4, D: 8, C: 8, M: 16, P: 8, Q: 16 }

/** Column layout of a BINTABLE HDU from its TFORMn/TTYPEn/TUNITn cards; checks the row width. */
export function tableColumns(hdu: FitsHdu, fileName: string): TableColumn[] {
  const nFields = cardNumber(hdu, 'TFIELDS') ?? 0
  if (!Number.isInteger(nFields) || nFields < 0 || nFields > 999) {
    throw new SpectrumReadError('FITS_MALFORMED', `${fileName}: HDU ${hdu.index} has an invalid TFIELDS`)
  }
  const cols: TableColumn[] = []
  let offset = 0
  for (let n = 1; n <= nFields; n++) {
    const form = cardString(hdu, `TFORM${n}`) ?? ''
    const m = /^(\d*)([LXBIJKAEDCMPQ])/.exec(form.toUpperCase())
    if (!m) throw new SpectrumReadError('FITS_MALFORMED', `${fileName}: HDU ${hdu.index} column ${n} has an invalid TFORM '${form}'`)
    const repeat = m[1] ? Number(m[1]) : 1
    const type = m[2]!
    const width = type === 'X' ? Math.ceil(repeat / 8) : repeat * TYPE_BYTES[type]!
    const col: TableColumn = { number: n, name: cardString(hdu, `TTYPE${n}`) ?? `COL${n}`, type, repeat, offset }
    const unit = cardString(hdu, `TUNIT${n}`)
    if (unit) col.unit = unit
    const comment = hdu.comments.get(`TTYPE${n}`)
    if (comment) col.comment = comment
    cols.push(col)
    offset += width
  }
  const rowBytes = hdu.naxis[0] ?? 0
  if (offset !== rowBytes) {
    throw new SpectrumReadError('FITS_MALFORMED', `${fileName}: HDU ${hdu.index} columns add up to ${offset} bytes a row but NAXIS1 = ${rowBytes}`)
  }
  return cols
}

/** True for the numeric column types a spectrum can be stored in. */
export function isNumericColumn(col: TableColumn): boolean {
  return 'BIJKED'.includes(col.type) && col.repeat > 0
}

/**
 * Reads a numeric column as float64. One value per row (repeat 1) gives NAXIS2 values; an array
 * column gives the array of row `row`. TSCALn/TZEROn are applied and TNULLn integers become NaN.
 * `count` is bounded by the caller against maxPixels before this allocates.
 */
export function readColumn(bytes: Uint8Array, hdu: FitsHdu, col: TableColumn, row: number): Float64Array {
  const rowBytes = hdu.naxis[0] ?? 0
  const rows = hdu.naxis[1] ?? 0
  const perRow = col.repeat === 1
  const count = perRow ? rows : col.repeat
  const size = TYPE_BYTES[col.type]!
  const scale = cardNumber(hdu, `TSCAL${col.number}`) ?? 1
  const zero = cardNumber(hdu, `TZERO${col.number}`) ?? 0
  const nul = cardNumber(hdu, `TNULL${col.number}`)
  const view = new DataView(bytes.buffer, bytes.byteOffset + hdu.dataOffset, rowBytes * rows)
  const out = new Float64Array(count)
  for (let i = 0; i < count; i++) {
    const at = perRow ? i * rowBytes + col.offset : row * rowBytes + col.offset + i * size
    let raw: number
    switch (col.type) {
      case 'B': raw = view.getUint8(at); break
      case 'I': raw = view.getInt16(at); break
      case 'J': raw = view.getInt32(at); break
      case 'K': raw = Number(view.getBigInt64(at)); break
      case 'E': raw = view.getFloat32(at); break
      default: raw = view.getFloat64(at)
    }
    out[i] = col.type !== 'E' && col.type !== 'D' && raw === nul ? NaN : zero + scale * raw
  }
  return out
}

/** Observation and resolution keywords passed on to the caller, as the file writes them. */
const KEPT_KEYWORDS = [
  'OBJECT', 'RA', 'DEC', 'RA_OBJ', 'DEC_OBJ', 'EQUINOX', 'RADESYS', 'DATE-OBS', 'MJD-OBS', 'EXPTIME',
  'INSTRUME', 'TELESCOP', 'OBSERVER', 'AIRMASS', 'EXTNAME',
  // Resolution as different reducers record it (common practice).
  'SPECRES', 'RESOLUTN', 'RESOLUTION', 'RESOLVPW', 'R', 'SPEC_RES', 'RES_POW', 'FWHM', 'SPECFWHM', 'DISPERS',
  'SPECSYS', 'BUNIT',
]

/** Kept keywords of an HDU, falling back to the primary header (FITS INHERIT convention). */
export function keptHeader(hdu: FitsHdu, primary: FitsHdu | undefined): Record<string, HeaderValue> {
  const out: Record<string, HeaderValue> = {}
  for (const key of KEPT_KEYWORDS) {
    const v = hdu.cards.get(key) ?? primary?.cards.get(key)
    if (v !== undefined) out[key] = v
  }
  return out
}

/**
 * Air/vacuum from keywords: VACUUM (logical, survey convention) or AIRORVAC ('air'/'vac'),
 * in the HDU first and then the primary header.
 */
export function vacuumFromKeywords(hdu: FitsHdu, primary: FitsHdu | undefined): { vacuum: boolean; source: string } | undefined {
  for (const h of primary && primary !== hdu ? [hdu, primary] : [hdu]) {
    const vac = h.cards.get('VACUUM')
    if (typeof vac === 'boolean') return { vacuum: vac, source: `VACUUM = ${vac ? 'T' : 'F'}` }
    const aov = h.cards.get('AIRORVAC')
    if (typeof aov === 'string') {
      const t = aov.trim().toLowerCase()
      if (t.startsWith('vac')) return { vacuum: true, source: `AIRORVAC = '${aov}'` }
      if (t === 'air') return { vacuum: false, source: `AIRORVAC = '${aov}'` }
    }
  }
  return undefined
}

/** Air/vacuum from COMMENT/HISTORY text, e.g. "All wavelengths are in vacuum." */
export function vacuumFromCommentary(hdus: (FitsHdu | undefined)[], test: (s: string) => boolean | undefined) {
  for (const h of hdus) {
    if (!h) continue
    for (const line of h.commentary) {
      if (!/wavelength/i.test(line)) continue
      const v = test(line)
      if (v !== undefined) return { vacuum: v, source: `header text "${line}"` }
    }
  }
  return undefined
}
