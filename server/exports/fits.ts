import { cellOf, checkColumns, toAscii, type ExportColumn, type ExportTable } from './table'

/** FITS logical record length, bytes (FITS Standard 4.0 §3.1). */
export const FITS_BLOCK = 2880
const CARD = 80

/** A header value: strings are quoted, booleans T/F, numbers integers unless `{ real }` says otherwise. */
export type CardValue = string | number | boolean | { real: number }

function pad(text: string, width: number): string {
  return text.length >= width ? text.slice(0, width) : text + ' '.repeat(width - text.length)
}

/** Fixed-format text of a number (FITS 4.0 §4.2.3–4.2.4), at most 20 characters. */
function numberText(value: number, real: boolean): string {
  if (!Number.isFinite(value)) throw new RangeError(`FITS header values must be finite, got ${value}`)
  if (!real) {
    if (!Number.isInteger(value)) throw new RangeError(`${value} is not an integer; pass { real } for a real value`)
    return String(value)
  }
  let s = String(value)
  if (s.length > 20) s = value.toExponential(12)
  s = s.replace('e', 'E')
  return /[.E]/.test(s) ? s : `${s}.0`
}

/** Splits the text of a string value into pieces of at most `room` characters once quotes are doubled, never inside a pair. */
function stringPieces(text: string, room: number): string[] {
  const pieces: string[] = []
  let current = ''
  for (const ch of text) {
    const esc = ch === "'" ? "''" : ch
    if (current.length + esc.length > room) {
      pieces.push(current)
      current = ''
    }
    current += esc
  }
  pieces.push(current)
  return pieces
}

/**
 * Header cards for one keyword, each exactly 80 ASCII characters, in the fixed format of FITS
 * Standard 4.0 §4.1–4.2: keyword in columns 1–8, "= " in 9–10, a string starting with its quote in
 * column 11 and padded to at least 8 characters, numbers and logicals right-justified to column 30,
 * then " / comment". A string too long for one card is continued with the long-string convention of
 * §4.2.1.2 ('&' before the closing quote, then CONTINUE cards).
 */
export function headerCards(key: string, value: CardValue, comment = ''): string[] {
  if (!/^[A-Z0-9_-]{1,8}$/.test(key)) throw new RangeError(`"${key}" is not a FITS keyword (1–8 of A–Z, 0–9, -, _)`)
  const note = toAscii(comment)
  const withComment = (body: string) => {
    if (!note) return pad(body, CARD)
    const room = CARD - body.length - 3
    return room > 0 ? pad(`${body} / ${note.slice(0, room)}`, CARD) : pad(body, CARD)
  }
  const name = pad(key, 8)
  if (typeof value === 'string') {
    const text = toAscii(value).replace(/\s+$/, '')
    const escaped = text.replace(/'/g, "''")
    if (10 + escaped.length + 2 <= CARD) {
      return [withComment(`${name}= '${pad(escaped, Math.max(8, escaped.length))}'`)]
    }
    const pieces = stringPieces(text, 67)
    return pieces.map((piece, i) => {
      const last = i === pieces.length - 1
      const head = i === 0 ? `${name}= ` : 'CONTINUE  '
      const body = `${head}'${piece}${last ? '' : '&'}'`
      return last ? withComment(body) : pad(body, CARD)
    })
  }
  let text: string
  if (typeof value === 'boolean') text = value ? 'T' : 'F'
  else if (typeof value === 'number') text = numberText(value, false)
  else text = numberText(value.real, true)
  return [withComment(`${name}= ${text.padStart(20)}`)]
}

/** COMMENT cards holding `text`, wrapped at word breaks into columns 9–80. */
export function commentCards(text: string, key: 'COMMENT' | 'HISTORY' = 'COMMENT'): string[] {
  const words = toAscii(text).split(/\s+/).filter(Boolean)
  const lines: string[] = []
  let line = ''
  for (const w of words) {
    for (let word = w; word.length > 0;) {
      const room = 72 - (line ? line.length + 1 : 0)
      if (word.length <= room) {
        line = line ? `${line} ${word}` : word
        word = ''
      } else if (line) {
        lines.push(line)
        line = ''
      } else {
        lines.push(word.slice(0, 72))
        word = word.slice(72)
      }
    }
  }
  if (line) lines.push(line)
  return lines.map((l) => pad(`${pad(key, 8)}${l}`, CARD))
}

/** Joins cards, adds END and pads with spaces to a whole number of 2880-byte blocks. */
function headerBytes(cards: string[]): Buffer {
  const all = [...cards, pad('END', CARD)]
  const text = all.join('')
  const size = Math.ceil(text.length / FITS_BLOCK) * FITS_BLOCK
  return Buffer.from(pad(text, size), 'ascii')
}

/** The TNULLn value of int columns. */
export const FITS_INT_NULL = -2147483648

interface BinaryColumn {
  column: ExportColumn
  tform: string
  tdisp: string
  bytes: number
  write(view: DataView, offset: number, value: number | string | boolean | null): void
}

function binaryColumn(column: ExportColumn, table: ExportTable): BinaryColumn {
  switch (column.type) {
    case 'int':
      return {
        column,
        tform: 'J',
        tdisp: `I${column.width ?? 6}`,
        bytes: 4,
        write(view, offset, v) {
          if (v === null) return view.setInt32(offset, FITS_INT_NULL, false)
          const n = v as number
          if (n <= FITS_INT_NULL || n > 2147483647) throw new RangeError(`column ${column.name}: ${n} does not fit a 32-bit integer`)
          view.setInt32(offset, n, false)
        },
      }
    case 'double': {
      const f = column.format!
      return {
        column,
        tform: 'D',
        tdisp: `${f.notation}${f.width}.${f.decimals}`,
        bytes: 8,
        write: (view, offset, v) => view.setFloat64(offset, v === null ? Number.NaN : (v as number), false),
      }
    }
    case 'boolean':
      return {
        column,
        tform: 'L',
        tdisp: 'L1',
        bytes: 1,
        write: (view, offset, v) => view.setUint8(offset, v === null ? 0 : v ? 0x54 : 0x46),
      }
    case 'string':
    case 'datetime': {
      let width = column.type === 'datetime' ? 23 : Math.max(1, column.width ?? 1)
      for (const row of table.rows) {
        const v = row[column.name]
        if (typeof v === 'string') width = Math.max(width, toAscii(v).length)
      }
      return {
        column,
        tform: `${width}A`,
        tdisp: `A${width}`,
        bytes: width,
        write(view, offset, v) {
          const text = v === null ? '' : toAscii(String(v))
          // NUL after the text ends it (FITS 4.0 §7.3.3.1); readers then drop no meaningful trailing blanks.
          for (let i = 0; i < width; i++) view.setUint8(offset + i, i < text.length ? text.charCodeAt(i) : 0)
        },
      }
    }
  }
}

/**
 * Writes the table as a FITS file (FITS Standard 4.0, 2018): an empty primary HDU (BITPIX 8,
 * NAXIS 0, EXTEND T) and one BINTABLE extension (§7.3) with TTYPEn, TFORMn (J 32-bit int, D
 * 64-bit float, L logical, nA characters), TUNITn (VOUnits, which FITS 4.0 §4.3 units include),
 * TDISPn, TNULLn for ints, and TUCDn / TCOMMn for the UCD and description (the keywords that
 * VO tools write for these). Data are big-endian; missing doubles are NaN, missing ints TNULLn,
 * missing logicals 0x00, missing strings empty (text is NUL-terminated). Release keywords appear in both headers.
 * Header and data are padded to 2880-byte blocks (spaces in the header, zeros in the data).
 * Text is reduced to ASCII, as FITS requires.
 */
export function writeFits(table: ExportTable): Buffer {
  checkColumns(table.columns)
  const columns = table.columns.map((c) => binaryColumn(c, table))
  const rowBytes = columns.reduce((s, c) => s + c.bytes, 0)

  const release: string[] = []
  release.push(...headerCards('DATE', table.date, 'when the release was frozen (UTC)'))
  release.push(...headerCards('TITLE', table.title, 'release title'))
  for (const p of table.params) {
    release.push(...headerCards(p.key, typeof p.value === 'number' && !Number.isInteger(p.value) ? { real: p.value } : p.value, p.description))
  }

  const primary = [
    ...headerCards('SIMPLE', true, 'conforms to the FITS Standard 4.0'),
    ...headerCards('BITPIX', 8, 'no primary data'),
    ...headerCards('NAXIS', 0),
    ...headerCards('EXTEND', true, 'the catalogue is in extension 1'),
    ...headerCards('ORIGIN', 'Lineweight', 'software that wrote the file'),
    ...release,
    ...commentCards(table.description),
  ]

  const ext: string[] = [
    ...headerCards('XTENSION', 'BINTABLE', 'binary table extension'),
    ...headerCards('BITPIX', 8, '8-bit bytes'),
    ...headerCards('NAXIS', 2, '2-dimensional table'),
    ...headerCards('NAXIS1', rowBytes, 'bytes per row'),
    ...headerCards('NAXIS2', table.rows.length, 'rows'),
    ...headerCards('PCOUNT', 0, 'no heap'),
    ...headerCards('GCOUNT', 1),
    ...headerCards('TFIELDS', columns.length, 'columns per row'),
  ]
  columns.forEach((c, i) => {
    const n = i + 1
    ext.push(...headerCards(`TTYPE${n}`, c.column.name, c.column.description))
    ext.push(...headerCards(`TFORM${n}`, c.tform))
    if (c.column.unit) ext.push(...headerCards(`TUNIT${n}`, c.column.unit))
    if (c.column.type === 'int') ext.push(...headerCards(`TNULL${n}`, FITS_INT_NULL, 'missing value'))
    ext.push(...headerCards(`TDISP${n}`, c.tdisp))
    ext.push(...headerCards(`TUCD${n}`, c.column.ucd))
    ext.push(...headerCards(`TCOMM${n}`, c.column.description))
  })
  ext.push(...headerCards('EXTNAME', table.name.toUpperCase().slice(0, 68), 'table name'))
  ext.push(...release)
  for (const note of table.notes) ext.push(...commentCards(note))

  const dataSize = Math.ceil((rowBytes * table.rows.length) / FITS_BLOCK) * FITS_BLOCK
  const data = Buffer.alloc(dataSize, 0)
  const view = new DataView(data.buffer, data.byteOffset, data.byteLength)
  table.rows.forEach((row, r) => {
    let offset = r * rowBytes
    for (const c of columns) {
      c.write(view, offset, cellOf(c.column, row))
      offset += c.bytes
    }
  })
  return Buffer.concat([headerBytes(primary), headerBytes(ext), data])
}
