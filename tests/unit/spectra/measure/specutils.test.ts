import { describe, expect, it } from 'vitest'
import { measureSpectrumLine } from '../../../../server/spectra/measure/line'
import { rebinSpectrumToLogGrid } from '../../../../server/spectra/prepare/rebin'
import { DEFAULT_GRID } from '../../../../shared/grid'
import { findLine } from '../../../../shared/lines'
import { readA0vStandard, readReference } from '../prepare/synthetic'

interface LineWidths {
  versions: Record<string, string>
  grid: { start: number; step: number; length: number }
  lines: Record<string, { window: number[]; blue: number[]; red: number[]; continuum_blue: number; continuum_red: number; equivalent_width: number; fwhm: number }>
}

// Reference: specutils 1.9.1 equivalent_width(continuum=1) and fwhm on the A0 V standard after
// dividing by the same side-band continuum, made by tests/reference/specutils_line_widths.py
// (output tests/reference/out/specutils_line_widths.json).
const reference = readReference<LineWidths>('specutils_line_widths.json')

describe('measureSpectrumLine against specutils on the A0 V standard', () => {
  const prepared = rebinSpectrumToLogGrid(readA0vStandard(), { grid: DEFAULT_GRID })
  it('was made with specutils 1.9.1 on the same grid and windows as the table', () => {
    expect(reference.versions.specutils).toBe('1.9.1')
    expect(reference.grid).toEqual(DEFAULT_GRID)
    for (const [id, ref] of Object.entries(reference.lines)) {
      const line = findLine(id)!
      expect(ref.window).toEqual(line.window)
      expect(ref.blue).toEqual(line.blue)
      expect(ref.red).toEqual(line.red)
    }
  })
  // Tolerances: specutils sums whole pixels whose centres fall in the window, this code cuts the edge
  // pixels; on 0.4–0.5 Å pixels that differs by ≤ 0.5 % of a Balmer EW. Ca II K (EW ≈ 0.4 Å) is
  // compared in Å. FWHMs agree to 0.5 % (the half level here is the parabola-refined depth).
  it.each([
    ['h-beta', 0.005],
    ['h-gamma', 0.005],
    ['h-delta', 0.005],
  ])('agrees on the EW and FWHM of %s within %s relative', (id, tolerance) => {
    const ref = reference.lines[id]!
    const m = measureSpectrumLine(prepared, findLine(id)!)
    if (!m.measured) throw new Error(m.detail)
    expect((m.continuum.blue * 1e-9) / ref.continuum_blue).toBeCloseTo(1, 6)
    expect(Math.abs(m.equivalentWidth / ref.equivalent_width - 1)).toBeLessThan(tolerance)
    expect(Math.abs(m.fwhm! / ref.fwhm - 1)).toBeLessThan(0.005)
  })
  it('agrees on the EW of Ca II K within 0.01 Å and its FWHM within 1 %', () => {
    const ref = reference.lines['ca-ii-k']!
    const m = measureSpectrumLine(prepared, findLine('ca-ii-k')!)
    if (!m.measured) throw new Error(m.detail)
    expect(Math.abs(m.equivalentWidth - ref.equivalent_width)).toBeLessThan(0.01)
    expect(Math.abs(m.fwhm! / ref.fwhm - 1)).toBeLessThan(0.01)
  })
})
