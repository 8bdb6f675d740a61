import { describe, expect, it } from 'vitest'
import { vacuumToAir } from '../../../../shared/airvac'
import { CLASSIFICATION_LINES, continuumMaskRanges, findLine, LINE_RATIOS, lineSpan, VOIGT_FIT_LINE_IDS } from '../../../../shared/lines'

describe('CLASSIFICATION_LINES', () => {
  // Rydberg formula, 1/λ_vac = R_H (1/4 − 1/n²), R_H = 109 677.58 cm⁻¹ (from memory, as in the
  // project's reference sheet), converted to air with shared/airvac.ts (Morton 2000). The table holds
  // NIST's fine-structure-weighted values, so they agree to about 0.1 Å.
  it.each([
    ['h-alpha', 3],
    ['h-beta', 4],
    ['h-gamma', 5],
    ['h-delta', 6],
    ['h-epsilon', 7],
    ['h-8', 8],
    ['h-9', 9],
  ] as const)('places %s where the Rydberg formula puts it (n = %s), within 0.1 Å', (id, n) => {
    const vacuum = 1e8 / (109677.58 * (1 / 4 - 1 / (n * n)))
    expect(Math.abs(findLine(id)!.wavelength - vacuumToAir(vacuum))).toBeLessThan(0.1)
  })
  it('gives every line a unique id, a source, and a window inside its own measuring span', () => {
    const ids = new Set(CLASSIFICATION_LINES.map((l) => l.id))
    expect(ids.size).toBe(CLASSIFICATION_LINES.length)
    for (const line of CLASSIFICATION_LINES) {
      expect(line.wavelengthSource.length).toBeGreaterThan(5)
      expect(line.windowSource.length).toBeGreaterThan(5)
      for (const range of [line.window, line.blue, line.red]) expect(range[1]).toBeGreaterThan(range[0])
      // Side bands stay outside the window, bar the published Lick Mg b bands, which overlap it by 1.25 Å.
      expect(line.blue[1]).toBeLessThanOrEqual(line.window[0] + 1.25)
      expect(line.red[0]).toBeGreaterThanOrEqual(line.window[1] - 1.25)
      const [lo, hi] = lineSpan(line)
      expect(lo).toBeLessThan(line.wavelength)
      expect(hi).toBeGreaterThan(line.wavelength)
      if (line.family !== 'band') expect(line.wavelength).toBeGreaterThan(line.window[0])
    }
  })
  it('covers the features the MK criteria use', () => {
    const names = new Set(CLASSIFICATION_LINES.map((l) => l.name))
    for (const name of [
      'Hβ',
      'Hγ',
      'Hδ',
      'Hε',
      'H8',
      'Ca II K',
      'Ca II H',
      'He I 4471',
      'He II 4686',
      'Mg II 4481',
      'Si IV 4089',
      'Sr II 4077',
      'Ca I 4226',
      'Fe I 4045',
      'Y II 4375',
      'G band',
      'TiO 4954',
      'MgH 4780',
      'Mg b',
      'Na D',
    ]) {
      expect(names.has(name), name).toBe(true)
    }
  })
  it('keeps the reference-sheet wavelengths of Ca II K and He I 4471 (NIST, from memory)', () => {
    expect(findLine('ca-ii-k')!.wavelength).toBe(3933.66)
    expect(findLine('he-i-4471')!.wavelength).toBe(4471.48)
  })
  it('gives each Voigt-fitted Balmer line a profile window around its centre', () => {
    for (const id of VOIGT_FIT_LINE_IDS) {
      const line = findLine(id)!
      expect(line.family).toBe('balmer')
      expect(line.profileWindow![0]).toBeLessThan(line.wavelength)
      expect(line.profileWindow![1]).toBeGreaterThan(line.wavelength)
    }
  })
})

describe('LINE_RATIOS', () => {
  it('refers only to lines in the table', () => {
    for (const ratio of LINE_RATIOS) for (const id of [...ratio.numerator, ...ratio.denominator]) expect(findLine(id), id).toBeDefined()
  })
})

describe('continuumMaskRanges', () => {
  it('returns sorted, non-overlapping ranges that cover the Balmer wings', () => {
    const ranges = continuumMaskRanges()
    for (let i = 1; i < ranges.length; i++) expect(ranges[i]![0]).toBeGreaterThan(ranges[i - 1]![1])
    expect(ranges.some(([lo, hi]) => lo <= 4811 && hi >= 4911)).toBe(true)
  })
})
