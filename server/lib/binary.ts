/** Typed arrays ↔ little-endian bytes for BLOB columns and binary responses. */
import { endianness } from 'node:os'

// On a little-endian machine (every one Node runs on in practice) a typed array's memory already
// is the stored layout: one copy instead of a DataView call per element (about 10× faster).
const LITTLE = endianness() === 'LE'

/** The bytes of `b` in an ArrayBuffer of its own when its offset does not suit `size`-byte elements. */
function aligned(b: Buffer, size: number): { buffer: ArrayBufferLike; offset: number } {
  if (b.byteOffset % size === 0) return { buffer: b.buffer, offset: b.byteOffset }
  return { buffer: b.buffer.slice(b.byteOffset, b.byteOffset + b.length), offset: 0 }
}

export function float64ToBuffer(a: Float64Array): Buffer {
  if (LITTLE) return Buffer.from(Float64Array.from(a).buffer)
  const out = Buffer.alloc(a.length * 8)
  for (let i = 0; i < a.length; i++) out.writeDoubleLE(a[i]!, i * 8)
  return out
}

export function float32ToBuffer(a: ArrayLike<number>): Buffer {
  if (LITTLE) return Buffer.from(Float32Array.from(a).buffer)
  const out = Buffer.alloc(a.length * 4)
  for (let i = 0; i < a.length; i++) out.writeFloatLE(a[i]!, i * 4)
  return out
}

export function bufferToFloat64(b: Buffer): Float64Array {
  const n = b.length / 8
  if (LITTLE) {
    const { buffer, offset } = aligned(b, 8)
    return Float64Array.from(new Float64Array(buffer, offset, n))
  }
  const out = new Float64Array(n)
  for (let i = 0; i < n; i++) out[i] = b.readDoubleLE(i * 8)
  return out
}

export function bufferToFloat32(b: Buffer): Float64Array {
  const n = b.length / 4
  if (LITTLE) {
    const { buffer, offset } = aligned(b, 4)
    return Float64Array.from(new Float32Array(buffer, offset, n))
  }
  const out = new Float64Array(n)
  for (let i = 0; i < n; i++) out[i] = b.readFloatLE(i * 4)
  return out
}
