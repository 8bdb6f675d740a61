import { LUMINOSITY_CLASSES } from './mk'

/**
 * Agreement between classifiers: Cohen's κ (plain and weighted), Fleiss' κ, exact and
 * within-±k agreement, and the mean signed offset. Pure functions on numeric ratings
 * (spectral-type codes, luminosity-class codes, or any category labels written as numbers).
 */

/** Weighting of disagreements in {@link weightedKappa} (Cohen 1968). */
export type KappaWeights = 'linear' | 'quadratic'

/** Options of the two-rater κ statistics. */
export interface KappaOptions {
  /**
   * The categories, in ordinal order. Categories no rating uses still count for the weights.
   * @default the sorted distinct values of both rating lists
   */
  categories?: readonly number[]
}

function checkPair(a: readonly number[], b: readonly number[]): void {
  if (a.length !== b.length) throw new RangeError(`ratings differ in length: ${a.length} vs ${b.length}`)
  if (a.length === 0) throw new RangeError('no ratings')
  for (let i = 0; i < a.length; i++) {
    if (!Number.isFinite(a[i]!) || !Number.isFinite(b[i]!)) throw new RangeError(`rating ${i} is not a finite number`)
  }
}

function categoriesOf(a: readonly number[], b: readonly number[], given?: readonly number[]): number[] {
  if (given !== undefined) {
    const sorted = [...given].sort((x, y) => x - y)
    for (let i = 1; i < sorted.length; i++) if (sorted[i] === sorted[i - 1]) throw new RangeError(`category ${sorted[i]} is listed twice`)
    const known = new Set(sorted)
    for (const list of [a, b]) for (const x of list) if (!known.has(x)) throw new RangeError(`rating ${x} is not one of the categories`)
    return sorted
  }
  const seen = new Set(a)
  for (const x of b) seen.add(x)
  return [...seen].sort((x, y) => x - y)
}

/**
 * The k × k table of counts: row = category of the first rater, column = category of the second.
 * @returns `{ categories, counts }` with `counts[i][j]` the number of items rated `categories[i]` by
 *   the first rater and `categories[j]` by the second.
 */
export function confusionMatrix(a: readonly number[], b: readonly number[], options: KappaOptions = {}): { categories: number[]; counts: number[][] } {
  checkPair(a, b)
  const categories = categoriesOf(a, b, options.categories)
  const index = new Map(categories.map((c, i) => [c, i]))
  const counts = categories.map(() => categories.map(() => 0))
  for (let n = 0; n < a.length; n++) counts[index.get(a[n]!)!]![index.get(b[n]!)!]! += 1
  return { categories, counts }
}

/**
 * κ with disagreement weights w[i][j] (0 on the diagonal): κ = 1 − Σ w·observed / Σ w·expected,
 * expected from the product of the two raters' marginals (Cohen 1968, Psychol. Bull. 70, 213).
 */
function kappaWithWeights(counts: number[][], weight: (i: number, j: number) => number): number {
  const k = counts.length
  let total = 0
  const rows = new Array<number>(k).fill(0)
  const cols = new Array<number>(k).fill(0)
  for (let i = 0; i < k; i++) {
    for (let j = 0; j < k; j++) {
      const c = counts[i]![j]!
      total += c
      rows[i]! += c
      cols[j]! += c
    }
  }
  let observed = 0
  let expected = 0
  for (let i = 0; i < k; i++) {
    for (let j = 0; j < k; j++) {
      const w = weight(i, j)
      observed += (w * counts[i]![j]!) / total
      expected += (w * rows[i]! * cols[j]!) / (total * total)
    }
  }
  // Both raters put everything in one category: κ is undefined (0/0).
  if (expected === 0) return Number.NaN
  return 1 - observed / expected
}

/**
 * Cohen's κ for two raters (Cohen 1960, Educ. Psychol. Meas. 20, 37): κ = (p_o − p_e)/(1 − p_e),
 * p_o the observed fraction of agreement, p_e the agreement expected from the raters' marginals.
 * @returns κ (dimensionless, ≤ 1), or NaN when both raters use a single category (p_e = 1).
 * @throws RangeError "ratings differ in length: A vs B", "no ratings", "rating N is not a finite number"
 */
export function cohenKappa(a: readonly number[], b: readonly number[], options: KappaOptions = {}): number {
  const { counts } = confusionMatrix(a, b, options)
  return kappaWithWeights(counts, (i, j) => (i === j ? 0 : 1))
}

/**
 * Weighted κ for ordinal categories (Cohen 1968): disagreements weigh |i − j| (linear) or
 * (i − j)² (quadratic), with i, j the ranks of the categories in their sorted order — as in
 * Cohen (1968) and scikit-learn's `cohen_kappa_score` — not the numeric distance of the values.
 * Pass `categories` so that a category nobody used still counts as a step.
 * @default options.categories the sorted distinct values of both rating lists
 * @returns κ_w (dimensionless, ≤ 1), or NaN when both raters use a single category.
 */
export function weightedKappa(a: readonly number[], b: readonly number[], weights: KappaWeights, options: KappaOptions = {}): number {
  return weightedKappaOfCounts(confusionMatrix(a, b, options).counts, weights)
}

/** {@link weightedKappa} from a confusion matrix already counted (one table serves both weightings). */
export function weightedKappaOfCounts(counts: number[][], weights: KappaWeights): number {
  return kappaWithWeights(counts, weights === 'linear' ? (i, j) => Math.abs(i - j) : (i, j) => (i - j) * (i - j))
}

/**
 * Fleiss' κ for many raters (Fleiss 1971, Psychol. Bull. 76, 378): each item is rated by the same
 * number n ≥ 2 of raters; `counts[item][category]` is how many raters put the item in that
 * category. κ = (P̄ − P̄_e)/(1 − P̄_e), P̄ the mean pairwise agreement per item and P̄_e = Σ p_j²
 * from the overall category fractions p_j.
 * @returns κ (dimensionless, ≤ 1), or NaN when every rating falls in one category.
 * @throws RangeError "no items", "item N has M ratings, item 0 has K", "fewer than two raters per item",
 *   "item N has a negative or fractional count"
 */
export function fleissKappa(counts: readonly (readonly number[])[]): number {
  if (counts.length === 0) throw new RangeError('no items')
  const first = counts[0]!
  const k = first.length
  const n = first.reduce((s, x) => s + x, 0)
  if (n < 2) throw new RangeError('fewer than two raters per item')
  const totals = new Array<number>(k).fill(0)
  let sumP = 0
  counts.forEach((row, item) => {
    if (row.length !== k) throw new RangeError(`item ${item} has ${row.length} categories, item 0 has ${k}`)
    let m = 0
    let pairs = 0
    row.forEach((c, j) => {
      if (!Number.isInteger(c) || c < 0) throw new RangeError(`item ${item} has a negative or fractional count`)
      m += c
      pairs += c * (c - 1)
      totals[j]! += c
    })
    if (m !== n) throw new RangeError(`item ${item} has ${m} ratings, item 0 has ${n}`)
    sumP += pairs / (n * (n - 1))
  })
  const N = counts.length
  const pBar = sumP / N
  let pe = 0
  for (const t of totals) pe += (t / (N * n)) ** 2
  if (pe === 1) return Number.NaN
  return (pBar - pe) / (1 - pe)
}

/**
 * Fraction of items on which two raters agree to within ±`tolerance` (in the units of the ratings,
 * e.g. subtypes for type codes): |a_i − b_i| ≤ tolerance. A tolerance of 0 gives exact agreement.
 * @default tolerance 0
 */
export function agreementFraction(a: readonly number[], b: readonly number[], tolerance = 0): number {
  checkPair(a, b)
  if (!(tolerance >= 0)) throw new RangeError(`tolerance must be ≥ 0, got ${tolerance}`)
  let n = 0
  for (let i = 0; i < a.length; i++) if (codesWithin(a[i]!, b[i]!, tolerance)) n++
  return n / a.length
}

/** Whether two codes differ by at most `tolerance`, as {@link agreementFraction} counts one pair. */
export function codesWithin(a: number, b: number, tolerance: number): boolean {
  // A small allowance keeps ±0.5 from failing on codes such as 51.5 − 51.0 computed in binary.
  return Math.abs(a - b) <= tolerance + 1e-9
}

/**
 * Share of items whose luminosity-class codes agree as the MK system reads intermediate classes:
 * equal, or one is an intermediate class (such as IV-V, code 5.5) and the other is one of its two
 * ends (IV or V). Common practice; the accuracy benchmark scores classes the same way.
 */
export function classAgreementFraction(a: readonly number[], b: readonly number[]): number {
  checkPair(a, b)
  let n = 0
  for (let i = 0; i < a.length; i++) if (classesAgree(a[i]!, b[i]!)) n++
  return n / a.length
}

/** Whether two class codes agree: equal, or an intermediate class and one of its ends. */
export function classesAgree(a: number, b: number): boolean {
  if (Math.abs(a - b) < 1e-9) return true
  const ends = (x: number): [number, number] | null => {
    if (LUMINOSITY_CLASSES.some((c) => Math.abs(c.code - x) < 1e-9)) return null
    const below = LUMINOSITY_CLASSES.filter((c) => c.code < x).at(-1)
    const above = LUMINOSITY_CLASSES.find((c) => c.code > x)
    return below && above ? [below.code, above.code] : null
  }
  const isEnd = (x: number, y: number) => ends(x)?.some((e) => Math.abs(e - y) < 1e-9) ?? false
  return isEnd(a, b) || isEnd(b, a)
}

/**
 * The two class lists with every pair that agrees through an intermediate class (IV-V against V)
 * given the same value, the end both name, so that κ reads classes as `classAgreementFraction` does;
 * pairs that differ otherwise, and equal pairs, are left as they are.
 */
export function reconcileClasses(a: readonly number[], b: readonly number[]): { a: number[]; b: number[] } {
  checkPair(a, b)
  const ra = [...a]
  const rb = [...b]
  for (let i = 0; i < ra.length; i++) {
    if (ra[i] === rb[i] || !classesAgree(ra[i]!, rb[i]!)) continue
    // The end is the code that is a class of its own.
    const end = LUMINOSITY_CLASSES.some((c) => Math.abs(c.code - ra[i]!) < 1e-9) ? ra[i]! : rb[i]!
    ra[i] = end
    rb[i] = end
  }
  return { a: ra, b: rb }
}

/** Mean signed offset of the first rater from the second, mean(a_i − b_i), in the units of the ratings. */
export function meanOffset(a: readonly number[], b: readonly number[]): number {
  checkPair(a, b)
  let s = 0
  for (let i = 0; i < a.length; i++) s += a[i]! - b[i]!
  return s / a.length
}
