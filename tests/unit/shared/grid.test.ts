import { describe, expect, it } from 'vitest'
import { gridWavelengths, makeLogGrid } from '../../../shared/grid'

describe('gridWavelengths', () => {
  it("gives λ_i = start · e^(step · i), an array of the caller's own each time", () => {
    // A log-λ grid: constant velocity step c·step per pixel (common practice).
    const grid = makeLogGrid(4000, 4100, 1e-4)
    const first = gridWavelengths(grid)
    expect(first.length).toBe(grid.length)
    for (const i of [0, 1, 100, grid.length - 1]) expect(first[i]).toBeCloseTo(4000 * Math.exp(1e-4 * i), 9)
    first[0] = -1
    const second = gridWavelengths(grid)
    expect(second).not.toBe(first)
    expect(second[0]).toBe(4000)
  })
})
