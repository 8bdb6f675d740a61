// Selection against the plain sort it replaces (Float64Array.prototype.sort, the reference here).
import { describe, expect, it } from 'vitest'
import { seededRandom as random } from '../../../helpers/random'
import { SortedWindow, kthSmallest, medianInPlace } from '../../../../server/spectra/prepare/stats'

describe('kthSmallest', () => {
  it('gives what a full sort puts at every index, with ties and signed zeros', () => {
    const next = random(7)
    for (let trial = 0; trial < 200; trial++) {
      const n = 1 + Math.floor(next() * 40)
      const values = Float64Array.from({ length: n }, () => {
        const r = next()
        return r < 0.15 ? 0 : r < 0.3 ? -0 : Math.round((next() - 0.5) * 10) / 2
      })
      const sorted = values.slice().sort()
      for (let k = 0; k < n; k++) expect(Object.is(kthSmallest(values.slice(), k), sorted[k]), `n ${n}, k ${k}`).toBe(true)
    }
  })
})

describe('medianInPlace', () => {
  it('gives the sorted middle, or the mean of the two middles for even counts (as numpy.median; common practice)', () => {
    expect(medianInPlace(Float64Array.from([5, 1, 3]), 3)).toBe(3)
    expect(medianInPlace(Float64Array.from([4, 1, 3, 2]), 4)).toBe(2.5)
    expect(medianInPlace(Float64Array.from([9, 9, 1, 7, 7, 0]), 6)).toBe(7)
    expect(Number.isNaN(medianInPlace(new Float64Array(0), 0))).toBe(true)
  })
})

describe('SortedWindow', () => {
  it('holds what a sort of the current values holds, at every index, as values come and go (ties and signed zeros)', () => {
    const next = random(11)
    const window = new SortedWindow(2)
    const held: number[] = []
    for (let step = 0; step < 1500; step++) {
      if (held.length > 0 && next() < 0.45) {
        const [v] = held.splice(Math.floor(next() * held.length), 1)
        window.remove(v!)
      } else {
        const r = next()
        const v = r < 0.15 ? 0 : r < 0.3 ? -0 : Math.round((next() - 0.5) * 10) / 2
        held.push(v)
        window.add(v)
      }
      const sorted = Float64Array.from(held).sort()
      expect(window.size).toBe(held.length)
      const differing = [...sorted].findIndex((v, k) => !Object.is(window.kth(k), v))
      expect(differing, `step ${step}`).toBe(-1)
    }
  })
})
