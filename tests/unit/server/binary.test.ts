// Stored array bytes against Node's own little-endian Buffer writers and readers (the layout the
// BLOB columns have always had), including buffers that start at an odd offset of a larger one.
import { describe, expect, it } from 'vitest'
import { bufferToFloat32, bufferToFloat64, float32Bytes, float32ToBuffer, float64ToBuffer } from '../../../server/lib/binary'

const values = [0, -0, 1, -1.5, Math.PI, 1e-40, 3.4e38, 1e300, Number.NaN, Infinity, -Infinity, 123456.789]

describe('typed arrays ↔ little-endian bytes', () => {
  it('writes what Buffer.writeDoubleLE / writeFloatLE write', () => {
    const doubles = Buffer.alloc(values.length * 8)
    const singles = Buffer.alloc(values.length * 4)
    values.forEach((v, i) => {
      doubles.writeDoubleLE(v, i * 8)
      singles.writeFloatLE(v, i * 4)
    })
    expect(float64ToBuffer(Float64Array.from(values)).equals(doubles)).toBe(true)
    expect(float32ToBuffer(values).equals(singles)).toBe(true)
    // Also from a float32 array that is a view into a larger buffer.
    const larger = new Float32Array(values.length + 3)
    larger.set(values, 2)
    expect(float32Bytes(larger.subarray(2, 2 + values.length)).equals(singles)).toBe(true)
  })

  it('reads what Buffer.readDoubleLE / readFloatLE read, from aligned and unaligned buffers', () => {
    for (const offset of [0, 1, 3, 8]) {
      const big = Buffer.alloc(offset + values.length * 8)
      values.forEach((v, i) => big.writeDoubleLE(v, offset + i * 8))
      const doubles = big.subarray(offset)
      expect([...bufferToFloat64(doubles)].every((v, i) => Object.is(v, doubles.readDoubleLE(i * 8)))).toBe(true)
      const singles = big.subarray(offset, offset + values.length * 4)
      expect([...bufferToFloat32(singles)].every((v, i) => Object.is(v, singles.readFloatLE(i * 4)))).toBe(true)
    }
  })
})
