import { describe, expect, it } from 'vitest'
import { localModelFit, type ModelStandard } from '../../../../server/spectra/match/local-model'

/** A toy level whose every pixel is exactly linear in type, class and [Fe/H], with known slopes. */
function linearLevel(points: { typeCode: number; classCode: number; feh: number | null }[], pixels: number) {
  const slope = (i: number) => [0.004 * Math.sin(i), 0.01 * Math.cos(1.7 * i), 0.05 * Math.sin(0.3 * i + 1)] as const
  const at = (i: number, t: number, c: number, m: number) => {
    const [a, b, d] = slope(i)
    return 1 - a * (t - 40) - b * (c - 5) - d * m
  }
  const rows = new Float32Array(points.length * pixels)
  points.forEach((p, r) => {
    for (let i = 0; i < pixels; i++) rows[r * pixels + i] = at(i, p.typeCode, p.classCode, p.feh ?? 0)
  })
  return { rows, at }
}

describe('localModelFit', () => {
  const pixels = 400
  // Standards at whole types 36–46, classes III–V and four metallicities, none at the spectrum's point.
  const points = [36, 38, 40, 42, 44, 46].flatMap((t, k) => [4, 5, 6].map((c, j) => ({ typeCode: t, classCode: c, feh: [-0.8, -0.3, 0, 0.3][(k + j) % 4]! })))
  const { rows, at } = linearLevel(points, pixels)
  const standards: ModelStandard[] = points.map((p, row) => ({ row, ...p, weight: 1 }))
  const weights = new Float64Array(pixels).fill(1e4) // S/N 100

  it('recovers the type, class and [Fe/H] of a spectrum made from the same linear model', () => {
    // The spectrum's point is the construction's: G3.4, class 5.0, [Fe/H] −0.6 (plus a small level offset, which the fit takes up).
    const flux = Float64Array.from({ length: pixels }, (_, i) => at(i, 43.4, 5, -0.6) + 0.002)
    const fit = localModelFit(rows, pixels, flux, weights, 0, pixels, standards)!
    expect(fit.typeCode).toBeCloseTo(43.4, 1)
    expect(fit.classCode).toBeCloseTo(5, 1)
    expect(fit.feh).toBeCloseTo(-0.6, 1)
  })

  it('keeps the type within the standards’ types, and skips pixels a standard lacks', () => {
    const flux = Float64Array.from({ length: pixels }, (_, i) => at(i, 55, 5, 0))
    const gappy = rows.slice()
    for (let i = 0; i < 50; i++) gappy[3 * pixels + i] = Number.NaN
    expect(localModelFit(gappy, pixels, flux, weights, 0, pixels, standards)!.typeCode).toBe(46)
  })

  it('declines with fewer than five standards or no usable pixel', () => {
    const flux = new Float64Array(pixels).fill(1)
    expect(localModelFit(rows, pixels, flux, weights, 0, pixels, standards.slice(0, 4))).toBeNull()
    expect(localModelFit(rows, pixels, flux, new Float64Array(pixels), 0, pixels, standards)).toBeNull()
  })
})
