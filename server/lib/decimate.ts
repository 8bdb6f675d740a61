/**
 * Min–max decimation for plotting: keeps, per bucket, the pixels with the lowest and highest
 * value of `primary`, so absorption cores and emission peaks survive an overview.
 * Returns the kept pixel indices in ascending order.
 */
export function decimateMinMax(primary: ArrayLike<number>, from: number, to: number, maxPoints: number): Int32Array {
  const n = to - from
  if (n <= maxPoints) {
    const all = new Int32Array(Math.max(0, n))
    for (let i = 0; i < n; i++) all[i] = from + i
    return all
  }
  const buckets = Math.max(1, Math.floor(maxPoints / 2))
  const out: number[] = []
  for (let b = 0; b < buckets; b++) {
    const lo = from + Math.floor((b * n) / buckets)
    const hi = from + Math.floor(((b + 1) * n) / buckets)
    let iMin = lo
    let iMax = lo
    for (let i = lo; i < hi; i++) {
      const v = primary[i]!
      if (!(v >= primary[iMin]!)) iMin = i
      if (!(v <= primary[iMax]!)) iMax = i
    }
    if (iMin === iMax) out.push(iMin)
    else out.push(Math.min(iMin, iMax), Math.max(iMin, iMax))
  }
  return Int32Array.from(out)
}
