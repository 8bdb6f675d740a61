/**
 * FITS container: header cards, HDU boundaries and bounded data access.
 * Parsed here rather than through a general FITS library so that every size a header
 * claims is checked against the bytes the file holds before anything is allocated.
 * Layout and keyword rules: FITS Standard 4.0 (IAU FITS Working Group, 2018).
 */
import { SpectrumReadError, type HeaderValue, type MediumEvidence } from './types'
import { vacuumFromText } from './units'

export const BLOCK = 2880
const CARD = 80

export interface FitsHdu {
  index: number
  /** 'image' includes tile-compressed images (ZIMAGE = T tables); 'ascii' is XTENSION = 'TABLE'. */
  kind: 'image' | 'bintable' | 'ascii' | 'other'
  /** True for a tile-compressed image: naxis and bitpix are then ZNAXISn and ZBITPIX. */
  compressed: boolean
  /** The header blocks as text, for the fitsjs-ng decoders. */
  headerText: string
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
  /** Row width and row count of a table (NAXIS1, NAXIS2 as written, also for compressed images). */
  table: { rowBytes: number; rows: number }
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
        if (s[i + 1] === "'") {
          out += "'"
          i++
          continue
        }
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
      if (key === 'END') return { cards, comments, commentary, first, dataOffset: pos, headerText: TEXT.decode(bytes.subarray(offset, pos)) }
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
    const xtension =
      index === 0
        ? 'PRIMARY'
        : String(h.cards.get('XTENSION') ?? '')
            .trim()
            .toUpperCase()
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
      throw new SpectrumReadError('FITS_TRUNCATED', `${fileName}: HDU ${index} claims more data than the file holds (${available} bytes left after its header)`)
    }
    const compressed = xtension === 'BINTABLE' && h.cards.get('ZIMAGE') === true
    const kind: FitsHdu['kind'] = xtension === 'PRIMARY' || xtension === 'IMAGE' || compressed ? 'image' : xtension === 'BINTABLE' ? 'bintable' : xtension === 'TABLE' ? 'ascii' : 'other'
    const hdu: FitsHdu = {
      index,
      kind,
      compressed,
      headerText: h.headerText,
      xtension,
      cards: h.cards,
      comments: h.comments,
      commentary: h.commentary,
      bitpix,
      naxis,
      table: { rowBytes: naxis[0] ?? 0, rows: naxis[1] ?? 0 },
      dataOffset: h.dataOffset,
      dataBytes,
    }
    if (compressed) {
      // The image a compressed table stands for: its size is checked before any tile is decoded.
      const zbitpix = h.cards.get('ZBITPIX')
      const zn = h.cards.get('ZNAXIS')
      if (typeof zbitpix !== 'number' || ![8, 16, 32, 64, -32, -64].includes(zbitpix) || typeof zn !== 'number' || !Number.isInteger(zn) || zn < 0 || zn > 999) {
        throw new SpectrumReadError('FITS_MALFORMED', `${fileName}: HDU ${index} is a compressed image without a valid ZBITPIX and ZNAXIS`)
      }
      hdu.bitpix = zbitpix
      hdu.naxis = []
      for (let k = 1; k <= zn; k++) hdu.naxis.push(intCard(h.cards, `ZNAXIS${k}`, index, fileName))
    }
    hdus.push(hdu)
    offset = h.dataOffset + Math.ceil(dataBytes / BLOCK) * BLOCK
  }
  return hdus
}

/**
 * Whether an extension takes the primary header's keywords it lacks. FITS INHERIT convention:
 * INHERIT = T says so; INHERIT = F forbids it. Many writers omit the card, so without it the
 * primary is used for what the extension lacks and the reader says so.
 */
export function inheritance(hdu: FitsHdu, primary: FitsHdu | undefined): 'yes' | 'no' | 'unstated' | 'primary' {
  if (!primary || hdu === primary) return 'primary'
  const v = hdu.cards.get('INHERIT')
  return v === true ? 'yes' : v === false ? 'no' : 'unstated'
}

/** A keyword of the HDU, or of the primary header when the HDU may inherit it. */
export function inheritedCard(hdu: FitsHdu, primary: FitsHdu | undefined, key: string): HeaderValue | undefined {
  const own = hdu.cards.get(key)
  if (own !== undefined) return own
  const inherit = inheritance(hdu, primary)
  return inherit === 'yes' || inherit === 'unstated' ? primary?.cards.get(key) : undefined
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
      case 8:
        raw = view.getUint8(i)
        break
      case 16:
        raw = view.getInt16(i * 2)
        break
      case 32:
        raw = view.getInt32(i * 4)
        break
      case 64:
        raw = Number(view.getBigInt64(i * 8))
        break
      case -32:
        raw = view.getFloat32(i * 4)
        break
      default:
        raw = view.getFloat64(i * 8)
    }
    out[i] = raw === blank ? NaN : zero + scale * raw
  }
  return out
}

/** Observation and resolution keywords passed on to the caller, as the file writes them. */
// prettier-ignore
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
 * What the keywords of the HDU and then the primary header say about air or vacuum: VACUUM
 * (logical, survey convention), AIRORVAC ('air'/'vac'), and COMMENT/HISTORY lines about the
 * wavelengths ("All wavelengths are in vacuum.").
 */
export function mediumFromHeaders(hdus: (FitsHdu | undefined)[]): MediumEvidence[] {
  const out: MediumEvidence[] = []
  const seen = new Set<FitsHdu>()
  for (const h of hdus) {
    if (!h || seen.has(h)) continue
    seen.add(h)
    const vac = h.cards.get('VACUUM')
    if (typeof vac === 'boolean') out.push({ vacuum: vac, source: `VACUUM = ${vac ? 'T' : 'F'}`, strength: 3 })
    const aov = h.cards.get('AIRORVAC')
    if (typeof aov === 'string') {
      const t = aov.trim().toLowerCase()
      if (t.startsWith('vac')) out.push({ vacuum: true, source: `AIRORVAC = '${aov}'`, strength: 3 })
      else if (t === 'air') out.push({ vacuum: false, source: `AIRORVAC = '${aov}'`, strength: 3 })
    }
  }
  for (const h of seen) {
    for (const line of h.commentary) {
      if (!/wavelength/i.test(line)) continue
      const v = vacuumFromText(line)
      if (v !== undefined) out.push({ vacuum: v, source: `header text "${line}"`, strength: 2 })
    }
  }
  return out
}
