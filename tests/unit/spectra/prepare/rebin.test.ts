import { describe, expect, it } from 'vitest'
import { rebinNoiseCorrelation, rebinSpectrumToLogGrid } from '../../../../server/spectra/prepare/rebin'
import { DEFAULT_GRID, makeLogGrid } from '../../../../shared/grid'
import { linearWavelengths, readA0vStandard, readReference } from './synthetic'

interface LineWidthsReference {
  versions: Record<string, string>
  resampled_probe: { index: number[]; flux: number[] }
}

describe('rebinSpectrumToLogGrid', () => {
  it('keeps a constant flux constant and masks the grid outside the coverage', () => {
    const wavelength = linearWavelengths(4000, 5000, 1)
    const out = rebinSpectrumToLogGrid({ wavelength, flux: new Float64Array(wavelength.length).fill(3) }, { grid: DEFAULT_GRID })
    let covered = 0
    for (let i = 0; i < out.flux.length; i++) {
      if (out.mask![i] === 0) {
        covered++
        expect(out.flux[i]).toBeCloseTo(3, 12)
      } else expect(out.flux[i]).toBeNaN()
    }
    expect(covered).toBeGreaterThan(2000)
  })
  it('conserves the integrated flux of a line (to 1e-8 relative)', () => {
    const wavelength = linearWavelengths(4000, 5000, 0.7)
    const flux = Float64Array.from(wavelength, (w) => 1 + 5 * Math.exp(-0.5 * ((w - 4500) / 3) ** 2))
    const grid = makeLogGrid(4400, 4600, 2e-4)
    const out = rebinSpectrumToLogGrid({ wavelength, flux }, { grid })
    const integral = (w: Float64Array, f: Float64Array, lo: number, hi: number) => {
      let s = 0
      for (let i = 0; i < w.length; i++) {
        const left = i === 0 ? w[0]! - (w[1]! - w[0]!) / 2 : (w[i - 1]! + w[i]!) / 2
        const right = i === w.length - 1 ? w[i]! + (w[i]! - w[i - 1]!) / 2 : (w[i]! + w[i + 1]!) / 2
        const o = Math.min(right, hi) - Math.max(left, lo)
        if (o > 0) s += o * f[i]!
      }
      return s
    }
    const lo = Math.sqrt(out.wavelength[0]! * out.wavelength[1]!)
    const hi = Math.sqrt(out.wavelength[grid.length - 2]! * out.wavelength[grid.length - 1]!)
    expect(integral(out.wavelength, out.flux, lo, hi) / integral(wavelength, flux, lo, hi)).toBeCloseTo(1, 8)
  })
  it('halves the variance when two equal input pixels fall in one output pixel', () => {
    const grid = makeLogGrid(4000, 4400, 5e-4) // ≈ 2.1 Å pixels
    // Input on a log grid of half the step, placed so that its pixel edges meet the output's.
    const n = 2 * grid.length + 10
    const wavelength = Float64Array.from({ length: n }, (_, k) => grid.start * Math.exp((grid.step / 2) * (k - 4 - 0.5)))
    const out = rebinSpectrumToLogGrid({ wavelength, flux: new Float64Array(n).fill(1), error: new Float64Array(n).fill(0.1) }, { grid })
    expect(out.error![10]! / (0.1 / Math.SQRT2)).toBeCloseTo(1, 3)
  })
  it('leaves masked input pixels out and masks output pixels they mostly cover', () => {
    const wavelength = linearWavelengths(4000, 4100, 1)
    const flux = new Float64Array(wavelength.length).fill(1)
    const mask = new Uint8Array(wavelength.length)
    for (let i = 40; i < 60; i++) {
      mask[i] = 1
      flux[i] = 1e6
    }
    const grid = makeLogGrid(4010, 4090, 1e-4)
    const out = rebinSpectrumToLogGrid({ wavelength, flux, mask }, { grid })
    for (let i = 0; i < grid.length; i++) if (out.mask![i] === 0) expect(out.flux[i]).toBeCloseTo(1, 12)
    const masked = out.mask!.reduce((s, m) => s + m, 0)
    expect(masked).toBeGreaterThan(40)
  })
  it('agrees with specutils 1.9.1 FluxConservingResampler on the A0 V standard (1e-6 relative)', () => {
    // Reference: tests/reference/specutils_line_widths.py → tests/reference/out/specutils_line_widths.json.
    const reference = readReference<LineWidthsReference>('specutils_line_widths.json')
    expect(reference.versions.specutils).toBe('1.9.1')
    const out = rebinSpectrumToLogGrid(readA0vStandard(), { grid: DEFAULT_GRID })
    reference.resampled_probe.index.forEach((index, k) => {
      expect(out.flux[index]! / (reference.resampled_probe.flux[k]! * 1e9)).toBeCloseTo(1, 6)
    })
  })
})

describe('rebinNoiseCorrelation', () => {
  it('counts grid pixels per input pixel, and never less than one', () => {
    const wavelength = linearWavelengths(4000, 5000, 2)
    const spectrum = { wavelength, flux: new Float64Array(wavelength.length) }
    expect(rebinNoiseCorrelation(spectrum, DEFAULT_GRID, 4500)).toBeCloseTo(2 / (4500 * 1e-4), 6)
    expect(rebinNoiseCorrelation(spectrum, makeLogGrid(4000, 5000, 1e-3), 4500)).toBe(1)
  })
})
