/**
 * A small Levenberg–Marquardt least-squares solver (Levenberg 1944; Marquardt 1963, J. SIAM 11, 431)
 * for models with a handful of parameters: damping λ·diag(JᵀWJ) added to the normal equations,
 * λ divided by 10 after an accepted step and multiplied by 10 after a rejected one, parameters
 * projected back into their bounds after each step.
 */
import { solveLinearInPlace } from '../linear'

/**
 * Evaluates the model at every data point: writes model values into `values` and the Jacobian,
 * row-major (point i, parameter j at i·p + j), into `jacobian`.
 */
export type LeastSquaresModel = (params: Float64Array, values: Float64Array, jacobian: Float64Array) => void

export interface LevenbergMarquardtOptions {
  /** Most iterations. @default 50 */
  maxIterations?: number
  /** Stop when the relative fall of χ² in an accepted step is below this. @default 1e-9 */
  tolerance?: number
  /** Starting damping. @default 1e-3 */
  initialDamping?: number
  /** Lower bound per parameter. @default −∞ for all */
  lower?: ArrayLike<number>
  /** Upper bound per parameter. @default +∞ for all */
  upper?: ArrayLike<number>
}

export interface LevenbergMarquardtResult {
  params: Float64Array
  /** Covariance (JᵀWJ)⁻¹ at the solution, row-major; scale by the reduced χ² when weights are not 1/σ². */
  covariance: Float64Array
  chiSquare: number
  iterations: number
  /** Model evaluations, the cost that matters. */
  evaluations: number
  converged: boolean
}

/**
 * Minimises Σ wᵢ (yᵢ − model(params)ᵢ)² from `initial`.
 * @throws when data, weights and the initial guess disagree in length
 */
export function fitLevenbergMarquardt(model: LeastSquaresModel, y: Float64Array, weights: Float64Array, initial: ArrayLike<number>, options: LevenbergMarquardtOptions = {}): LevenbergMarquardtResult {
  const { maxIterations = 50, tolerance = 1e-9, initialDamping = 1e-3, lower, upper } = options
  const n = y.length
  const p = initial.length
  if (weights.length !== n) throw new Error(`weights have ${weights.length} values but the data have ${n}`)
  if (p === 0) throw new Error('at least one parameter is needed')
  if (n < p) throw new Error(`${n} data points cannot fix ${p} parameters`)
  const params = Float64Array.from(initial)
  const trial = new Float64Array(p)
  const values = new Float64Array(n)
  const jacobian = new Float64Array(n * p)
  const trialValues = new Float64Array(n)
  const trialJacobian = new Float64Array(n * p)
  const alpha = new Float64Array(p * p)
  const beta = new Float64Array(p)
  const system = new Float64Array(p * p)
  const step = new Float64Array(p)

  clamp(params, lower, upper)
  model(params, values, jacobian)
  let evaluations = 1
  let chi2 = chiSquare(y, values, weights)
  let damping = initialDamping
  let converged = false
  let iterations = 0
  for (; iterations < maxIterations; iterations++) {
    normalEquations(y, values, jacobian, weights, p, alpha, beta)
    let accepted = false
    for (let attempt = 0; attempt < 12 && !accepted; attempt++) {
      system.set(alpha)
      for (let j = 0; j < p; j++) system[j * p + j] = alpha[j * p + j]! * (1 + damping) + 1e-300
      // A parameter held at a bound that the gradient pushes further out stays where it is
      // (an active-set step), so the others converge instead of crawling along the bound.
      for (let j = 0; j < p; j++) {
        const atLower = lower !== undefined && params[j]! <= lower[j]! && beta[j]! < 0
        const atUpper = upper !== undefined && params[j]! >= upper[j]! && beta[j]! > 0
        if (!atLower && !atUpper) continue
        for (let k = 0; k < p; k++) {
          system[j * p + k] = 0
          system[k * p + j] = 0
        }
        system[j * p + j] = 1
        beta[j] = 0
      }
      if (!solveLinearInPlace(system, beta, step, p)) {
        damping *= 10
        continue
      }
      for (let j = 0; j < p; j++) trial[j] = params[j]! + step[j]!
      clamp(trial, lower, upper)
      model(trial, trialValues, trialJacobian)
      evaluations++
      const trialChi2 = chiSquare(y, trialValues, weights)
      if (trialChi2 <= chi2) {
        const fall = chi2 - trialChi2
        params.set(trial)
        values.set(trialValues)
        jacobian.set(trialJacobian)
        damping = Math.max(damping / 10, 1e-12)
        accepted = true
        if (fall <= tolerance * Math.max(chi2, 1e-300)) converged = true
        chi2 = trialChi2
      } else {
        damping *= 10
      }
    }
    if (!accepted) {
      converged = true
      break
    }
    if (converged) break
  }
  normalEquations(y, values, jacobian, weights, p, alpha, beta)
  const covariance = invert(alpha, p)
  return { params, covariance, chiSquare: chi2, iterations: iterations + 1, evaluations, converged }
}

function chiSquare(y: Float64Array, model: Float64Array, w: Float64Array): number {
  let sum = 0
  for (let i = 0; i < y.length; i++) {
    const r = y[i]! - model[i]!
    sum += w[i]! * r * r
  }
  return sum
}

function normalEquations(y: Float64Array, values: Float64Array, jacobian: Float64Array, w: Float64Array, p: number, alpha: Float64Array, beta: Float64Array): void {
  alpha.fill(0)
  beta.fill(0)
  for (let i = 0; i < y.length; i++) {
    const wi = w[i]!
    if (wi === 0) continue
    const r = y[i]! - values[i]!
    const row = i * p
    for (let a = 0; a < p; a++) {
      const ja = wi * jacobian[row + a]!
      beta[a] = beta[a]! + ja * r
      for (let b = 0; b <= a; b++) alpha[a * p + b] = alpha[a * p + b]! + ja * jacobian[row + b]!
    }
  }
  for (let a = 0; a < p; a++) for (let b = a + 1; b < p; b++) alpha[a * p + b] = alpha[b * p + a]!
}

function invert(a: Float64Array, p: number): Float64Array {
  const out = new Float64Array(p * p)
  const work = new Float64Array(p * p)
  const e = new Float64Array(p)
  const col = new Float64Array(p)
  for (let j = 0; j < p; j++) {
    work.set(a)
    e.fill(0)
    e[j] = 1
    if (!solveLinearInPlace(work, e, col, p)) return out.fill(Number.NaN)
    for (let i = 0; i < p; i++) out[i * p + j] = col[i]!
  }
  return out
}

function clamp(params: Float64Array, lower?: ArrayLike<number>, upper?: ArrayLike<number>): void {
  for (let j = 0; j < params.length; j++) {
    if (lower && params[j]! < lower[j]!) params[j] = lower[j]!
    if (upper && params[j]! > upper[j]!) params[j] = upper[j]!
  }
}
