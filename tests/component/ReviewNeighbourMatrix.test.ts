import { mount } from '@vue/test-utils'
import { describe, expect, it } from 'vitest'
import ReviewNeighbourMatrix, { type NeighbourTile } from '@/components/ReviewNeighbourMatrix.vue'
import { compareInRegion, moveCursor, neighbourCells, niceCeil, rectifiedSigma, sharedScale, type MatrixPosition } from '@/lib/neighbourMatrix'
import type { OverlayStandard } from '@/lib/reviewOverlay'

// A 3 × 3 patch of a grid (B7–B9 × III–V) with one corner missing (no B9 V), and a lone A0 V.
const grid: OverlayStandard[] = [
  [1, 'B7 III', 17, 'III', 4],
  [2, 'B8 III', 18, 'III', 4],
  [3, 'B9 III', 19, 'III', 4],
  [4, 'B7 IV', 17, 'IV', 5],
  [5, 'B8 IV', 18, 'IV', 5],
  [6, 'B9 IV', 19, 'IV', 5],
  [7, 'B7 V', 17, 'V', 6],
  [8, 'B8 V', 18, 'V', 6],
].map(([id, spectralType, typeCode, luminosityClass, classCode]) => ({ id, spectralType, typeCode, luminosityClass, classCode }) as OverlayStandard)
const byId = (id: number) => grid.find((s) => s.id === id)!

describe('neighbourCells', () => {
  it('puts the centre in the middle, types along the row and classes along the column', () => {
    const cells = neighbourCells(grid, byId(5))
    const at = (row: number, col: number) => cells.find((c) => c.row === row && c.col === col)?.standard?.spectralType ?? null
    expect(cells).toHaveLength(9)
    expect(at(0, 0)).toBe('B8 IV')
    expect(at(0, -1)).toBe('B7 IV')
    expect(at(0, 1)).toBe('B9 IV')
    expect(at(-1, 0)).toBe('B8 III')
    expect(at(1, 0)).toBe('B8 V')
    expect(at(-1, -1)).toBe('B7 III')
    expect(at(-1, 1)).toBe('B9 III')
    expect(at(1, -1)).toBe('B7 V')
  })

  it('leaves a cell empty where the library has no standard, rather than repeating a neighbour', () => {
    const cells = neighbourCells(grid, byId(5))
    expect(cells.find((c) => c.row === 1 && c.col === 1)?.standard).toBeNull()
    const ids = cells.map((c) => c.standard?.id).filter((id) => id !== undefined)
    expect(new Set(ids).size).toBe(ids.length)
  })

  it('is all empty without a centre', () => {
    expect(neighbourCells(grid, null).every((c) => c.standard === null)).toBe(true)
  })
})

describe('moveCursor', () => {
  it('moves one cell per arrow and stops at the edge', () => {
    expect(moveCursor({ row: 0, col: 0 }, 'ArrowLeft')).toEqual({ row: 0, col: -1 })
    expect(moveCursor({ row: 0, col: -1 }, 'ArrowLeft')).toEqual({ row: 0, col: -1 })
    expect(moveCursor({ row: 0, col: 0 }, 'ArrowUp')).toEqual({ row: -1, col: 0 })
    expect(moveCursor({ row: 1, col: 1 }, 'ArrowDown')).toEqual({ row: 1, col: 1 })
    expect(moveCursor({ row: 1, col: 1 }, 'ArrowRight')).toEqual({ row: 1, col: 1 })
  })
})

describe('compareInRegion', () => {
  const wl = Float64Array.from({ length: 101 }, (_, i) => 4000 + i)
  const star = { wavelength: wl, flux: Float64Array.from(wl, () => 1) }

  it('gives χ²_ν = (Δ/σ)² for a constant offset (worked by hand: Δ = 0.02, σ = 0.01 → 4)', () => {
    const std = { wavelength: wl, flux: Float64Array.from(wl, () => 0.98) }
    const c = compareInRegion(star, std, [4010, 4019], { sigma: 0.01 })
    expect(c.pixels).toBe(10)
    expect(c.reducedChi2).toBeCloseTo(4, 10)
    for (const v of c.values) expect(v).toBeCloseTo(0.02, 10)
  })

  it('gives the ratio − 1 in ratio mode (1 / 0.8 − 1 = 0.25)', () => {
    const std = { wavelength: wl, flux: Float64Array.from(wl, () => 0.8) }
    const c = compareInRegion(star, std, [4000, 4100], { sigma: 0.01, mode: 'ratio' })
    for (const v of c.values) expect(v).toBeCloseTo(0.25, 10)
  })

  it('skips masked pixels and wavelengths the standard does not cover', () => {
    const flux = Float64Array.from(wl, (_, i) => (i === 5 ? NaN : 1))
    const std = { wavelength: wl.slice(0, 51), flux: new Float64Array(51).fill(1) }
    const c = compareInRegion({ wavelength: wl, flux }, std, [4000, 4100], { sigma: 0.01 })
    expect(c.pixels).toBe(50)
    expect(c.reducedChi2).toBe(0)
  })

  it('has no χ² when nothing overlaps, and refuses a non-positive σ', () => {
    const c = compareInRegion(star, star, [5000, 5100], { sigma: 0.01 })
    expect(c.pixels).toBe(0)
    expect(c.reducedChi2).toBeNull()
    expect(() => compareInRegion(star, star, [4000, 4100], { sigma: 0 })).toThrow('sigma must be positive')
  })
})

describe('scales', () => {
  it('rounds up to 1, 2 or 5 × 10ⁿ', () => {
    expect(niceCeil(0.031)).toBeCloseTo(0.05, 12)
    expect(niceCeil(0.05)).toBeCloseTo(0.05, 12)
    expect(niceCeil(0.12)).toBeCloseTo(0.2, 12)
    expect(niceCeil(7)).toBe(10)
  })

  it('shares one axis across the tiles, never below the floor', () => {
    expect(sharedScale([{ values: [0.01, -0.07] }, { values: [0.03] }])).toBeCloseTo(0.1, 12)
    expect(sharedScale([{ values: [] }])).toBeCloseTo(0.01, 12)
  })

  it('reads σ of rectified flux as 1 / (S/N), with 100 for a missing S/N and 1000 at most', () => {
    expect(rectifiedSigma(50)).toBeCloseTo(0.02, 12)
    expect(rectifiedSigma(null)).toBeCloseTo(0.01, 12)
    expect(rectifiedSigma(1e16)).toBeCloseTo(0.001, 12)
  })
})

describe('ReviewNeighbourMatrix', () => {
  const comparison = (chi2: number) => ({ wavelength: [4000, 4050, 4100], values: [0, 0.02, -0.01], reducedChi2: chi2, pixels: 3 })
  const tiles: NeighbourTile[] = neighbourCells(grid, byId(5)).map((c, i) => ({ ...c, comparison: c.standard ? comparison(1 + i) : null }))
  const mountMatrix = (cursor: MatrixPosition = { row: 0, col: 0 }) => mount(ReviewNeighbourMatrix, { props: { tiles, cursor, pickedId: 5, scale: 0.05, mode: 'difference', region: [4000, 4100] } })

  it('draws nine tiles, each standard with its χ², its axis and a curve', () => {
    const wrapper = mountMatrix()
    expect(wrapper.findAll('[role="gridcell"]')).toHaveLength(9)
    const middle = wrapper.get('[data-testid="matrix-tile-0-0"]')
    expect(middle.get('[data-testid="matrix-tile-type"]').text()).toBe('B8 IV')
    expect(middle.get('[data-testid="matrix-tile-chi2"]').text()).toBe('χ²ν 5.00')
    expect(middle.get('[data-testid="matrix-tile-scale"]').text()).toBe('±0.05')
    expect(middle.get('path').attributes('d')).toMatch(/^M4\.0 37\.0L/)
    expect(middle.classes()).toContain('matrix__tile--picked')
    expect(middle.classes()).toContain('matrix__tile--cursor')
  })

  it('marks the lowest χ² and says where the library has no standard', () => {
    const wrapper = mountMatrix()
    expect(wrapper.get('[data-testid="matrix-tile--1--1"]').classes()).toContain('matrix__tile--lowest')
    expect(wrapper.get('[data-testid="matrix-tile-1-1"]').text()).toContain('no standard in the library')
  })

  it('moves the highlight with the cursor prop and asks to pick a tile on click', async () => {
    const wrapper = mountMatrix({ row: -1, col: 1 })
    expect(wrapper.get('[data-testid="matrix-tile--1-1"]').attributes('aria-selected')).toBe('true')
    expect(wrapper.get('[data-testid="matrix-tile-0-0"]').attributes('aria-selected')).toBe('false')
    await wrapper.get('[data-testid="matrix-tile-0-1"]').trigger('click')
    await wrapper.get('[data-testid="matrix-tile-1-1"]').trigger('click')
    expect(wrapper.emitted('pick')).toEqual([[{ row: 0, col: 1 }]])
  })
})
