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
 * Writes χ², b and the pixel count per standard into the output arrays (no allocation).
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
  const count = chi2.length
  const [bMin, bMax] = DEPTH_SCALE_BOUNDS
  // Sums that do not depend on the standard.
  let S = 0
  let Sf = 0
  let Sff = 0
  for (let i = from; i < to; i++) {
    const w = weights[i]!
    if (w <= 0) continue
    S += w
    Sf += w * flux[i]!
    Sff += w * flux[i]! * flux[i]!
  }
  // Usable columns, gathered once so the inner loop has no branch on the weight.
  const cols = scratchColumns(to - from)
  const wv = scratchWeights(to - from)
  const fv = scratchFlux(to - from)
  let m = 0
  for (let i = from; i < to; i++) {
    if (weights[i]! > 0) {
      cols[m] = i
      wv[m] = weights[i]!
      fv[m] = flux[i]!
      m++
    }
  }
  for (let s = 0; s < count; s++) {
    const base = s * pixels
    let St = 0
    let Sft = 0
    let Stt = 0
    for (let k = 0; k < m; k++) {
      const t = rows[base + cols[k]!]!
      const wt = wv[k]! * t
      St += wt
      Sft += wt * fv[k]!
      Stt += wt * t
    }
    used[s] = m
    if (St !== St) {
      // Some template pixels are missing (observed standards with gaps): sum over the shared pixels.
      used[s] = scaledPair(flux, weights, rows, base, from, to, chi2, scale, s)
      continue
    }
    const det = S * Stt - St * St
    if (m < 3 || !(det > 0)) {
      chi2[s] = Infinity
      scale[s] = Number.NaN
      continue
    }
    let b = (S * Sft - St * Sf) / det
    if (b < bMin) b = bMin
    if (b > bMax) b = bMax
    const a = (Sf - b * St) / S
    chi2[s] = Math.max(0, Sff - 2 * a * Sf - 2 * b * Sft + a * a * S + 2 * a * b * St + b * b * Stt)
    scale[s] = b
  }
}

let colBuf = new Int32Array(0)
let wBuf = new Float64Array(0)
let fBuf = new Float64Array(0)
const scratchColumns = (n: number) => (colBuf.length >= n ? colBuf : (colBuf = new Int32Array(n)))
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
