import { solveLinearInPlace } from '../linear'

/** One standard of the local model: its row in the level, published type, class and [Fe/H], and its weight. */
export interface ModelStandard {
  row: number
  typeCode: number
  classCode: number
  /** Published [Fe/H], dex; null is taken as solar. */
  feh: number | null
  weight: number
}

/** What the local model reads off the spectrum. */
export interface LocalModelFit {
  typeCode: number
  classCode: number
  feh: number
}

const P = 4
/** Prior widths about the standards' weighted mean: type (subtypes), class (classes), [Fe/H] (dex). */
const PRIOR_SIGMA = [3, 1.5, 0.5] as const
/** Keeps the per-pixel fit solvable when the standards share a class or an [Fe/H]. */
const RIDGE = 1e-3

/**
 * Type, class and [Fe/H] read off a local linear model of the nearest standards.
 *
 * 1. Each pixel's flux among the standards is fitted (weighted least squares) as
 *    f = β₀ + β_t·Δtype + β_c·Δclass + β_m·Δ[Fe/H], the Δ about the standards' weighted means.
 * 2. The spectrum's own Δ values and a free offset are then solved for from y − β₀ over every usable
 *    pixel, with a Gaussian prior about the means (PRIOR_SIGMA) so that a direction the standards
 *    hardly span does not run away.
 *
 * A vote can only land where standards are, and leans to the types of which the library holds most;
 * this model separates what [Fe/H] does to the metal lines from what type does, as metal-poor dwarfs
 * need (their weak lines otherwise match earlier, solar-metallicity dwarfs).
 * The type is kept within the standards' range of types.
 * @param rows level flux, row-major, `pixels` per row
 * @returns null with fewer than 5 standards, no usable pixel, or a singular system
 */
export function localModelFit(rows: Float32Array, pixels: number, flux: Float64Array, weights: Float64Array, from: number, to: number, standards: readonly ModelStandard[]): LocalModelFit | null {
  const k = standards.length
  if (k < 5) return null
  let sw = 0
  const mean = new Float64Array(P)
  const x = new Float64Array(k * P)
  for (let q = 0; q < k; q++) {
    const st = standards[q]!
    x[q * P] = 1
    x[q * P + 1] = st.typeCode
    x[q * P + 2] = st.classCode
    x[q * P + 3] = st.feh ?? 0
    sw += st.weight
    for (let a = 1; a < P; a++) mean[a] = mean[a]! + st.weight * x[q * P + a]!
  }
  if (!(sw > 0)) return null
  for (let a = 1; a < P; a++) mean[a] = mean[a]! / sw
  for (let q = 0; q < k; q++) for (let a = 1; a < P; a++) x[q * P + a] = x[q * P + a]! - mean[a]!

  // g = (XᵀWX + ridge)⁻¹ XᵀW, P × k: a pixel's coefficients are g times the standards' fluxes there.
  const xtwx = new Float64Array(P * P)
  for (let q = 0; q < k; q++) {
    const w = standards[q]!.weight
    for (let a = 0; a < P; a++) for (let b = 0; b < P; b++) xtwx[a * P + b] = xtwx[a * P + b]! + w * x[q * P + a]! * x[q * P + b]!
  }
  for (let a = 1; a < P; a++) xtwx[a * P + a] = xtwx[a * P + a]! + RIDGE * sw
  const g = new Float64Array(P * k)
  const column = new Float64Array(P)
  const solved = new Float64Array(P)
  const m = new Float64Array(P * P)
  for (let q = 0; q < k; q++) {
    const w = standards[q]!.weight
    for (let a = 0; a < P; a++) column[a] = w * x[q * P + a]!
    m.set(xtwx)
    if (!solveLinearInPlace(m, column, solved, P)) return null
    for (let a = 0; a < P; a++) g[a * k + q] = solved[a]!
  }

  // Normal equations for (offset, Δtype, Δclass, Δ[Fe/H]).
  const normal = new Float64Array(P * P)
  const rhs = new Float64Array(P)
  if (sumNormalEquations(rows, pixels, flux, weights, from, to, standards, g, normal, rhs) === 0) return null
  for (let a = 1; a < P; a++) normal[a * P + a] = normal[a * P + a]! + 1 / PRIOR_SIGMA[a - 1]! ** 2
  const theta = new Float64Array(P)
  if (!solveLinearInPlace(normal, rhs, theta, P)) return null
  let lo = Infinity
  let hi = -Infinity
  for (const st of standards) {
    lo = Math.min(lo, st.typeCode)
    hi = Math.max(hi, st.typeCode)
  }
  return { typeCode: Math.min(hi, Math.max(lo, mean[1]! + theta[1]!)), classCode: mean[2]! + theta[2]!, feh: mean[3]! + theta[3]! }
}

/**
 * Adds every usable pixel's row of the spectrum's normal equations into `normal` and `rhs`; returns
 * how many pixels were used. A function of its own: optimised while in its loop (on-stack
 * replacement), the code after the loop had never run and lacked type feedback, and localModelFit
 * was thrown away on leaving the loop.
 */
function sumNormalEquations(
  rows: Float32Array,
  pixels: number,
  flux: Float64Array,
  weights: Float64Array,
  from: number,
  to: number,
  standards: readonly ModelStandard[],
  g: Float64Array,
  normal: Float64Array,
  rhs: Float64Array,
): number {
  const k = standards.length
  const beta = new Float64Array(P)
  let used = 0
  for (let i = from; i < to; i++) {
    const w = weights[i]!
    if (!(w > 0)) continue
    beta.fill(0)
    let finite = true
    for (let q = 0; q < k && finite; q++) {
      const f = rows[standards[q]!.row * pixels + i]!
      if (f !== f) finite = false
      else for (let a = 0; a < P; a++) beta[a] = beta[a]! + g[a * k + q]! * f
    }
    if (!finite) continue
    const r = flux[i]! - beta[0]!
    beta[0] = 1
    for (let a = 0; a < P; a++) {
      rhs[a] = rhs[a]! + w * beta[a]! * r
      for (let b = 0; b < P; b++) normal[a * P + b] = normal[a * P + b]! + w * beta[a]! * beta[b]!
    }
    used++
  }
  return used
}
