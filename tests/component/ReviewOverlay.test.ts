import { describe, expect, it } from 'vitest'
import { nearestStandard, neighbourStandard, type OverlayStandard } from '@/lib/reviewOverlay'

// A small grid with a gap (no B9) and a class missing at one type (no A0 IV).
const grid: OverlayStandard[] = [
  [1, 'B7 V', 17, 'V', 6],
  [2, 'B8 V', 18, 'V', 6],
  [3, 'B8 III', 18, 'III', 4],
  [4, 'A0 V', 20, 'V', 6],
  [5, 'A0 III', 20, 'III', 4],
  [6, 'B8 Ia', 18, 'Ia', 1],
].map(([id, spectralType, typeCode, luminosityClass, classCode]) => ({ id, spectralType, typeCode, luminosityClass, classCode }) as OverlayStandard)
const byId = (id: number) => grid.find((s) => s.id === id)!

describe('nearestStandard', () => {
  it('finds the standard nearest a type and class', () => {
    expect(nearestStandard(grid, 18, 4)?.spectralType).toBe('B8 III')
    expect(nearestStandard(grid, 19.4, 6)?.spectralType).toBe('A0 V')
    expect(nearestStandard([], 18, 4)).toBeNull()
  })
})

describe('neighbourStandard', () => {
  it('moves one subtype earlier or later at the same class, across gaps', () => {
    expect(neighbourStandard(grid, byId(2), 'earlier')?.spectralType).toBe('B7 V')
    expect(neighbourStandard(grid, byId(2), 'later')?.spectralType).toBe('A0 V')
    expect(neighbourStandard(grid, byId(3), 'later')?.spectralType).toBe('A0 III')
  })

  it('moves one class brighter or fainter at the same type', () => {
    expect(neighbourStandard(grid, byId(2), 'brighter')?.spectralType).toBe('B8 III')
    expect(neighbourStandard(grid, byId(3), 'brighter')?.spectralType).toBe('B8 Ia')
    expect(neighbourStandard(grid, byId(3), 'fainter')?.spectralType).toBe('B8 V')
  })

  it('stops at the edge of the library', () => {
    expect(neighbourStandard(grid, byId(1), 'earlier')).toBeNull()
    expect(neighbourStandard(grid, byId(2), 'fainter')).toBeNull()
  })
})
