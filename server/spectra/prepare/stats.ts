const ascending = (a: number, b: number) => a < b

/**
 * First index i < n with values[i] not before x in an array ascending by `before` (binary search);
 * n when there is none. By default the whole array and plain `<`.
 */
export function lowerBound(values: ArrayLike<number>, x: number, n = values.length, before = ascending): number {
  let lo = 0
  let hi = n
  while (lo < hi) {
    const mid = (lo + hi) >>> 1
    if (before(values[mid]!, x)) lo = mid + 1
    else hi = mid
  }
  return lo
}

/**
 * Median of the first n values of a scratch array, by quickselect (Hoare). Reorders the scratch
 * array in place; no allocation. For even n the mean of the two middle values, as numpy does.
 */
export function medianInPlace(values: Float64Array, n: number): number {
  if (n <= 0) return Number.NaN
  const upper = select(values, n, n >> 1)
  if (n % 2 === 1) return upper
  // Lower middle: the largest value left of the upper middle after selection.
  let lower = -Infinity
  for (let i = 0; i < n >> 1; i++) if (values[i]! > lower) lower = values[i]!
  return (lower + upper) / 2
}

function select(a: Float64Array, n: number, k: number): number {
  let lo = 0
  let hi = n - 1
  while (lo < hi) {
    const pivot = a[(lo + hi) >> 1]!
    let i = lo
    let j = hi
    while (i <= j) {
      while (a[i]! < pivot) i++
      while (a[j]! > pivot) j--
      if (i <= j) {
        const t = a[i]!
        a[i] = a[j]!
        a[j] = t
        i++
        j--
      }
    }
    if (k <= j) hi = j
    else if (k >= i) lo = i
    else return a[k]!
  }
  return a[k]!
}

/**
 * The value a full ascending sort puts at index k (0-based), found by selection (select):
 * linear rather than n log n time. Reorders `a`. NaN must not occur. A typed-array sort puts −0
 * before +0; selection sees them as equal, so a zero result is given the sign the sort would have
 * left at k.
 */
export function kthSmallest(a: Float64Array, k: number): number {
  const v = select(a, a.length, k)
  if (v !== 0) return v
  let below = 0
  let negativeZeros = 0
  for (let i = 0; i < a.length; i++) {
    if (a[i]! < 0) below++
    else if (a[i] === 0 && Object.is(a[i], -0)) negativeZeros++
  }
  return k - below < negativeZeros ? -0 : 0
}

/**
 * A multiset of finite numbers kept in ascending order (as a typed-array sort orders them, −0
 * before +0), for medians of a sliding window: each step adds and removes a few values instead of
 * selecting over the whole window again.
 */
export class SortedWindow {
  private values: Float64Array
  size = 0

  constructor(capacity = 64) {
    this.values = new Float64Array(Math.max(1, capacity))
  }

  add(v: number): void {
    if (this.size === this.values.length) {
      const grown = new Float64Array(this.values.length * 2)
      grown.set(this.values)
      this.values = grown
    }
    const at = this.position(v)
    this.values.copyWithin(at + 1, at, this.size)
    this.values[at] = v
    this.size++
  }

  /** Removes one copy of v, which must be present. */
  remove(v: number): void {
    const at = this.position(v)
    this.values.copyWithin(at, at + 1, this.size)
    this.size--
  }

  /**
   * lowerBound in sort order (−0 before +0), the comparison written out: every value entering or leaving a window
   * passes here, and a comparator passed in is a call per step that V8 does not inline.
   */
  private position(v: number): number {
    const values = this.values
    const positiveZero = v === 0 && !Object.is(v, -0)
    let lo = 0
    let hi = this.size
    while (lo < hi) {
      const mid = (lo + hi) >>> 1
      const x = values[mid]!
      if (x < v || (positiveZero && x === 0 && Object.is(x, -0))) lo = mid + 1
      else hi = mid
    }
    return lo
  }

  /** The value a sort puts at index k. */
  kth(k: number): number {
    return this.values[k]!
  }
}
