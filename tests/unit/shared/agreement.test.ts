import { readFileSync } from 'node:fs'
import { fileURLToPath } from 'node:url'
import { describe, expect, it } from 'vitest'
import {
  agreementFraction,
  classAgreementFraction,
  classesAgree,
  cohenKappa,
  confusionMatrix,
  fleissKappa,
  meanOffset,
  reconcileClasses,
  weightedKappa,
  weightedKappaOfCounts,
} from '../../../shared/agreement'

// Textbook worked example (from memory, a common textbook example, as in the project's reference
// sheet): 50 items, 20 yes–yes, 5 yes–no, 10 no–yes, 15 no–no → p_o = 0.70, p_e = 0.50, κ = 0.40.
const yesNoA = [...Array(25).fill(1), ...Array(25).fill(0)] as number[]
const yesNoB = [...Array(20).fill(1), ...Array(5).fill(0), ...Array(10).fill(1), ...Array(15).fill(0)] as number[]

interface SklearnCase {
  name: string
  a: number[]
  b: number[]
  labels: number[]
  unweighted: number
  linear: number
  quadratic: number
}
// Made by tests/reference/kappa_sklearn.py with Debian's scikit-learn (version inside the file).
const sklearn = JSON.parse(readFileSync(fileURLToPath(new URL('../../reference/out/kappa_sklearn.json', import.meta.url)), 'utf8')) as { sklearn_version: string; cases: SklearnCase[] }

describe('confusionMatrix', () => {
  it('counts the textbook table with rows for the first rater', () => {
    expect(confusionMatrix(yesNoA, yesNoB)).toEqual({
      categories: [0, 1],
      counts: [
        [15, 10],
        [5, 20],
      ],
    })
  })
  it('keeps categories nobody used when they are given', () => {
    expect(confusionMatrix([1, 3], [1, 3], { categories: [1, 2, 3] }).counts).toEqual([
      [1, 0, 0],
      [0, 0, 0],
      [0, 0, 1],
    ])
  })
  it('refuses a rating outside the given categories', () => {
    expect(() => confusionMatrix([1, 4], [1, 3], { categories: [1, 2, 3] })).toThrow('rating 4 is not one of the categories')
  })
  it('refuses a category listed twice', () => {
    expect(() => confusionMatrix([1], [1], { categories: [1, 1] })).toThrow('category 1 is listed twice')
  })
})

describe('cohenKappa', () => {
  it('gives κ = 0.40 on the textbook yes/no example (from memory)', () => {
    expect(cohenKappa(yesNoA, yesNoB)).toBeCloseTo(0.4, 12)
  })
  it('gives 1 for perfect agreement', () => {
    expect(cohenKappa([1, 2, 3, 2], [1, 2, 3, 2])).toBe(1)
  })
  it('is NaN when both raters use one category only (p_e = 1)', () => {
    expect(cohenKappa([2, 2, 2], [2, 2, 2])).toBeNaN()
  })
  it('refuses ratings of different lengths', () => {
    expect(() => cohenKappa([1, 2], [1])).toThrow('ratings differ in length: 2 vs 1')
  })
  it('refuses empty ratings', () => {
    expect(() => cohenKappa([], [])).toThrow('no ratings')
  })
  it('refuses NaN ratings', () => {
    expect(() => cohenKappa([1, Number.NaN], [1, 2])).toThrow('rating 1 is not a finite number')
  })
  it(`matches scikit-learn ${sklearn.sklearn_version} cohen_kappa_score to 1e-12 on every reference case`, () => {
    expect(sklearn.cases.length).toBeGreaterThanOrEqual(6)
    for (const c of sklearn.cases) expect(Math.abs(cohenKappa(c.a, c.b) - c.unweighted), c.name).toBeLessThan(1e-12)
  })
})

describe('weightedKappa', () => {
  it('equals the plain κ for two categories, with either weighting', () => {
    expect(weightedKappa(yesNoA, yesNoB, 'linear')).toBeCloseTo(0.4, 12)
    expect(weightedKappa(yesNoA, yesNoB, 'quadratic')).toBeCloseTo(0.4, 12)
  })
  it(`matches scikit-learn ${sklearn.sklearn_version} with linear weights to 1e-12`, () => {
    for (const c of sklearn.cases) {
      expect(Math.abs(weightedKappa(c.a, c.b, 'linear', { categories: c.labels }) - c.linear), c.name).toBeLessThan(1e-12)
    }
  })
  it(`matches scikit-learn ${sklearn.sklearn_version} with quadratic weights to 1e-12`, () => {
    for (const c of sklearn.cases) {
      expect(Math.abs(weightedKappa(c.a, c.b, 'quadratic', { categories: c.labels }) - c.quadratic), c.name).toBeLessThan(1e-12)
    }
  })
  it('gives the same scikit-learn values from a confusion matrix counted once for both weightings', () => {
    for (const c of sklearn.cases) {
      const { counts } = confusionMatrix(c.a, c.b, { categories: c.labels })
      expect(Math.abs(weightedKappaOfCounts(counts, 'linear') - c.linear), c.name).toBeLessThan(1e-12)
      expect(Math.abs(weightedKappaOfCounts(counts, 'quadratic') - c.quadratic), c.name).toBeLessThan(1e-12)
    }
  })
  it('weighs near misses less than far ones', () => {
    const truth = [1, 2, 3, 4, 5, 1, 2, 3, 4, 5]
    const near = [2, 2, 3, 4, 4, 1, 3, 3, 4, 5]
    const far = [5, 2, 3, 4, 1, 1, 5, 3, 4, 5]
    expect(cohenKappa(truth, near)).toBeCloseTo(cohenKappa(truth, far), 12)
    expect(weightedKappa(truth, near, 'quadratic')).toBeGreaterThan(weightedKappa(truth, far, 'quadratic'))
  })
})

describe('fleissKappa', () => {
  // Worked example of the Wikipedia article on Fleiss' kappa (from memory): 10 items, 14 raters,
  // 5 categories; P̄ = 0.378, P̄_e = 0.213, κ = 0.210. Fleiss's own 1971 table (30 patients,
  // 6 psychiatrists, κ ≈ 0.43) is not reproduced here: its counts are not at hand.
  const table = [
    [0, 0, 0, 0, 14],
    [0, 2, 6, 4, 2],
    [0, 0, 3, 5, 6],
    [0, 3, 9, 2, 0],
    [2, 2, 8, 1, 1],
    [7, 7, 0, 0, 0],
    [3, 2, 6, 3, 0],
    [2, 5, 3, 2, 2],
    [6, 5, 2, 1, 0],
    [0, 2, 2, 3, 7],
  ]
  it('gives κ = 0.210 on the 10-item, 14-rater worked example (from memory, to 0.001)', () => {
    expect(Math.abs(fleissKappa(table) - 0.21)).toBeLessThan(0.001)
  })
  it("equals Scott's π for two raters (0.195/0.495 on the textbook table, computed here)", () => {
    // Pooled marginals 0.55/0.45 → p_e = 0.505; p_o = 0.70 → π = 0.195/0.495.
    const rows = yesNoA.map((x, i) => {
      const y = yesNoB[i]!
      return [Number(x === 0) + Number(y === 0), Number(x === 1) + Number(y === 1)]
    })
    expect(fleissKappa(rows)).toBeCloseTo(0.195 / 0.495, 12)
  })
  it('gives 1 when all raters agree on every item', () => {
    expect(
      fleissKappa([
        [3, 0],
        [0, 3],
        [3, 0],
      ]),
    ).toBe(1)
  })
  it('is NaN when every rating falls in one category', () => {
    expect(
      fleissKappa([
        [3, 0],
        [3, 0],
      ]),
    ).toBeNaN()
  })
  it('refuses items with different numbers of raters', () => {
    expect(() =>
      fleissKappa([
        [2, 1],
        [1, 1],
      ]),
    ).toThrow('item 1 has 2 ratings, item 0 has 3')
  })
  it('refuses a single rater', () => {
    expect(() => fleissKappa([[1, 0]])).toThrow('fewer than two raters per item')
  })
  it('refuses an empty table', () => {
    expect(() => fleissKappa([])).toThrow('no items')
  })
  it('refuses fractional counts', () => {
    expect(() => fleissKappa([[1.5, 0.5]])).toThrow('item 0 has a negative or fractional count')
  })
})

describe('agreementFraction', () => {
  const a = [40, 41, 42, 45, 51.5]
  const b = [40, 42, 44, 45, 51]
  it('counts exact agreement by default', () => {
    expect(agreementFraction(a, b)).toBe(0.4)
  })
  it('counts agreement within ±1 subtype', () => {
    expect(agreementFraction(a, b, 1)).toBe(0.8)
  })
  it('counts a half-subtype difference as within ±0.5', () => {
    expect(agreementFraction([51.5], [51], 0.5)).toBe(1)
  })
  it('refuses a negative tolerance', () => {
    expect(() => agreementFraction(a, b, -1)).toThrow('tolerance must be ≥ 0, got -1')
  })
})

describe('classAgreementFraction', () => {
  // MK notation (common practice): IV-V lies between IV and V, so a call of IV or of V agrees
  // exactly with it; Iab is a class of its own, not an intermediate of Ia and Ib. Codes: shared/mk.ts.
  it('counts an intermediate class and either of its ends as the same class', () => {
    expect(classesAgree(5.5, 5)).toBe(true)
    expect(classesAgree(6, 5.5)).toBe(true)
    expect(classesAgree(3.5, 4)).toBe(true)
  })
  it('does not stretch a class to its neighbours, nor one intermediate to another', () => {
    expect(classesAgree(5, 6)).toBe(false)
    expect(classesAgree(5.5, 4)).toBe(false)
    expect(classesAgree(5.5, 4.5)).toBe(false)
    expect(classesAgree(1.5, 1)).toBe(false)
    expect(classesAgree(1.5, 2)).toBe(false)
  })
  it('gives the share of agreeing pairs', () => {
    expect(classAgreementFraction([5.5, 4, 6, 3], [5, 4, 5, 3.5])).toBe(0.75)
  })
})

describe('reconcileClasses', () => {
  it('gives a pair that agrees through an intermediate class the end both name, and leaves the rest', () => {
    // IV-V (5.5) with V, III with III-IV (4.5): agree; III-IV with V and IV-V with III-IV: do not.
    expect(reconcileClasses([5.5, 4, 4.5, 5.5, 2], [5, 4.5, 6, 4.5, 2])).toEqual({ a: [5, 4, 4.5, 5.5, 2], b: [5, 4, 6, 4.5, 2] })
  })
  it("lets Cohen's κ agree with the exact-class share", () => {
    // Every pair agrees as the MK system reads classes, and both raters use two classes: κ = 1.
    const r = reconcileClasses([5.5, 5.5, 4, 4], [5, 6, 4.5, 4])
    expect(classAgreementFraction(r.a, r.b)).toBe(1)
    expect(cohenKappa(r.a, r.b)).toBe(1)
  })
  it('refuses ratings of different lengths', () => {
    expect(() => reconcileClasses([5], [5, 6])).toThrow('ratings differ in length: 1 vs 2')
  })
})

describe('meanOffset', () => {
  it('gives the mean of first minus second', () => {
    expect(meanOffset([40, 41, 42, 45], [40, 42, 44, 45])).toBe(-0.75)
  })
  it('refuses ratings of different lengths', () => {
    expect(() => meanOffset([1], [1, 2])).toThrow('ratings differ in length: 1 vs 2')
  })
})
