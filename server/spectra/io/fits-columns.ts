/**
 * Table and compressed-image data of a FITS HDU, decoded behind the byte-budget checks of fits.ts:
 * every size and heap descriptor is checked against the bytes the file holds before anything is
 * allocated. Fixed-width binary-table columns and tile-compressed images are decoded by fitsjs-ng;
 * variable-length arrays and ASCII tables by the small decoders here, because fitsjs-ng 1.0.2
 * reads floating-point heap arrays without byte-swapping them and stops ASCII D-exponent fields
 * (1.0D+03, what astropy writes) at the 'D' (see DEVELOPERS.md).
 */
import { BinaryTable, CompressedImage, Header, type CompressedImageDecoderProvider } from 'fitsjs-ng'
import { cardNumber, cardString, type FitsHdu } from './fits'
import { SpectrumReadError } from './types'
import { gunzipBounded } from './zip'

export interface TableColumn {
  /** 1-based column number. */
  number: number
  name: string
  /** TFORM type letter; for variable-length arrays the element type (heap is then set). */
  type: string
  /** Elements per row (fixed columns); 1 for variable-length arrays. */
  repeat: number
  /** Byte offset within a row. */
  offset: number
  /** 'P' or 'Q' for variable-length array columns. */
  heap?: 'P' | 'Q'
  unit?: string
  comment?: string
  /** ASCII tables: 0-based start and width of the field in a row. */
  ascii?: { start: number; width: number }
}

const TYPE_BYTES: Record<string, number> = { L: 1, B: 1, I: 2, J: 4, K: 8, A: 1, E: 4, D: 8, C: 8, M: 16 }

/** Column layout of a BINTABLE or ASCII TABLE HDU from its TFORMn/TTYPEn/TUNITn cards; checks the row width. */
export function tableColumns(hdu: FitsHdu, fileName: string): TableColumn[] {
  const nFields = cardNumber(hdu, 'TFIELDS') ?? 0
  if (!Number.isInteger(nFields) || nFields < 0 || nFields > 999) {
    throw new SpectrumReadError('FITS_MALFORMED', `${fileName}: HDU ${hdu.index} has an invalid TFIELDS`)
  }
  const rowBytes = hdu.table.rowBytes
  const cols: TableColumn[] = []
  let offset = 0
  for (let n = 1; n <= nFields; n++) {
    const form = (cardString(hdu, `TFORM${n}`) ?? '').toUpperCase()
    const col: TableColumn = { number: n, name: cardString(hdu, `TTYPE${n}`) ?? `COL${n}`, type: '', repeat: 1, offset }
    if (hdu.kind === 'ascii') {
      // FITS Standard §7.2.1: Aw, Iw, Fw.d, Ew.d, Dw.d at byte TBCOLn (1-based).
      const m = /^([AIFED])(\d+)(?:\.\d+)?$/.exec(form)
      const start = (cardNumber(hdu, `TBCOL${n}`) ?? 0) - 1
      if (!m || start < 0 || start + Number(m[2]) > rowBytes) {
        throw new SpectrumReadError('FITS_MALFORMED', `${fileName}: HDU ${hdu.index} column ${n} has an invalid TFORM '${form}' or TBCOL`)
      }
      col.type = m[1]!
      col.ascii = { start, width: Number(m[2]) }
    } else {
      const m = /^(\d*)([LXBIJKAEDCMPQ])([LXBIJKAEDCM])?(?:\(\d*\))?$/.exec(form.trim())
      if (!m) throw new SpectrumReadError('FITS_MALFORMED', `${fileName}: HDU ${hdu.index} column ${n} has an invalid TFORM '${form}'`)
      const repeat = m[1] ? Number(m[1]) : 1
      let width: number
      if (m[2] === 'P' || m[2] === 'Q') {
        if (!m[3] || m[3] === 'X') throw new SpectrumReadError('FITS_MALFORMED', `${fileName}: HDU ${hdu.index} column ${n} has an invalid TFORM '${form}'`)
        col.heap = m[2]
        col.type = m[3]
        width = repeat === 0 ? 0 : m[2] === 'P' ? 8 : 16
      } else {
        col.type = m[2]!
        col.repeat = repeat
        width = col.type === 'X' ? Math.ceil(repeat / 8) : repeat * TYPE_BYTES[col.type]!
      }
      offset += width
    }
    const unit = cardString(hdu, `TUNIT${n}`)
    if (unit) col.unit = unit
    const comment = hdu.comments.get(`TTYPE${n}`)
    if (comment) col.comment = comment
    cols.push(col)
  }
  if (hdu.kind !== 'ascii' && offset !== rowBytes) {
    throw new SpectrumReadError('FITS_MALFORMED', `${fileName}: HDU ${hdu.index} columns add up to ${offset} bytes a row but NAXIS1 = ${rowBytes}`)
  }
  return cols
}

/** True for the numeric column types a spectrum can be stored in. */
export function isNumericColumn(col: TableColumn): boolean {
  return 'BIJKEDFL'.includes(col.type) && (col.repeat > 0 || col.heap !== undefined)
}

/** Values a column holds in one row: 1 for scalars, the repeat for arrays, the descriptor count for heap arrays. */
export function rowCount(hdu: FitsHdu): number {
  return hdu.table.rows
}

function heapStart(hdu: FitsHdu): number {
  const rowBytes = hdu.table.rowBytes
  return cardNumber(hdu, 'THEAP') ?? rowBytes * rowCount(hdu)
}

/**
 * Reads and checks the heap descriptors of a variable-length column: every array must lie inside
 * the heap and hold at most `maxElements` values. Returns [count, byte offset in the data unit] per row.
 */
export function heapDescriptors(bytes: Uint8Array, hdu: FitsHdu, col: TableColumn, maxElements: number, fileName: string): [number, number][] {
  const rows = rowCount(hdu)
  const rowBytes = hdu.table.rowBytes
  const start = heapStart(hdu)
  const heapBytes = hdu.dataBytes - start
  if (start < rowBytes * rows || heapBytes < 0) {
    throw new SpectrumReadError('FITS_MALFORMED', `${fileName}: HDU ${hdu.index} has a heap outside its data (THEAP/PCOUNT)`)
  }
  const size = TYPE_BYTES[col.type]!
  const view = new DataView(bytes.buffer, bytes.byteOffset + hdu.dataOffset, hdu.dataBytes)
  const out: [number, number][] = []
  for (let r = 0; r < rows; r++) {
    const at = r * rowBytes + col.offset
    const count = col.heap === 'P' ? view.getInt32(at) : Number(view.getBigInt64(at))
    const offset = col.heap === 'P' ? view.getInt32(at + 4) : Number(view.getBigInt64(at + 8))
    if (count < 0 || offset < 0 || count > maxElements || offset + count * size > heapBytes) {
      throw new SpectrumReadError('FITS_MALFORMED', `${fileName}: HDU ${hdu.index} column ${col.name} row ${r + 1} points outside the heap or holds more than ${maxElements} values`)
    }
    out.push([count, start + offset])
  }
  return out
}

function readBigEndian(view: DataView, type: string, at: number): number {
  switch (type) {
    case 'B':
      return view.getUint8(at)
    case 'L':
      return view.getUint8(at) === 84 ? 1 : 0
    case 'I':
      return view.getInt16(at)
    case 'J':
      return view.getInt32(at)
    case 'K':
      return Number(view.getBigInt64(at))
    case 'E':
      return view.getFloat32(at)
    default:
      return view.getFloat64(at)
  }
}

/** TSCALn/TZEROn applied, TNULLn integers turned into NaN (FITS Standard §7.3.2). */
function scaler(hdu: FitsHdu, col: TableColumn): (raw: number) => number {
  const scale = cardNumber(hdu, `TSCAL${col.number}`) ?? 1
  const zero = cardNumber(hdu, `TZERO${col.number}`) ?? 0
  const nul = 'BIJK'.includes(col.type) ? cardNumber(hdu, `TNULL${col.number}`) : undefined
  return (raw) => (raw === nul ? NaN : zero + scale * raw)
}

/** One heap array of a variable-length column (descriptor already checked). */
export function readHeapArray(bytes: Uint8Array, hdu: FitsHdu, col: TableColumn, descriptor: [number, number]): Float64Array {
  const [count, offset] = descriptor
  const size = TYPE_BYTES[col.type]!
  const view = new DataView(bytes.buffer, bytes.byteOffset + hdu.dataOffset + offset, count * size)
  const scale = scaler(hdu, col)
  const out = new Float64Array(count)
  for (let i = 0; i < count; i++) out[i] = scale(readBigEndian(view, col.type, i * size))
  return out
}

function toNumber(v: unknown): number {
  if (typeof v === 'number') return v
  if (typeof v === 'bigint') return Number(v)
  if (typeof v === 'boolean') return v ? 1 : 0
  return NaN
}

/**
 * The parts of fitsjs-ng's table decoders used here: they are synchronous (its public getRows and
 * getColumn are async), so readSpectrum stays synchronous. Pinned version: 1.0.2.
 */
interface ColumnDecoder {
  rowByteSize: number
  accessors: ((view: DataView, offset: number) => [unknown, number])[]
  elementByteLengths: number[]
}
interface RowDecoder {
  rowByteSize: number
  rows: number
  heap?: ArrayBuffer
  _getRows(buffer: ArrayBuffer, rows: number): Float32Array
}

/** A fitsjs-ng header; its warnings about odd cards would go to the console, and the readers report their own. */
function newHeader(text: string): Header {
  return new Header(text, undefined, () => undefined)
}

function dataBuffer(bytes: Uint8Array, hdu: FitsHdu): ArrayBuffer {
  const start = bytes.byteOffset + hdu.dataOffset
  return bytes.buffer.slice(start, start + hdu.dataBytes) as ArrayBuffer
}

/**
 * Decodes fixed-width columns of a binary table through fitsjs-ng's column decoders into
 * one Float64Array per wanted column: scalar columns give one value per row, array columns
 * `repeat` values per row (row-major). Scaling and nulls are applied here.
 */
export function decodeFixedColumns(bytes: Uint8Array, hdu: FitsHdu, cols: TableColumn[], heapCols: TableColumn[], fileName: string): Float64Array[] {
  try {
    return decodeWithFitsjs(bytes, hdu, cols, heapCols)
  } catch (err) {
    throw new SpectrumReadError('FITS_MALFORMED', `${fileName}: the table of HDU ${hdu.index} could not be decoded (${(err as Error).message})`)
  }
}

function decodeWithFitsjs(bytes: Uint8Array, hdu: FitsHdu, cols: TableColumn[], heapCols: TableColumn[]): Float64Array[] {
  const rows = rowCount(hdu)
  const header = newHeader(hideColumns(hdu.headerText, heapCols))
  const table = new BinaryTable(header, dataBuffer(bytes, hdu)) as unknown as ColumnDecoder
  const view = new DataView(bytes.buffer, bytes.byteOffset + hdu.dataOffset, hdu.dataBytes)
  return cols.map((c) => {
    // Its per-column decoder, stepped row by row as its own getColumn does for files read in pieces.
    const index = c.number - 1
    const accessor = table.accessors[index]!
    const start = table.elementByteLengths.slice(0, index).reduce((a, b) => a + b, 0)
    const scale = scaler(hdu, c)
    const out = new Float64Array(rows * c.repeat)
    for (let r = 0; r < rows; r++) {
      const [v] = accessor(view, r * table.rowByteSize + start)
      if (c.repeat === 1) out[r] = scale(toNumber(Array.isArray(v) ? v[0] : v))
      else {
        const arr = v as ArrayLike<unknown>
        const base = r * c.repeat
        for (let i = 0; i < c.repeat; i++) out[base + i] = scale(toNumber(arr[i]))
      }
    }
    return out
  })
}

/**
 * fitsjs-ng decodes every column of a row, heap columns included, and 1.0.2 mis-reads floating
 * heap arrays: the header it gets turns those columns into plain bytes of the same width (8 or 16
 * per row) that it can step over. Column names and the row layout are unchanged.
 */
function hideColumns(headerText: string, heapCols: TableColumn[]): string {
  let text = headerText
  for (const col of heapCols) {
    const key = `TFORM${col.number}`.padEnd(8, ' ')
    const at = findCard(text, key)
    if (at < 0) continue
    const card = `${key}= '${col.heap === 'P' ? '8B' : '16B'}'`.padEnd(80, ' ')
    text = text.slice(0, at) + card + text.slice(at + 80)
  }
  return text
}

function findCard(text: string, key: string): number {
  for (let at = 0; at + 80 <= text.length; at += 80) if (text.startsWith(key, at)) return at
  return -1
}

/** ASCII table columns (FITS Standard §7.2): fixed fields, Fortran D exponents read as E. */
export function decodeAsciiColumns(bytes: Uint8Array, hdu: FitsHdu, cols: TableColumn[]): Float64Array[] {
  const rows = rowCount(hdu)
  const rowBytes = hdu.table.rowBytes
  const text = new TextDecoder('latin1')
  return cols.map((c) => {
    const out = new Float64Array(rows)
    const scale = scaler(hdu, c)
    const nul = cardString(hdu, `TNULL${c.number}`)
    for (let r = 0; r < rows; r++) {
      const at = hdu.dataOffset + r * rowBytes + c.ascii!.start
      const field = text.decode(bytes.subarray(at, at + c.ascii!.width)).trim()
      if (field === '' || field === nul) {
        out[r] = NaN
        continue
      }
      const v = Number(field.replace(/[Dd]/, 'E'))
      out[r] = Number.isFinite(v) ? scale(v) : NaN
    }
    return out
  })
}

const COMPRESSED_COLUMNS = ['COMPRESSED_DATA', 'GZIP_COMPRESSED_DATA', 'UNCOMPRESSED_DATA']

/**
 * Decodes a tile-compressed image (FITS Standard 4.0 §10, RICE_1, GZIP_1, PLIO_1, HCOMPRESS_1)
 * through fitsjs-ng. Before it runs: the image size is bounded by `maxPixels`, every tile
 * descriptor is checked against the heap, and every gzip tile is inflated once with a bound of
 * the tile's own size, so a small file cannot expand without limit.
 */
export function decodeCompressedImage(bytes: Uint8Array, hdu: FitsHdu, maxPixels: number, fileName: string): Float64Array {
  const pixels = hdu.naxis.reduce((a, b) => a * b, 1)
  if (pixels > maxPixels) throw new SpectrumReadError('TOO_MANY_PIXELS', `${fileName}: ${pixels} pixels is more than the limit of ${maxPixels}`)
  const algorithm = (cardString(hdu, 'ZCMPTYPE') ?? '').toUpperCase()
  if (!['RICE_1', 'GZIP_1', 'PLIO_1', 'HCOMPRESS_1'].includes(algorithm)) {
    throw new SpectrumReadError(
      'FITS_UNSUPPORTED',
      `${fileName}: HDU ${hdu.index} is compressed with ${algorithm || 'an unnamed method'}, which is not read; uncompress it first (funpack, or astropy's CompImageHDU)`,
    )
  }
  const cols = tableColumns(hdu, fileName)
  const tileBytes = (cardNumber(hdu, 'ZTILE1') ?? hdu.naxis[0] ?? 0) * (cardNumber(hdu, 'ZTILE2') ?? 1) * (Math.abs(hdu.bitpix) / 8)
  let headerText = hdu.headerText
  for (const col of cols.filter((c) => COMPRESSED_COLUMNS.includes(c.name.trim().toUpperCase()))) {
    if (!col.heap) throw new SpectrumReadError('FITS_MALFORMED', `${fileName}: HDU ${hdu.index} column ${col.name} is not a heap array`)
    const descriptors = heapDescriptors(bytes, hdu, col, Math.max(tileBytes * 2, 1024), fileName)
    const name = col.name.trim().toUpperCase()
    if (name === 'GZIP_COMPRESSED_DATA' || name === 'UNCOMPRESSED_DATA') {
      if (descriptors.some(([count]) => count > 0)) {
        throw new SpectrumReadError('FITS_UNSUPPORTED', `${fileName}: HDU ${hdu.index} stores some tiles uncompressible (${name}), which is not read; uncompress the file first (funpack)`)
      }
      // astropy writes this column empty for every tile; fitsjs-ng 1.0.2 would gunzip the empty arrays.
      const at = findCard(headerText, `TTYPE${col.number}`.padEnd(8, ' '))
      if (at >= 0) headerText = headerText.slice(0, at) + `${`TTYPE${col.number}`.padEnd(8, ' ')}= 'EMPTY_TILE_DATA'`.padEnd(80, ' ') + headerText.slice(at + 80)
    } else if (algorithm === 'GZIP_1') {
      for (const d of descriptors) {
        const tile = bytes.subarray(hdu.dataOffset + d[1], hdu.dataOffset + d[1] + d[0])
        let inflated: Uint8Array | undefined
        try {
          inflated = gunzipBounded(tile, Math.max(tileBytes, (tileBytes / (Math.abs(hdu.bitpix) / 8)) * 4))
        } catch {
          inflated = undefined
        }
        if (!inflated) throw new SpectrumReadError('FITS_MALFORMED', `${fileName}: HDU ${hdu.index} has a gzip tile that is broken or larger than its tile`)
      }
    }
  }
  // Quantised floating-point tiles hold 32-bit integers; fitsjs-ng 1.0.2 would read GZIP_1 tiles of a
  // ZBITPIX −32 image as floats, so those tiles go through its decoder hook instead.
  const quantized = hdu.bitpix < 0 && cols.some((c) => c.name.trim().toUpperCase() === 'ZSCALE')
  let decoderProvider: CompressedImageDecoderProvider | undefined
  if (algorithm === 'GZIP_1' && quantized) {
    decoderProvider = {
      decodeTile: ({ compressedBytes, tileSize }) => {
        const raw = gunzipBounded(compressedBytes, tileSize * 4)
        if (!raw || raw.length < tileSize * 4) throw new Error('a gzip tile is shorter or longer than its tile')
        const view = new DataView(raw.buffer, raw.byteOffset, raw.byteLength)
        const out = new Int32Array(tileSize)
        for (let i = 0; i < tileSize; i++) out[i] = view.getInt32(i * 4)
        return out
      },
    }
  }
  const data = dataBuffer(bytes, hdu)
  let image: RowDecoder
  try {
    const compressed = new CompressedImage(newHeader(headerText), data, decoderProvider ? { decoderProvider } : {})
    // Its header check only admits the four standard names, and it asks the hook only for others.
    if (decoderProvider) (compressed as unknown as { zcmptype: string }).zcmptype = 'GZIP_1 (quantised)'
    image = compressed as unknown as RowDecoder
    const theap = cardNumber(hdu, 'THEAP')
    if (theap !== undefined) image.heap = data.slice(theap)
    const rows = rowCount(hdu)
    const out = image._getRows(data.slice(0, image.rowByteSize * rows), rows)
    if (out.length !== pixels) throw new Error(`decoded ${out.length} pixels, expected ${pixels}`)
    return Float64Array.from(out)
  } catch (err) {
    if (err instanceof SpectrumReadError) throw err
    throw new SpectrumReadError('FITS_MALFORMED', `${fileName}: HDU ${hdu.index}'s compressed tiles could not be decoded (${(err as Error).message})`)
  }
}
