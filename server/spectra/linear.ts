/**
 * Solves the small dense system m·x = rhs (n × n, row-major) by Gaussian elimination with partial
 * pivoting, the textbook method (e.g. Press et al., Numerical Recipes, §2.2). Overwrites `m`, leaves
 * `rhs` alone and writes the solution into `x`; allocates nothing, so fits can call it per iteration.
 * @param minPivot a pivot at or below this magnitude (or non-finite) counts as singular @default 0
 * @returns false when the system is singular (then `x` holds no solution)
 */
export function solveLinearInPlace(m: Float64Array, rhs: Float64Array, x: Float64Array, n: number, minPivot = 0): boolean {
  for (let i = 0; i < n; i++) x[i] = rhs[i]!
  for (let c = 0; c < n; c++) {
    let pivot = c
    for (let r = c + 1; r < n; r++) if (Math.abs(m[r * n + c]!) > Math.abs(m[pivot * n + c]!)) pivot = r
    const pv = m[pivot * n + c]!
    if (!(Math.abs(pv) > minPivot) || !Number.isFinite(pv)) return false
    if (pivot !== c) {
      for (let k = 0; k < n; k++) {
        const t = m[c * n + k]!
        m[c * n + k] = m[pivot * n + k]!
        m[pivot * n + k] = t
      }
      const t = x[c]!
      x[c] = x[pivot]!
      x[pivot] = t
    }
    for (let r = c + 1; r < n; r++) {
      const f = m[r * n + c]! / m[c * n + c]!
      if (f === 0) continue
      for (let k = c; k < n; k++) m[r * n + k] = m[r * n + k]! - f * m[c * n + k]!
      x[r] = x[r]! - f * x[c]!
    }
  }
  for (let r = n - 1; r >= 0; r--) {
    let s = x[r]!
    for (let k = r + 1; k < n; k++) s -= m[r * n + k]! * x[k]!
    x[r] = s / m[r * n + r]!
  }
  return true
}
