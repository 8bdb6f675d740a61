import { describe, expect, it } from 'vitest'
import { fitLevenbergMarquardt } from '../../../../server/spectra/measure/lm'
import { seededNormal } from '../prepare/synthetic'

describe('fitLevenbergMarquardt', () => {
  // y = a·exp(−b·x) + c
  const model = (x: Float64Array) => (p: Float64Array, values: Float64Array, jac: Float64Array) => {
    for (let i = 0; i < x.length; i++) {
      const e = Math.exp(-p[1]! * x[i]!)
      values[i] = p[0]! * e + p[2]!
      jac[i * 3] = e
      jac[i * 3 + 1] = -p[0]! * x[i]! * e
      jac[i * 3 + 2] = 1
    }
  }
  const x = Float64Array.from({ length: 50 }, (_, i) => i * 0.1)

  it('recovers the parameters of noise-free data to 1e-8 from a poor start', () => {
    const y = Float64Array.from(x, (v) => 2.5 * Math.exp(-1.3 * v) + 0.5)
    const result = fitLevenbergMarquardt(model(x), y, new Float64Array(50).fill(1), [1, 0.2, 0])
    expect(result.converged).toBe(true)
    expect(result.params[0]).toBeCloseTo(2.5, 8)
    expect(result.params[1]).toBeCloseTo(1.3, 8)
    expect(result.params[2]).toBeCloseTo(0.5, 8)
  })
  it('gives parameter errors that match the scatter over 200 noisy fits (within 20 %)', () => {
    const normal = seededNormal(42)
    const sigma = 0.05
    const values: number[] = []
    let reported = 0
    for (let trial = 0; trial < 200; trial++) {
      const y = Float64Array.from(x, (v) => 2.5 * Math.exp(-1.3 * v) + 0.5 + sigma * normal())
      const r = fitLevenbergMarquardt(model(x), y, new Float64Array(50).fill(1 / (sigma * sigma)), [2, 1, 0.4])
      values.push(r.params[1]!)
      reported += Math.sqrt(r.covariance[4]!) / 200
    }
    const mean = values.reduce((s, v) => s + v, 0) / values.length
    const sd = Math.sqrt(values.reduce((s, v) => s + (v - mean) ** 2, 0) / (values.length - 1))
    expect(Math.abs(sd / reported - 1)).toBeLessThan(0.2)
  })
  it('keeps parameters inside their bounds', () => {
    const y = Float64Array.from(x, (v) => 2.5 * Math.exp(-1.3 * v) + 0.5)
    const r = fitLevenbergMarquardt(model(x), y, new Float64Array(50).fill(1), [1, 0.2, 0], { upper: [Infinity, Infinity, 0.2] })
    expect(r.params[2]).toBeLessThanOrEqual(0.2)
  })
  it('refuses mismatched weights and more parameters than points', () => {
    const y = new Float64Array(2)
    expect(() => fitLevenbergMarquardt(model(x), y, new Float64Array(3), [1, 1, 1])).toThrow('weights have 3 values but the data have 2')
    expect(() => fitLevenbergMarquardt(model(x), y, new Float64Array(2), [1, 1, 1])).toThrow('2 data points cannot fix 3 parameters')
  })
})
