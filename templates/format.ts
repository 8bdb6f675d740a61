/**
 * Byte-level helpers shared by the libraries under templates/: little-endian float32 rows and
 * SHA-256 digests, so that a library reads the same on any host.
 */
import { createHash } from 'node:crypto'
import { readFileSync } from 'node:fs'

/** A data file of a library: little-endian float32, rows × columns, row-major. */
export interface ManifestFile {
  path: string
  dtype: 'float32le'
  rows: number
  columns: number
  sha256: string
}

/** SHA-256 hex digest of bytes. */
export function sha256(bytes: Uint8Array): string {
  return createHash('sha256').update(bytes).digest('hex')
}

/** Little-endian float32 bytes of an array, whatever the host's byte order. */
export function float32LittleEndian(values: Float32Array): Uint8Array {
  const out = new Uint8Array(values.length * 4)
  const view = new DataView(out.buffer)
  for (let i = 0; i < values.length; i++) view.setFloat32(i * 4, values[i]!, true)
  return out
}

/**
 * Reads a float32 data file, checking its size against the manifest and, when `verify`, its SHA-256.
 * @throws when the size or the digest differs
 */
export function readFloat32(path: string, expected: ManifestFile, verify: boolean): Float32Array {
  const bytes = readFileSync(path)
  if (bytes.length !== expected.rows * expected.columns * 4) {
    throw new Error(`${expected.path} holds ${bytes.length} bytes, the manifest expects ${expected.rows * expected.columns * 4}`)
  }
  if (verify && sha256(bytes) !== expected.sha256) throw new Error(`${expected.path} does not match its SHA-256 in the manifest`)
  const out = new Float32Array(expected.rows * expected.columns)
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength)
  for (let i = 0; i < out.length; i++) out[i] = view.getFloat32(i * 4, true)
  return out
}
