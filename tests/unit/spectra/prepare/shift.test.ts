import { describe, expect, it } from 'vitest'
import { shiftGridToRest } from '../../../../server/spectra/prepare/shift'
import { DEFAULT_GRID, SPEED_OF_LIGHT_KMS, gridWavelength } from '../../../../shared/grid'

const grid = DEFAULT_GRID

/** A Gaussian absorption line of depth 0.6 and FWHM `fwhm` Å at `centre` Å (a closed form, not the code's). */
function line(centre: number, fwhm: number): Float64Array {
  const sigma = fwhm / (2 * Math.sqrt(2 * Math.LN2))
  const out = new Float64Array(grid.length)
  for (let i = 0; i < grid.length; i++) {
    const x = gridWavelength(grid, i) - centre
    out[i] = 1 - 0.6 * Math.exp((-x * x) / (2 * sigma * sigma))
  }
  return out
}

describe('shiftGridToRest', () => {
  it('puts a line observed at λ0(1 + v/c) back at λ0 for a shift of a fraction of a pixel', () => {
    // 2.5 Å FWHM at 4340 Å is about 5.8 pixels of the 1e-4 ln λ grid.
    for (const v of [13.7, 120, -287.4]) {
      const observed = line(4340.47 * (1 + v / SPEED_OF_LIGHT_KMS), 2.5)
      const rest = line(4340.47, 2.5)
      const shifted = shiftGridToRest(grid, v, new Uint8Array(grid.length), [{ values: observed }])
      let worst = 0
      for (let i = 20; i < grid.length - 20; i++) worst = Math.max(worst, Math.abs(shifted.values[0]![i]! - rest[i]!))
      // Cubic convolution errs as h³ f‴ (Keys 1981): about 1e-3 of the depth for a line 6 pixels wide.
      expect(worst).toBeLessThan(1.5e-3)
      expect(shifted.mask.slice(20, grid.length - 20).every((m) => m === 0)).toBe(true)
    }
  })

  it('moves values by whole pixels unchanged when the shift is a whole number of pixels', () => {
    const values = Float64Array.from({ length: grid.length }, (_, i) => Math.sin(i / 7))
    const v = SPEED_OF_LIGHT_KMS * Math.expm1(3 * grid.step)
    const out = shiftGridToRest(grid, v, new Uint8Array(grid.length), [{ values }])
    expect(out.values[0]![100]).toBeCloseTo(values[103]!, 9)
    expect(out.mask[grid.length - 3]).toBe(1)
    expect(out.values[0]![grid.length - 3]).toBeNaN()
  })

  it('masks a pixel next to a masked one, falls back to a straight line beside one further out, and carries a continuum everywhere', () => {
    const values = Float64Array.from({ length: grid.length }, (_, i) => 1 + i / 1000)
    const continuum = Float64Array.from({ length: grid.length }, () => 2)
    const mask = new Uint8Array(grid.length)
    mask[500] = 1
    values[500] = Number.NaN
    const v = SPEED_OF_LIGHT_KMS * Math.expm1(0.5 * grid.step)
    const out = shiftGridToRest(grid, v, mask, [{ values }, { values: continuum, everywhere: true }])
    // Pixel i reads between i and i + 1: 499 and 500 touch the masked pixel.
    expect(out.mask[499]).toBe(1)
    expect(out.mask[500]).toBe(1)
    expect(out.values[0]![499]).toBeNaN()
    expect(out.values[1]![499]).toBe(2)
    // 498 needs 497…500 for a cubic; with 500 masked it interpolates 498 and 499 on a straight line.
    expect(out.mask[498]).toBe(0)
    expect(out.values[0]![498]).toBeCloseTo(1 + 498.5 / 1000, 6)
    expect(out.values[0]![501]).toBeCloseTo(1 + 501.5 / 1000, 6)
  })

  it('refuses a velocity at or beyond c', () => {
    expect(() => shiftGridToRest(grid, SPEED_OF_LIGHT_KMS, new Uint8Array(grid.length), [])).toThrow(/below c/)
  })
})
