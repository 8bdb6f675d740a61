import { describe, expect, it } from 'vitest'
import { solveLinearInPlace } from '../../../server/spectra/linear'

describe('solveLinearInPlace', () => {
  it('solves a system that needs a row swap, leaving the right-hand side alone', () => {
    // 0·a + 2b + c = 7, a + b + c = 6, 2a + b = 4 → a = 1, b = 2, c = 3 (worked by hand)
    const m = Float64Array.from([0, 2, 1, 1, 1, 1, 2, 1, 0])
    const rhs = Float64Array.from([7, 6, 4])
    const x = new Float64Array(3)
    expect(solveLinearInPlace(m, rhs, x, 3)).toBe(true)
    expect(Array.from(x).map((v) => Number(v.toFixed(12)))).toEqual([1, 2, 3])
    expect(Array.from(rhs)).toEqual([7, 6, 4])
  })

  it('reports a singular system, and a pivot below the floor it is given', () => {
    expect(solveLinearInPlace(Float64Array.from([1, 2, 2, 4]), Float64Array.from([1, 2]), new Float64Array(2), 2)).toBe(false)
    expect(solveLinearInPlace(Float64Array.from([1e-310, 0, 0, 1]), Float64Array.from([1, 1]), new Float64Array(2), 2, 1e-300)).toBe(false)
  })
})
