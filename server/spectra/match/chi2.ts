/**
 * χ² of a spectrum against standards with a free scale factor: for weights w, data f and
 * template t, χ²(a) = Σ w (f − a t)² is least at a = Σwft / Σwt², where
 * χ²_min = Σwf² − (Σwft)² / Σwt² (linear least squares in one parameter; Press et al.,
 * *Numerical Recipes*, 3rd ed., §15.4, from memory).
 */

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
export function scaledChiSquare(
  flux: ArrayLike<number>,
  template: ArrayLike<number>,
  weights: ArrayLike<number>,
  from = 0,
  to = flux.length,
): ScaledChiSquare {
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
    let t0 = 0, ft0 = 0, tt0 = 0, t1 = 0, ft1 = 0, tt1 = 0, t2 = 0, ft2 = 0, tt2 = 0, t3 = 0, ft3 = 0, tt3 = 0
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
  s: number, St: number, Sft: number, Stt: number,
  flux: Float64Array, weights: Float64Array, rows: Float32Array, pixels: number, from: number, to: number,
  chi2: Float64Array, scale: Float64Array, used: Float64Array,
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
