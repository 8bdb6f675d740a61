// The running median that the not-a-star check subtracts, against its plain definition: at every
// tenth pixel, the sorted middle of the finite values at every third pixel within ±halfWidth Å.
import { describe, expect, it } from 'vitest'
import { seededRandom as random } from '../../helpers/random'
import { subtractRunningMedian } from '../../../server/spectra/pipeline'

describe('subtractRunningMedian', () => {
  it('takes 1 + value − the window median at each anchor pixel, across NaN gaps and uneven windows', () => {
    const next = random(5)
    for (let trial = 0; trial < 30; trial++) {
      const n = 100 + Math.floor(next() * 3000)
      const wavelength = new Float64Array(n)
      for (let i = 0, x = 3800; i < n; i++, x *= 1 + (0.2 + next() * 0.3) / 5000) wavelength[i] = x
      const values = Float64Array.from({ length: n }, () => (next() < 0.1 ? Number.NaN : next() - 0.5))
      const gap = Math.floor(next() * n)
      for (let i = gap; i < Math.min(n, gap + n / 4); i++) values[i] = Number.NaN
      const halfWidth = [20, 150][trial % 2]!
      const out = subtractRunningMedian(values, wavelength, halfWidth)
      for (let i = 0; i < n; i += 10) {
        if (!Number.isFinite(values[i]!)) continue
        const window: number[] = []
        for (let j = i % 3; j < n; j += 3) if (Math.abs(wavelength[j]! - wavelength[i]!) <= halfWidth && Number.isFinite(values[j]!)) window.push(values[j]!)
        const median = Float64Array.from(window).sort()[window.length >> 1]!
        expect(out[i]).toBeCloseTo(1 + values[i]! - median, 12)
      }
      for (let i = 0; i < n; i++) if (!Number.isFinite(values[i]!)) expect(out[i]).toBeNaN()
    }
  })
})
