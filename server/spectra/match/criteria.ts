/**
 * Luminosity criteria of the MK system measured directly on rectified arrays, so the same
 * number can be read off a spectrum and off every standard at the spectrum's resolution.
 * Which features are luminosity-sensitive, and for which types, is common practice in MK
 * classification (Morgan, Keenan & Kellman 1943; Gray & Corbally, *Stellar Spectral
 * Classification*, 2009, ch. 3–5, from memory).
 */
import { lowerBound } from '../prepare/stats'

export interface Criterion {
  id: string
  name: string
  /** Type-code range where the criterion is used (O0 = 0 … M0 = 60). */
  types: readonly [number, number]
  kind: 'wing-depth' | 'depth-ratio'
  /** Wing depth: line centres, Å; depth ratio: [numerator, denominator] centres, Å. */
  centres: readonly number[]
  /** Wing depth: inner and outer offsets from the centre, Å. */
  offsets?: readonly [number, number]
  /** Larger values mean a more luminous star (true) or a fainter one (false). */
  risesWithLuminosity: boolean
  /**
   * Scatter of the value about the standards of the true class at the true type, beyond the
   * photon noise (type interpolation, continuum placement, blends): 1.4826 × the median absolute
   * deviation on the tuning set of bench/tune.ts (seed 7a110b1e, 300 spectra), in the units of
   * the value. Enters the criterion's Gaussian likelihood in quadrature with the noise.
   */
  scatter: number
}

/** The criteria; line wavelengths are the air values of shared/lines.ts (NIST ASD, from memory). */
// prettier-ignore
export const CRITERIA: readonly Criterion[] = [
  {
    // Pressure (Stark) broadening makes the Balmer wings of B–A dwarfs much wider than those of giants and supergiants.
    id: 'balmer-wings', name: 'Hγ and Hδ wing depth, 6–20 Å from the core', types: [10, 32], kind: 'wing-depth',
    centres: [4340.47, 4101.74], offsets: [6, 20], risesWithLuminosity: false, scatter: 0.0033,
  },
  {
    id: 'sr-ii-4077/fe-i-4071', name: 'Sr II 4077 / Fe I 4071 depth ratio', types: [27, 69.9], kind: 'depth-ratio',
    centres: [4077.71, 4071.74], risesWithLuminosity: true, scatter: 0.059,
  },
  {
    id: 'sr-ii-4077/fe-i-4063', name: 'Sr II 4077 / Fe I 4063 depth ratio', types: [27, 69.9], kind: 'depth-ratio',
    centres: [4077.71, 4063.59], risesWithLuminosity: true, scatter: 0.054,
  },
  {
    id: 'y-ii-4375/fe-i-4383', name: 'Y II 4376 / Fe I 4383 depth ratio', types: [30, 69.9], kind: 'depth-ratio',
    centres: [4374.94, 4383.55], risesWithLuminosity: true, scatter: 0.033,
  },
  {
    id: 'sr-ii-4216/ca-i-4227', name: 'Sr II 4216 / Ca I 4226 depth ratio', types: [40, 69.9], kind: 'depth-ratio',
    centres: [4215.52, 4226.73], risesWithLuminosity: true, scatter: 0.038,
  },
  {
    // The MgH band near 4780 Å grows with surface gravity: strong in M dwarfs, weak in giants.
    id: 'mgh-4780', name: 'MgH band depth, 4750–4790 Å', types: [58, 69.9], kind: 'wing-depth',
    centres: [4770], offsets: [0, 20], risesWithLuminosity: false, scatter: 0.022,
  },
]

function meanDepth(flux: ArrayLike<number>, wavelength: ArrayLike<number>, a: number, b: number): number {
  const i0 = lowerBound(wavelength, a)
  const i1 = lowerBound(wavelength, b)
  let sum = 0
  let n = 0
  for (let i = i0; i < i1; i++) {
    const f = flux[i]!
    if (Number.isFinite(f)) {
      sum += 1 - f
      n++
    }
  }
  return n > 0 && n >= 0.8 * (i1 - i0) ? sum / n : Number.NaN
}

/** Central depth 1 − min F within ±1 Å of λ, against the local peak within ±4 Å. */
function centralDepth(flux: ArrayLike<number>, wavelength: ArrayLike<number>, lambda: number): number {
  const i0 = lowerBound(wavelength, lambda - 4)
  const i1 = lowerBound(wavelength, lambda + 4)
  if (i1 - i0 < 5 || i0 === 0 || i1 >= wavelength.length) return Number.NaN
  let min = Infinity
  let max = -Infinity
  for (let i = i0; i < i1; i++) {
    const f = flux[i]!
    if (!Number.isFinite(f)) return Number.NaN
    if (f > max) max = f
    if (Math.abs(wavelength[i]! - lambda) <= 1 && f < min) min = f
  }
  // The local peak stands in for the continuum, so a blended window still gives a usable ratio.
  return max > 0 && min < Infinity ? 1 - min / max : Number.NaN
}

/**
 * The value of one criterion on a rectified array: the mean of 1 − F over both wings of each
 * listed line (wing depth), or the ratio of central depths (depth ratio). NaN when pixels are
 * missing or the denominator depth is below 0.02.
 * @param flux rectified flux; @param wavelength ascending wavelengths of `flux`, Å
 */
export function criterionValue(c: Criterion, flux: ArrayLike<number>, wavelength: ArrayLike<number>): number {
  if (c.kind === 'wing-depth') {
    const [inner, outer] = c.offsets!
    let sum = 0
    for (const centre of c.centres) {
      const blue = meanDepth(flux, wavelength, centre - outer, centre - inner)
      const red = meanDepth(flux, wavelength, centre + inner, centre + outer)
      sum += (blue + red) / 2
    }
    return sum / c.centres.length
  }
  const num = centralDepth(flux, wavelength, c.centres[0]!)
  const den = centralDepth(flux, wavelength, c.centres[1]!)
  return den >= 0.02 ? num / den : Number.NaN
}

/**
 * Rough 1σ noise of a criterion value for a rectified spectrum with per-pixel noise `sigma`
 * (1/S/N): √(1/n) σ for a wing depth over n pixels, first-order propagation for a ratio.
 */
export function criterionNoise(c: Criterion, value: number, sigma: number, pixelsPerAngstrom: number, denominatorDepth = 0.2): number {
  if (c.kind === 'wing-depth') return sigma / Math.sqrt(Math.max(1, 2 * c.centres.length * (c.offsets![1] - c.offsets![0]) * pixelsPerAngstrom))
  return Math.abs(value) * Math.SQRT2 * (sigma / Math.max(0.02, denominatorDepth))
}
