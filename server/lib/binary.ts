/** Typed arrays ↔ little-endian bytes for BLOB columns and binary responses. */
import { endianness } from 'node:os'

// On a little-endian machine (every one Node runs on in practice) a typed array's memory already
// is the stored layout: one copy instead of a Buffer read or write per element (about 10× faster).
const LITTLE = endianness() === 'LE'

/** The bytes of `b` in an ArrayBuffer of its own when its offset does not suit `size`-byte elements. */
function aligned(b: Buffer, size: number): { buffer: ArrayBuffer; offset: number } {
  // Buffers from Node and the database driver sit on plain ArrayBuffers, never shared ones.
  const buffer = b.buffer as ArrayBuffer
  if (b.byteOffset % size === 0) return { buffer, offset: b.byteOffset }
  return { buffer: buffer.slice(b.byteOffset, b.byteOffset + b.length), offset: 0 }
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

/**
 * The bytes of a float32 array for a BLOB, without a copy where the layout allows: the Buffer shares
 * the array's memory, so only for arrays nothing changes afterwards (a processing thread's output).
 */
export function float32Bytes(a: Float32Array): Buffer {
  return LITTLE ? Buffer.from(a.buffer, a.byteOffset, a.byteLength) : float32ToBuffer(a)
}

export function bufferToFloat64(b: Buffer): Float64Array {
  return fromBytes(b, Float64Array, (i) => b.readDoubleLE(i * 8))
}

export function bufferToFloat32(b: Buffer): Float64Array {
  return fromBytes(b, Float32Array, (i) => b.readFloatLE(i * 4))
}

function fromBytes(b: Buffer, View: Float64ArrayConstructor | Float32ArrayConstructor, read: (i: number) => number): Float64Array {
  const n = b.length / View.BYTES_PER_ELEMENT
  if (LITTLE) {
    const { buffer, offset } = aligned(b, View.BYTES_PER_ELEMENT)
    return Float64Array.from(new View(buffer, offset, n))
  }
  const out = new Float64Array(n)
  for (let i = 0; i < n; i++) out[i] = read(i)
  return out
}
