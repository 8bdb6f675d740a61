/**
 * Zip archives of spectra (batch uploads) and gzip-compressed single files, unpacked with
 * bounds: entry count, per-entry and total uncompressed size. Declared sizes are checked first,
 * and inflation stops as soon as the output passes a limit, whatever the headers claimed.
 * Zip layout: PKWARE APPNOTE.TXT 6.3 (central directory, local headers). Gzip: RFC 1952.
 */
import { Inflate } from 'fflate'

export interface ZipLimits {
  /** Most files the archive may hold (directories and skipped names excluded). @default 500 */
  maxEntries?: number
  /** Largest uncompressed size of one file, bytes. @default 50_000_000 */
  maxEntryBytes?: number
  /** Largest uncompressed size of all files together, bytes. @default 200_000_000 */
  maxTotalBytes?: number
}

export interface ZipEntry {
  name: string
  bytes: Uint8Array
}

export type ZipRefusalCode = 'ZIP_MALFORMED' | 'ZIP_UNSUPPORTED' | 'ZIP_TOO_MANY_ENTRIES' | 'ZIP_TOO_LARGE'
export type UnzipResult = { ok: true; entries: ZipEntry[]; skipped: string[] } | { ok: false; code: ZipRefusalCode; message: string }

class ZipError extends Error {
  constructor(
    readonly code: ZipRefusalCode,
    message: string,
  ) {
    super(message)
  }
}

/** Slice of compressed input handed to the inflater at a time: bounds how far one push can overshoot (deflate expands at most ~1032×). */
const INFLATE_SLICE = 1024

/**
 * Inflates raw deflate data, refusing once the output passes `limit` bytes.
 * Returns the output, or undefined when the limit was passed.
 */
export function inflateBounded(data: Uint8Array, limit: number): Uint8Array | undefined {
  const chunks: Uint8Array[] = []
  let total = 0
  let over = false
  let done = false
  const inflater = new Inflate((chunk, final) => {
    total += chunk.length
    if (total > limit) over = true
    else chunks.push(chunk)
    if (final) done = true
  })
  for (let at = 0; at < data.length && !over && !done; at += INFLATE_SLICE) {
    const end = Math.min(at + INFLATE_SLICE, data.length)
    inflater.push(data.subarray(at, end), end === data.length)
  }
  if (over) return undefined
  if (!done) throw new ZipError('ZIP_MALFORMED', 'compressed data end early')
  const out = new Uint8Array(total)
  let pos = 0
  for (const c of chunks) {
    out.set(c, pos)
    pos += c.length
  }
  return out
}

function u16(b: Uint8Array, at: number): number {
  return b[at]! | (b[at + 1]! << 8)
}
function u32(b: Uint8Array, at: number): number {
  return (b[at]! | (b[at + 1]! << 8) | (b[at + 2]! << 16) | (b[at + 3]! << 24)) >>> 0
}

/** Names a batch should not treat as spectra: directories, macOS resource forks, dotfiles. */
export function isSkippedName(name: string): boolean {
  if (name.endsWith('/') || name.endsWith('\\')) return true
  const parts = name.split(/[/\\]/)
  return parts.some((p) => p === '__MACOSX' || p.startsWith('.'))
}

/**
 * Unpacks a zip archive held in memory. Reads the central directory (stored and deflated
 * entries; no encryption, no ZIP64), checks the entry count and declared sizes against the
 * limits, then inflates each entry with a hard stop at the limits.
 * Skips directories, `__MACOSX/` and dotfiles (listed in `skipped`).
 */
export function unpackZip(bytes: Uint8Array, limits: ZipLimits = {}): UnzipResult {
  const maxEntries = limits.maxEntries ?? 500
  const maxEntryBytes = limits.maxEntryBytes ?? 50_000_000
  const maxTotalBytes = limits.maxTotalBytes ?? 200_000_000
  try {
    // End-of-central-directory record: 22 bytes plus a comment of up to 65535 bytes, at the end.
    let eocd = -1
    for (let at = bytes.length - 22; at >= Math.max(0, bytes.length - 22 - 65535); at--) {
      if (u32(bytes, at) === 0x06054b50) {
        eocd = at
        break
      }
    }
    if (eocd < 0) throw new ZipError('ZIP_MALFORMED', 'not a zip archive (no end-of-central-directory record)')
    const count = u16(bytes, eocd + 10)
    const cdSize = u32(bytes, eocd + 12)
    const cdOffset = u32(bytes, eocd + 16)
    if (count === 0xffff || cdOffset === 0xffffffff) throw new ZipError('ZIP_UNSUPPORTED', 'ZIP64 archives are not supported')
    if (cdOffset + cdSize > eocd) throw new ZipError('ZIP_MALFORMED', 'the central directory lies outside the archive')
    const decoder = new TextDecoder('utf-8')
    const planned: { name: string; method: number; compSize: number; size: number; local: number }[] = []
    const skipped: string[] = []
    let declaredTotal = 0
    let p = cdOffset
    for (let k = 0; k < count; k++) {
      if (p + 46 > eocd || u32(bytes, p) !== 0x02014b50) throw new ZipError('ZIP_MALFORMED', `central directory entry ${k + 1} is damaged`)
      const flags = u16(bytes, p + 8)
      const method = u16(bytes, p + 10)
      const compSize = u32(bytes, p + 20)
      const size = u32(bytes, p + 24)
      const nameLen = u16(bytes, p + 28)
      const extraLen = u16(bytes, p + 30)
      const commentLen = u16(bytes, p + 32)
      const local = u32(bytes, p + 42)
      if (p + 46 + nameLen > eocd) throw new ZipError('ZIP_MALFORMED', `central directory entry ${k + 1} is damaged`)
      const name = decoder.decode(bytes.subarray(p + 46, p + 46 + nameLen))
      p += 46 + nameLen + extraLen + commentLen
      if (isSkippedName(name)) {
        skipped.push(name)
        continue
      }
      if (flags & 1) throw new ZipError('ZIP_UNSUPPORTED', `${name} is encrypted`)
      if (method !== 0 && method !== 8) throw new ZipError('ZIP_UNSUPPORTED', `${name} uses compression method ${method}; only stored and deflate are supported`)
      if (size === 0xffffffff || compSize === 0xffffffff) throw new ZipError('ZIP_UNSUPPORTED', 'ZIP64 archives are not supported')
      if (planned.length >= maxEntries) throw new ZipError('ZIP_TOO_MANY_ENTRIES', `the archive holds more than ${maxEntries} files`)
      if (size > maxEntryBytes) throw new ZipError('ZIP_TOO_LARGE', `${name} is ${size} bytes uncompressed; the limit is ${maxEntryBytes}`)
      declaredTotal += size
      if (declaredTotal > maxTotalBytes) throw new ZipError('ZIP_TOO_LARGE', `the files add up to more than ${maxTotalBytes} bytes uncompressed`)
      planned.push({ name, method, compSize, size, local })
    }
    const entries: ZipEntry[] = []
    let total = 0
    for (const e of planned) {
      if (e.local + 30 > bytes.length || u32(bytes, e.local) !== 0x04034b50) throw new ZipError('ZIP_MALFORMED', `the local header of ${e.name} is damaged`)
      const start = e.local + 30 + u16(bytes, e.local + 26) + u16(bytes, e.local + 28)
      if (start + e.compSize > bytes.length) throw new ZipError('ZIP_MALFORMED', `${e.name} is cut off`)
      const data = bytes.subarray(start, start + e.compSize)
      // The declared size is not trusted: the limit is the smaller of the entry and the remaining total.
      const limit = Math.min(maxEntryBytes, maxTotalBytes - total)
      let out: Uint8Array | undefined
      if (e.method === 0) out = data.length <= limit ? data.slice() : undefined
      else out = inflateBounded(data, limit)
      if (!out) throw new ZipError('ZIP_TOO_LARGE', `${e.name} inflates past the size limit (${limit} bytes)`)
      if (out.length !== e.size) throw new ZipError('ZIP_MALFORMED', `${e.name} inflates to ${out.length} bytes, not the ${e.size} its header states`)
      total += out.length
      entries.push({ name: e.name, bytes: out })
    }
    return { ok: true, entries, skipped }
  } catch (err) {
    if (err instanceof ZipError) return { ok: false, code: err.code, message: err.message }
    return { ok: false, code: 'ZIP_MALFORMED', message: `the archive could not be read (${(err as Error).message})` }
  }
}

/** True for the gzip magic bytes 1f 8b (RFC 1952 §2.3.1). */
export function isGzip(bytes: Uint8Array): boolean {
  return bytes.length >= 18 && bytes[0] === 0x1f && bytes[1] === 0x8b
}

/**
 * Decompresses a single-member gzip file, stopping once the output passes `limit` bytes.
 * Returns undefined past the limit; throws on a damaged stream.
 */
export function gunzipBounded(bytes: Uint8Array, limit: number): Uint8Array | undefined {
  if (!isGzip(bytes) || bytes[2] !== 8) throw new Error('not a deflate gzip stream')
  const flags = bytes[3]!
  let at = 10
  if (flags & 4) at += 2 + u16(bytes, at)
  if (flags & 8) {
    while (at < bytes.length && bytes[at] !== 0) at++
    at++
  }
  if (flags & 16) {
    while (at < bytes.length && bytes[at] !== 0) at++
    at++
  }
  if (flags & 2) at += 2
  if (at >= bytes.length - 8) throw new Error('gzip header runs past the data')
  try {
    return inflateBounded(bytes.subarray(at, bytes.length - 8), limit)
  } catch (err) {
    throw new Error(err instanceof ZipError ? err.message : `damaged compressed data (${(err as Error).message})`, { cause: err })
  }
}
