/**
 * The Voigt profile through the Faddeeva function w(z) = e^(−z²) erfc(−iz), computed with the
 * rational series of Weideman (1994, SIAM J. Numer. Anal. 31, 1497), valid for Im z ≥ 0:
 * w(z) = 2 p(Z)/(L − iz)² + 1/(√π (L − iz)), Z = (L + iz)/(L − iz), p a polynomial of degree N − 1
 * whose coefficients come from a discrete Fourier transform, computed once when the module loads.
 */

const WEIDEMAN_TERMS = 24
const SQRT_PI = Math.sqrt(Math.PI)
const SQRT_2 = Math.SQRT2
const SQRT_2PI = Math.sqrt(2 * Math.PI)
const WEIDEMAN_L = Math.sqrt(WEIDEMAN_TERMS / SQRT_2)
/** p's coefficients, lowest power first. */
const WEIDEMAN_A = weidemanCoefficients(WEIDEMAN_TERMS)

function weidemanCoefficients(terms: number): Float64Array {
  const m = 2 * terms
  const l = Math.sqrt(terms / SQRT_2)
  const a = new Float64Array(terms)
  // a_n = (1/2M) Σ_k f(k) cos(π k n / M), f(k) = e^(−t²)(L² + t²), t = L tan(kπ/2M), k = −M+1 … M−1.
  for (let n = 1; n <= terms; n++) {
    let sum = 0
    for (let k = -m + 1; k <= m - 1; k++) {
      const t = l * Math.tan((k * Math.PI) / m / 2)
      sum += Math.exp(-t * t) * (l * l + t * t) * Math.cos((Math.PI * k * n) / m)
    }
    a[n - 1] = sum / (2 * m)
  }
  return a
}

/** Result slots for {@link faddeeva}: w = re + i·im and its derivative w′ = dre + i·dim. */
export interface Complex4 {
  re: number
  im: number
  dre: number
  dim: number
}

/**
 * Faddeeva function w(x + iy) for y ≥ 0 (Weideman 1994, N = 24 terms: about 1e-9 relative
 * accuracy in the tests), with its derivative w′(z) = −2z w(z) + 2i/√π. Writes into `out`
 * (no allocation).
 */
export function faddeeva(x: number, y: number, out: Complex4): Complex4 {
  // d = L − iz = (L + y) − i x ; Z = (L + iz)/(L − iz) = ((L − y) + i x) / ((L + y) − i x)
  const dr = WEIDEMAN_L + y
  const di = -x
  const nr = WEIDEMAN_L - y
  const ni = x
  const dd = dr * dr + di * di
  const zr = (nr * dr + ni * di) / dd
  const zi = (ni * dr - nr * di) / dd
  // Horner: p(Z)
  let pr = 0
  let pi = 0
  for (let k = WEIDEMAN_TERMS - 1; k >= 0; k--) {
    const tr = pr * zr - pi * zi + WEIDEMAN_A[k]!
    pi = pr * zi + pi * zr
    pr = tr
  }
  // 1/d and 1/d²
  const ir = dr / dd
  const ii = -di / dd
  const i2r = ir * ir - ii * ii
  const i2i = 2 * ir * ii
  const wr = 2 * (pr * i2r - pi * i2i) + ir / SQRT_PI
  const wi = 2 * (pr * i2i + pi * i2r) + ii / SQRT_PI
  out.re = wr
  out.im = wi
  out.dre = -2 * (x * wr - y * wi)
  out.dim = -2 * (x * wi + y * wr) + 2 / SQRT_PI
  return out
}

const scratch: Complex4 = { re: 0, im: 0, dre: 0, dim: 0 }

/**
 * Area-normalised Voigt profile at offset x (Å) from the centre: a Gaussian of standard deviation
 * σ convolved with a Lorentzian of half width at half maximum γ, V = Re w(z)/(σ√2π),
 * z = (x + iγ)/(σ√2).
 */
export function voigtProfile(x: number, sigma: number, gamma: number): number {
  faddeeva(x / (sigma * SQRT_2), gamma / (sigma * SQRT_2), scratch)
  return scratch.re / (sigma * SQRT_2PI)
}

/** Slots for {@link voigtWithDerivatives}: value and partial derivatives by x, σ and γ. */
export interface VoigtDerivatives {
  value: number
  dx: number
  dSigma: number
  dGamma: number
}

/** Voigt profile and its partial derivatives (by x, σ, γ), from one Faddeeva evaluation. Writes into `out`. */
export function voigtWithDerivatives(x: number, sigma: number, gamma: number, out: VoigtDerivatives): VoigtDerivatives {
  const s2 = sigma * SQRT_2
  const zr = x / s2
  const zi = gamma / s2
  faddeeva(zr, zi, scratch)
  const norm = 1 / (sigma * SQRT_2PI)
  out.value = scratch.re * norm
  // dz/dx = 1/s2, dz/dγ = i/s2, dz/dσ = −z/σ
  out.dx = (scratch.dre / s2) * norm
  out.dGamma = (-scratch.dim / s2) * norm
  out.dSigma = (-(scratch.dre * zr - scratch.dim * zi) / sigma) * norm - out.value / sigma
  return out
}

/** Full width at half maximum of a Gaussian of standard deviation σ: 2√(2 ln 2) σ. */
export function gaussianFwhm(sigma: number): number {
  return 2 * Math.sqrt(2 * Math.LN2) * sigma
}

/**
 * Voigt FWHM from the Gaussian and Lorentzian FWHMs by the approximation of Olivero & Longbothum
 * (1977, JQSRT 17, 233): f_V ≈ 0.5346 f_L + √(0.2166 f_L² + f_G²), good to about 0.02 %.
 */
export function voigtFwhmApproximation(gaussianFwhmValue: number, lorentzianFwhm: number): number {
  return 0.5346 * lorentzianFwhm + Math.sqrt(0.2166 * lorentzianFwhm * lorentzianFwhm + gaussianFwhmValue * gaussianFwhmValue)
}

/** Voigt FWHM found numerically (bisection on V(x) = V(0)/2), Å; for checks and reports. */
export function voigtFwhmNumeric(sigma: number, gamma: number): number {
  const halfPeak = voigtProfile(0, sigma, gamma) / 2
  let lo = 0
  let hi = voigtFwhmApproximation(gaussianFwhm(sigma), 2 * gamma)
  while (voigtProfile(hi, sigma, gamma) > halfPeak) hi *= 2
  for (let k = 0; k < 80; k++) {
    const mid = (lo + hi) / 2
    if (voigtProfile(mid, sigma, gamma) > halfPeak) lo = mid
    else hi = mid
  }
  return lo + hi
}
