import { describe, expect, it } from 'vitest'
import { measureLineRatios, measureSpectrumLines } from '../../../../server/spectra/measure/lines'
import type { LineMeasurement } from '../../../../server/spectra/measure/types'
import { DEFAULT_GRID, gridWavelengths } from '../../../../shared/grid'
import { CLASSIFICATION_LINES, findLine, LINE_RATIOS } from '../../../../shared/lines'
import { syntheticSpectrum } from '../prepare/synthetic'

function fake(id: string, ew: number, depth: number): LineMeasurement {
  const line = findLine(id)!
  return {
    id,
    name: line.name,
    wavelength: line.wavelength,
    family: line.family,
    measured: true,
    equivalentWidth: ew,
    equivalentWidthError: 0.1 * ew,
    depth,
    depthError: 0.01,
    fwhm: 2,
    centroid: line.wavelength,
    continuum: { blue: 1, red: 1 },
    snr: 100,
  }
}

describe('measureLineRatios', () => {
  it('divides depths or EWs as the definition says, with propagated errors', () => {
    const ratios = measureLineRatios([fake('sr-ii-4077', 1, 0.3), fake('fe-i-4071', 2, 0.2), fake('he-i-4471', 0.8, 0.2), fake('mg-ii-4481', 0.4, 0.1)])
    const sr = ratios.find((r) => r.id === 'sr-ii-4077/fe-i-4071')!
    expect(sr.value).toBeCloseTo(1.5, 12)
    expect(sr.error).toBeCloseTo(Math.hypot(0.01 / 0.2, (0.3 * 0.01) / 0.04), 12)
    expect(ratios.find((r) => r.id === 'he-i-4471/mg-ii-4481')!.value).toBeCloseTo(2, 12)
  })
  it('gives a single-feature strength when the denominator is empty', () => {
    const tio = measureLineRatios([fake('tio-4954', 10, 0.4)]).find((r) => r.id === 'tio-4954')!
    expect(tio.value).toBeCloseTo(0.4, 12)
  })
  it('leaves a ratio empty, with a reason, when a line was not measured', () => {
    const missing = measureLineRatios([fake('sr-ii-4077', 1, 0.3)]).find((r) => r.id === 'sr-ii-4077/fe-i-4071')!
    expect(missing).toMatchObject({ value: null, error: null, reason: 'fe-i-4071 was not measured' })
  })
  it('returns one entry per definition', () => {
    expect(measureLineRatios([])).toHaveLength(LINE_RATIOS.length)
  })
})

describe('measureSpectrumLines', () => {
  it('measures every line of the table, fits the Balmer lines, and never returns zero for an unmeasured line', () => {
    const wavelength = gridWavelengths(DEFAULT_GRID)
    const spectrum = syntheticSpectrum(
      wavelength,
      CLASSIFICATION_LINES.filter((l) => l.family === 'balmer').map((l) => ({ centre: l.wavelength, ew: 6, sigma: 2, gamma: 2 })),
      { snr: 200, seed: 9 },
    )
    const lines = measureSpectrumLines(spectrum, { snrByLine: { 'he-ii-4686': 3 }, snr: 200 })
    expect(lines).toHaveLength(CLASSIFICATION_LINES.length)
    const hBeta = lines.find((l) => l.id === 'h-beta')!
    expect(hBeta.measured && hBeta.voigt && Math.abs(hBeta.voigt.equivalentWidth / 6 - 1) < 0.05).toBe(true)
    const h9 = lines.find((l) => l.id === 'h-9')!
    expect(h9.measured).toBe(true)
    expect(lines.find((l) => l.id === 'he-ii-4686')).toMatchObject({ measured: false, reason: 'low-snr' })
    const naD = lines.find((l) => l.id === 'na-d')!
    expect(naD.measured).toBe(true)
  })
})
