/**
 * χ² of a spectrum against standards with a free scale factor: for weights w, data f and
 * template t, χ²(a) = Σ w (f − a t)² is least at a = Σwft / Σwt², where
 * χ²_min = Σwf² − (Σwft)² / Σwt² (linear least squares in one parameter; Press et al.,
 * *Numerical Recipes*, 3rd ed., §15.4, from memory).
 */
import { solveLinearInPlace } from '../linear'

export interface ScaledChiSquare {
  chi2: number
  /** Best scale factor a. */
  scale: number
  /** Pixels used (finite template, positive weight). */
  pixels: number
}

/**
 * χ² with a free scale between `flux` and `template` over indices [from, to) of both arrays.
 * Pixels with zero weight or a non-finite template are left out.
 * @param weights 1/σ² per pixel; 0 to ignore a pixel
 * @returns χ² = Infinity and scale NaN when no pixel is usable or the template is zero there
 */
export function scaledChiSquare(flux: ArrayLike<number>, template: ArrayLike<number>, weights: ArrayLike<number>, from = 0, to = flux.length): ScaledChiSquare {
  let sff = 0
  let sft = 0
  let stt = 0
  let n = 0
  for (let i = from; i < to; i++) {
    const w = weights[i]!
    const t = template[i]!
    if (w <= 0 || t !== t) continue
    const f = flux[i]!
    sff += w * f * f
    sft += w * f * t
    stt += w * t * t
    n++
  }
  if (n === 0 || stt <= 0) return { chi2: Infinity, scale: Number.NaN, pixels: n }
  return { chi2: Math.max(0, sff - (sft * sft) / stt), scale: sft / stt, pixels: n }
}

/** Bounds on the line-depth factor b of {@link depthScaledChiSquareRows}. */
export const DEPTH_SCALE_BOUNDS: readonly [number, number] = [0.6, 1.4]

/**
 * χ² against every row of a row-major standards × `pixels` block for the model f ≈ a + b·t:
 * a free scale b of the line depths (1 − f = b(1 − t) when a + b = 1) and a free level a, by
 * weighted linear least squares in two parameters (normal equations, Press et al., §15.4, from
 * memory). The depth scale absorbs an overall line-strength mismatch between models and stars
 * (the model Balmer lines are too strong, templates/README.md; metallicity) so that line ratios
 * and shapes decide the type. b is held within {@link DEPTH_SCALE_BOUNDS} (a refitted at the
 * bound), so a weak-lined standard cannot be stretched into a strong-lined one.
 * Pixels with weight ≤ 0 are left out; a row with missing (NaN) pixels is summed over the
 * pixels it shares with the spectrum.
 * Writes χ², b and the pixel count per standard into the output arrays (no allocation after
 * the first call of a given size).
 */
export function depthScaledChiSquareRows(
  flux: Float64Array,
  weights: Float64Array,
  rows: Float32Array,
  pixels: number,
  from: number,
  to: number,
  chi2: Float64Array,
  scale: Float64Array,
  used: Float64Array,
): void {
  depthScaledChiSquareSelected(flux, weights, rows, pixels, from, to, identityList(chi2.length), chi2.length, chi2, scale, used)
}

/**
 * As {@link depthScaledChiSquareRows}, but only for the rows `list[0 … count)`; the other
 * entries of the output arrays are left as they are. Four rows are summed in one pass over the
 * spectrum, so each weight and flux value is loaded once for four standards (the loop is bound
 * by loads and by the latency of the running sums, not by arithmetic).
 * @param list row numbers into `rows`; @param count how many of them to use
 */
export function depthScaledChiSquareSelected(
  flux: Float64Array,
  weights: Float64Array,
  rows: Float32Array,
  pixels: number,
  from: number,
  to: number,
  list: Int32Array,
  count: number,
  chi2: Float64Array,
  scale: Float64Array,
  used: Float64Array,
): void {
  const width = to - from
  // Weight and flux set to 0 where a pixel is not used, so the inner loops need no branch.
  const wv = scratchWeights(width)
  const fv = scratchFlux(width)
  const sums = scratchSums
  let m = 0
  let S = 0
  let Sf = 0
  let Sff = 0
  for (let k = 0; k < width; k++) {
    const w = weights[from + k]!
    if (w > 0) {
      const f = flux[from + k]!
      wv[k] = w
      fv[k] = f
      S += w
      Sf += w * f
      Sff += w * f * f
      m++
    } else {
      wv[k] = 0
      fv[k] = 0
    }
  }
  sums[0] = S
  sums[1] = Sf
  sums[2] = Sff
  sums[3] = m
  let q = 0
  for (; q + 4 <= count; q += 4) {
    const r0 = list[q]!
    const r1 = list[q + 1]!
    const r2 = list[q + 2]!
    const r3 = list[q + 3]!
    const b0 = r0 * pixels + from
    const b1 = r1 * pixels + from
    const b2 = r2 * pixels + from
    const b3 = r3 * pixels + from
    let t0 = 0,
      ft0 = 0,
      tt0 = 0,
      t1 = 0,
      ft1 = 0,
      tt1 = 0,
      t2 = 0,
      ft2 = 0,
      tt2 = 0,
      t3 = 0,
      ft3 = 0,
      tt3 = 0
    for (let k = 0; k < width; k++) {
      const w = wv[k]!
      const f = fv[k]!
      const a0 = rows[b0 + k]!
      const a1 = rows[b1 + k]!
      const a2 = rows[b2 + k]!
      const a3 = rows[b3 + k]!
      let wt = w * a0
      t0 += wt
      ft0 += wt * f
      tt0 += wt * a0
      wt = w * a1
      t1 += wt
      ft1 += wt * f
      tt1 += wt * a1
      wt = w * a2
      t2 += wt
      ft2 += wt * f
      tt2 += wt * a2
      wt = w * a3
      t3 += wt
      ft3 += wt * f
      tt3 += wt * a3
    }
    solveRow(r0, t0, ft0, tt0, flux, weights, rows, pixels, from, to, chi2, scale, used)
    solveRow(r1, t1, ft1, tt1, flux, weights, rows, pixels, from, to, chi2, scale, used)
    solveRow(r2, t2, ft2, tt2, flux, weights, rows, pixels, from, to, chi2, scale, used)
    solveRow(r3, t3, ft3, tt3, flux, weights, rows, pixels, from, to, chi2, scale, used)
  }
  for (; q < count; q++) {
    const r = list[q]!
    const b = r * pixels + from
    let St = 0
    let Sft = 0
    let Stt = 0
    for (let k = 0; k < width; k++) {
      const t = rows[b + k]!
      const wt = wv[k]! * t
      St += wt
      Sft += wt * fv[k]!
      Stt += wt * t
    }
    solveRow(r, St, Sft, Stt, flux, weights, rows, pixels, from, to, chi2, scale, used)
  }
}

/** Spectrum sums S, Σwf, Σwf², pixel count of the last {@link depthScaledChiSquareSelected} call. */
const scratchSums = new Float64Array(4)

/** Solves the 2 × 2 normal equations of one row from its sums (spectrum sums in scratchSums). */
function solveRow(
  s: number,
  St: number,
  Sft: number,
  Stt: number,
  flux: Float64Array,
  weights: Float64Array,
  rows: Float32Array,
  pixels: number,
  from: number,
  to: number,
  chi2: Float64Array,
  scale: Float64Array,
  used: Float64Array,
): void {
  const S = scratchSums[0]!
  const Sf = scratchSums[1]!
  const Sff = scratchSums[2]!
  const m = scratchSums[3]!
  used[s] = m
  if (St !== St) {
    // Some template pixels are missing (observed standards with gaps): sum over the shared pixels.
    used[s] = scaledPair(flux, weights, rows, s * pixels, from, to, chi2, scale, s)
    return
  }
  const det = S * Stt - St * St
  if (m < 3 || !(det > 0)) {
    chi2[s] = Infinity
    scale[s] = Number.NaN
    return
  }
  let b = (S * Sft - St * Sf) / det
  if (b < DEPTH_SCALE_BOUNDS[0]) b = DEPTH_SCALE_BOUNDS[0]
  if (b > DEPTH_SCALE_BOUNDS[1]) b = DEPTH_SCALE_BOUNDS[1]
  const a = (Sf - b * St) / S
  chi2[s] = Math.max(0, Sff - 2 * a * Sf - 2 * b * Sft + a * a * S + 2 * a * b * St + b * b * Stt)
  scale[s] = b
}

let idBuf = new Int32Array(0)
let wBuf = new Float64Array(0)
let fBuf = new Float64Array(0)
function identityList(n: number): Int32Array {
  if (idBuf.length < n) {
    idBuf = new Int32Array(n)
    for (let i = 0; i < n; i++) idBuf[i] = i
  }
  return idBuf
}
const scratchWeights = (n: number) => (wBuf.length >= n ? wBuf : (wBuf = new Float64Array(n)))
const scratchFlux = (n: number) => (fBuf.length >= n ? fBuf : (fBuf = new Float64Array(n)))

function scaledPair(flux: Float64Array, weights: Float64Array, rows: Float32Array, base: number, from: number, to: number, chi2: Float64Array, scale: Float64Array, s: number): number {
  let S = 0
  let Sf = 0
  let Sff = 0
  let St = 0
  let Sft = 0
  let Stt = 0
  let n = 0
  for (let i = from; i < to; i++) {
    const w = weights[i]!
    const t = rows[base + i]!
    if (w <= 0 || t !== t) continue
    const f = flux[i]!
    n++
    S += w
    Sf += w * f
    Sff += w * f * f
    St += w * t
    Sft += w * f * t
    Stt += w * t * t
  }
  const det = S * Stt - St * St
  if (n < 3 || !(det > 0)) {
    chi2[s] = Infinity
    scale[s] = Number.NaN
    return n
  }
  const b = Math.min(DEPTH_SCALE_BOUNDS[1], Math.max(DEPTH_SCALE_BOUNDS[0], (S * Sft - St * Sf) / det))
  const a = (Sf - b * St) / S
  chi2[s] = Math.max(0, Sff - 2 * a * Sf - 2 * b * Sft + a * a * S + 2 * a * b * St + b * b * Stt)
  scale[s] = b
  return n
}

/**
 * Abscissa of the vertex of the parabola through three points (x₀ < x₁ < x₂ need not be evenly
 * spaced), clamped to [x₀, x₂]; x₁ when the points are collinear or the parabola opens downward.
 */
export function parabolaVertex(x0: number, y0: number, x1: number, y1: number, x2: number, y2: number): number {
  const d0 = (y1 - y0) / (x1 - x0)
  const d1 = (y2 - y1) / (x2 - x1)
  const curvature = (d1 - d0) / (x2 - x0)
  if (!(curvature > 0)) return x1
  // y = y₀ + d₀(x − x₀) + c(x − x₀)(x − x₁), so dy/dx = 0 at x = (x₀ + x₁)/2 − d₀/(2c).
  const vertex = (x0 + x1) / 2 - d0 / (2 * curvature)
  return Math.min(x2, Math.max(x0, vertex))
}

/** Result of {@link depthScaledPairChiSquare}. */
export interface PairChiSquare {
  chi2: number
  /** Fraction x of the second template in the mix (0 … 1). */
  fraction: number
  /** Depth scale b of the mix. */
  scale: number
}

/**
 * χ² of the model f ≈ a + b·((1 − x)·t₁ + x·t₂) over [from, to): a spectrum between two
 * standards, as a linear mix of their rectified spectra with a free level a and depth scale b
 * (weighted linear least squares in a, b(1 − x) and b·x, normal equations, Press et al.,
 * *Numerical Recipes*, 3rd ed., §15.4, from memory). x is held within [0, 1] and b within
 * {@link DEPTH_SCALE_BOUNDS}; when the free solution leaves them, the best of the constrained
 * edges is returned (x = 0 or 1 is the single-standard fit of {@link depthScaledChiSquareRows}).
 * Pixels with weight ≤ 0 or a non-finite template value are left out.
 * @param rows row-major block; @param row1, row2 the two rows; @param pixels row length
 * @returns χ² = Infinity when fewer than 4 pixels are usable or the system is singular
 */
export function depthScaledPairChiSquare(flux: Float64Array, weights: Float64Array, rows: Float32Array, pixels: number, row1: number, row2: number, from: number, to: number): PairChiSquare {
  const b1 = row1 * pixels
  const b2 = row2 * pixels
  let S = 0,
    Sf = 0,
    Sff = 0,
    S1 = 0,
    S2 = 0,
    Sf1 = 0,
    Sf2 = 0,
    S11 = 0,
    S22 = 0,
    S12 = 0
  let n = 0
  for (let i = from; i < to; i++) {
    const w = weights[i]!
    const t1 = rows[b1 + i]!
    const t2 = rows[b2 + i]!
    if (!(w > 0) || t1 !== t1 || t2 !== t2) continue
    const f = flux[i]!
    n++
    S += w
    Sf += w * f
    Sff += w * f * f
    S1 += w * t1
    S2 += w * t2
    Sf1 += w * f * t1
    Sf2 += w * f * t2
    S11 += w * t1 * t1
    S22 += w * t2 * t2
    S12 += w * t1 * t2
  }
  const none: PairChiSquare = { chi2: Infinity, fraction: Number.NaN, scale: Number.NaN }
  if (n < 4) return none
  // χ²(a, p, q) for f ≈ a + p·t₁ + q·t₂, from the sums.
  const chi = (a: number, p: number, q: number) => Math.max(0, Sff - 2 * (a * Sf + p * Sf1 + q * Sf2) + a * a * S + p * p * S11 + q * q * S22 + 2 * (a * p * S1 + a * q * S2 + p * q * S12))
  // Free solution of the 3 × 3 normal equations (Cramer's rule).
  const det3 = S * (S11 * S22 - S12 * S12) - S1 * (S1 * S22 - S12 * S2) + S2 * (S1 * S12 - S11 * S2)
  const [bMin, bMax] = DEPTH_SCALE_BOUNDS
  if (det3 > 0) {
    const a = (Sf * (S11 * S22 - S12 * S12) - S1 * (Sf1 * S22 - S12 * Sf2) + S2 * (Sf1 * S12 - S11 * Sf2)) / det3
    const p = (S * (Sf1 * S22 - S12 * Sf2) - Sf * (S1 * S22 - S12 * S2) + S2 * (S1 * Sf2 - Sf1 * S2)) / det3
    const q = (S * (S11 * Sf2 - Sf1 * S12) - S1 * (S1 * Sf2 - Sf1 * S2) + Sf * (S1 * S12 - S11 * S2)) / det3
    const b = p + q
    if (p >= 0 && q >= 0 && b >= bMin && b <= bMax) return { chi2: chi(a, p, q), fraction: q / b, scale: b }
  }
  // Constrained edges: b at a bound with x free, and x at 0 or 1 with b free; the least χ² wins.
  let best = none
  const consider = (a: number, b: number, x: number) => {
    const c = chi(a, b * (1 - x), b * x)
    if (c < best.chi2) best = { chi2: c, fraction: x, scale: b }
  }
  for (const b of [bMin, bMax]) {
    // f − b·t₁ ≈ a + y·(t₂ − t₁), y = b·x.
    const Sd = S2 - S1
    const Sdd = S22 - 2 * S12 + S11
    const Sgd = Sf2 - Sf1 - b * (S12 - S11)
    const Sg = Sf - b * S1
    const det = S * Sdd - Sd * Sd
    if (!(det > 0)) continue
    const y = (S * Sgd - Sd * Sg) / det
    const x = Math.min(1, Math.max(0, y / b))
    consider((Sg - b * x * Sd) / S, b, x)
  }
  for (const [St, Sft, Stt, x] of [
    [S1, Sf1, S11, 0],
    [S2, Sf2, S22, 1],
  ] as const) {
    const det = S * Stt - St * St
    if (!(det > 0)) continue
    const b = Math.min(bMax, Math.max(bMin, (S * Sft - St * Sf) / det))
    consider((Sf - b * St) / S, b, x)
  }
  return best
}

/** Result of {@link smoothPairChiSquare}. */
export interface SmoothPairChiSquare {
  chi2: number
  /** Fraction x of the second template in the mix (0 … 1). */
  fraction: number
}

/**
 * χ² of a mix of two templates with a level and a depth scale that vary smoothly across
 * [from, to): f ≈ c₀ + c₁X + c₂X² + (b₀ + b₁X)·((1 − x)t₁ + x t₂), X = 2(i − from)/(to − from) − 1
 * (weighted linear least squares in c and b for each x, normal equations, Press et al.,
 * *Numerical Recipes*, 3rd ed., §15.4, from memory). The smooth terms absorb the difference
 * between a continuum fitted to an observed spectrum and the model continuum of the standards,
 * which otherwise tilts the line depths across the region. The 7 × 7 moment matrix of
 * (1, X, X², t₁, X t₁, t₂ − t₁, X(t₂ − t₁)) is summed once; x is searched on a grid of
 * `steps` + 1 values and refined by a parabola through the best three.
 * Pixels with weight ≤ 0 or a non-finite template value are left out.
 * @param steps grid of the search in x @default 10
 * @returns χ² = Infinity when fewer than 8 pixels are usable
 */
export function smoothPairChiSquare(
  flux: Float64Array,
  weights: Float64Array,
  rows: Float32Array,
  pixels: number,
  row1: number,
  row2: number,
  from: number,
  to: number,
  steps = 10,
): SmoothPairChiSquare {
  if (smoothPairMoments(flux, weights, rows, pixels, row1, row2, from, to) < 8) return { chi2: Infinity, fraction: Number.NaN }
  const chiAt = smoothChiAt
  const values = new Float64Array(steps + 1)
  let bestK = 0
  let least = Infinity
  for (let k = 0; k <= steps; k++) {
    const v = chiAt(k / steps)
    values[k] = v
    if (v < least) {
      least = v
      bestK = k
    }
  }
  if (!Number.isFinite(least)) return { chi2: Infinity, fraction: Number.NaN }
  let x = bestK / steps
  if (bestK > 0 && bestK < steps) {
    x = parabolaVertex((bestK - 1) / steps, values[bestK - 1]!, x, least, (bestK + 1) / steps, values[bestK + 1]!)
  }
  const c = chiAt(x)
  return c <= least ? { chi2: c, fraction: x } : { chi2: least, fraction: bestK / steps }
}

/**
 * The moments of smoothPairChiSquare over [from, to) into smoothScratch.q; returns the pixels used.
 * A function of its own: optimised while in its loop (on-stack replacement), the code after the
 * loop had never run and lacked type feedback, and the whole of smoothPairChiSquare was thrown
 * away on leaving the loop, call after call.
 */
function smoothPairMoments(flux: Float64Array, weights: Float64Array, rows: Float32Array, pixels: number, row1: number, row2: number, from: number, to: number): number {
  // Moments in scalar locals: the loop then touches no array but the inputs.
  let m00 = 0,
    m01 = 0,
    m02 = 0,
    m03 = 0,
    m04 = 0,
    m05 = 0,
    m06 = 0,
    m11 = 0,
    m12 = 0,
    m13 = 0,
    m14 = 0,
    m15 = 0,
    m16 = 0,
    m22 = 0,
    m23 = 0,
    m24 = 0,
    m25 = 0,
    m26 = 0,
    m33 = 0,
    m34 = 0,
    m35 = 0,
    m36 = 0,
    m44 = 0,
    m45 = 0,
    m46 = 0,
    m55 = 0,
    m56 = 0,
    m66 = 0
  let h0 = 0,
    h1 = 0,
    h2 = 0,
    h3 = 0,
    h4 = 0,
    h5 = 0,
    h6 = 0
  let Sff = 0
  let n = 0
  const b1 = row1 * pixels
  const b2 = row2 * pixels
  const span = Math.max(1, to - from - 1)
  for (let i = from; i < to; i++) {
    const w = weights[i]!
    const t1 = rows[b1 + i]!
    const t2 = rows[b2 + i]!
    if (!(w > 0) || t1 !== t1 || t2 !== t2) continue
    const f = flux[i]!
    const X = (2 * (i - from)) / span - 1
    const d = t2 - t1
    const g1 = X
    const g2 = X * X
    const g3 = t1
    const g4 = X * t1
    const g5 = d
    const g6 = X * d
    const wf = w * f
    Sff += wf * f
    n++
    h0 += wf
    h1 += wf * g1
    h2 += wf * g2
    h3 += wf * g3
    h4 += wf * g4
    h5 += wf * g5
    h6 += wf * g6
    m00 += w
    m01 += w * g1
    m02 += w * g2
    m03 += w * g3
    m04 += w * g4
    m05 += w * g5
    m06 += w * g6
    const w1 = w * g1
    m11 += w1 * g1
    m12 += w1 * g2
    m13 += w1 * g3
    m14 += w1 * g4
    m15 += w1 * g5
    m16 += w1 * g6
    const w2 = w * g2
    m22 += w2 * g2
    m23 += w2 * g3
    m24 += w2 * g4
    m25 += w2 * g5
    m26 += w2 * g6
    const w3 = w * g3
    m33 += w3 * g3
    m34 += w3 * g4
    m35 += w3 * g5
    m36 += w3 * g6
    const w4 = w * g4
    m44 += w4 * g4
    m45 += w4 * g5
    m46 += w4 * g6
    const w5 = w * g5
    m55 += w5 * g5
    m56 += w5 * g6
    const w6 = w * g6
    m66 += w6 * g6
  }
  // The moments leave the loop through a scratch array: a closure over them would keep them out of registers.
  const q = smoothScratch.q
  q[0] = m00
  q[1] = m01
  q[2] = m02
  q[3] = m03
  q[4] = m04
  q[5] = m05
  q[6] = m06
  q[7] = m11
  q[8] = m12
  q[9] = m13
  q[10] = m14
  q[11] = m15
  q[12] = m16
  q[13] = m22
  q[14] = m23
  q[15] = m24
  q[16] = m25
  q[17] = m26
  q[18] = m33
  q[19] = m34
  q[20] = m35
  q[21] = m36
  q[22] = m44
  q[23] = m45
  q[24] = m46
  q[25] = m55
  q[26] = m56
  q[27] = m66
  q[28] = h0
  q[29] = h1
  q[30] = h2
  q[31] = h3
  q[32] = h4
  q[33] = h5
  q[34] = h6
  q[35] = Sff
  return n
}

/** χ² of smoothPairChiSquare at mixing fraction x, from the moments in smoothScratch.q. */
function smoothChiAt(x: number): number {
  const q = smoothScratch.q
  const M = smoothScratch.M
  const v = smoothScratch.v
  // Normal equations in the basis (1, X, X², t₁ + x d, X(t₁ + x d)), assembled from the moments.
  const x2 = x * x
  M[0] = q[0]!
  M[1] = q[1]!
  M[2] = q[2]!
  M[3] = q[3]! + x * q[5]!
  M[4] = q[4]! + x * q[6]!
  M[6] = q[7]!
  M[7] = q[8]!
  M[8] = q[9]! + x * q[11]!
  M[9] = q[10]! + x * q[12]!
  M[12] = q[13]!
  M[13] = q[14]! + x * q[16]!
  M[14] = q[15]! + x * q[17]!
  M[18] = q[18]! + 2 * x * q[20]! + x2 * q[25]!
  M[19] = q[19]! + x * (q[21]! + q[23]!) + x2 * q[26]!
  M[24] = q[22]! + 2 * x * q[24]! + x2 * q[27]!
  for (let r = 1; r < 5; r++) for (let c = 0; c < r; c++) M[r * 5 + c] = M[c * 5 + r]!
  v[0] = q[28]!
  v[1] = q[29]!
  v[2] = q[30]!
  v[3] = q[31]! + x * q[33]!
  v[4] = q[32]! + x * q[34]!
  const solution = solveSymmetric(M, v, 5)
  if (solution === null) return Infinity
  let fit = 0
  for (let r = 0; r < 5; r++) fit += solution[r]! * v[r]!
  return Math.max(0, q[35]! - fit)
}

/** Solves M c = v (n ≤ 5) without touching M or v; null when singular. The solution is a scratch array, valid until the next call. */
function solveSymmetric(M: Float64Array, v: Float64Array, n: number): Float64Array | null {
  const a = smoothScratch.a
  a.set(M)
  return solveLinearInPlace(a, v, smoothScratch.out, n, 1e-300) ? smoothScratch.out : null
}

/** Scratch of smoothPairChiSquare and its 5 × 5 solver (one spectrum at a time per thread). */
const smoothScratch = {
  q: new Float64Array(36),
  M: new Float64Array(25),
  v: new Float64Array(5),
  a: new Float64Array(25),
  out: new Float64Array(5),
}
