/** Typed arrays ↔ little-endian bytes for BLOB columns and binary responses. */

export function float64ToBuffer(a: Float64Array): Buffer {
  const out = Buffer.alloc(a.length * 8)
  for (let i = 0; i < a.length; i++) out.writeDoubleLE(a[i]!, i * 8)
  return out
}

export function float32ToBuffer(a: ArrayLike<number>): Buffer {
  const out = Buffer.alloc(a.length * 4)
  for (let i = 0; i < a.length; i++) out.writeFloatLE(a[i]!, i * 4)
  return out
}

export function bufferToFloat64(b: Buffer): Float64Array {
  const out = new Float64Array(b.length / 8)
  for (let i = 0; i < out.length; i++) out[i] = b.readDoubleLE(i * 8)
  return out
}

export function bufferToFloat32(b: Buffer): Float64Array {
  const out = new Float64Array(b.length / 4)
  for (let i = 0; i < out.length; i++) out[i] = b.readFloatLE(i * 4)
  return out
}
