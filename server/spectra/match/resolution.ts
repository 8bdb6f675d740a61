import { DEFAULT_CLASSIFICATION_REGION } from '../../../shared/grid'
import { depthScaledChiSquareSelected, parabolaVertex } from './chi2'
import { fitSpectrumAtLevel, smallestFinite } from './classify'
import type { MatchInput } from './types'
import type { PreparedMatchLibrary } from './library'

export interface ResolutionEstimate {
  /** Estimated resolution, FWHM Å. */
  fwhm: number
  /** 'within' when the best level lies inside the library's range; otherwise the spectrum is at least as sharp as the sharpest level, or at least as broad as the coarsest. */
  bound: 'within' | 'sharpest' | 'coarsest'
  /** Least χ² of the spectrum against the chosen standards at each level. */
  curve: { fwhm: number; chi2: number }[]
}

/**
 * Estimates the instrumental resolution of a spectrum from the data: the standards that fit it
 * best at the sharpest level are compared with it at every level of the library, and the
 * resolution is where χ² is least — a spectrum fits standards of its own resolution best, sharper
 * ones leave residuals at every line and broader ones fill them in. The minimum is placed by a
 * parabola in ln FWHM through the least χ² and its two neighbours. Rotation broadens lines like
 * the instrument does, so for a fast rotator this is the effective resolution.
 * @param input the spectrum, prepared without smoothing
 * @param options.standards how many of the best standards are followed across levels @default 6
 */
export function estimateResolution(
  library: PreparedMatchLibrary,
  input: MatchInput,
  options: { region?: readonly [number, number]; standards?: number; exclude?: ReadonlySet<number> } = {},
): ResolutionEstimate {
  const region = options.region ?? DEFAULT_CLASSIFICATION_REGION
  const count = options.standards ?? 6
  const levels = library.resolutions
  // Only the best `count` are followed: twice as many get the full χ² after the screening.
  const first = fitSpectrumAtLevel(library, input, levels[0]!, { region, refineCount: 2 * count, ...(options.exclude ? { exclude: options.exclude } : {}) })
  const followed = Array.from(smallestFinite(first.fit.chi2, count), (r) => first.level.rows[r]!)
  const s = first.scratch
  const { pixels } = library
  const rows = new Float32Array(followed.length * pixels)
  const curve = levels.map((fwhm) => {
    // The followed standards alone: preparing whole levels for them would cost a second or more each.
    let m = 0
    for (const k of followed) {
      const flux = library.standardFlux(fwhm, k)
      if (flux) rows.set(flux, m++ * pixels)
    }
    const chi2 = new Float64Array(m).fill(Infinity)
    depthScaledChiSquareSelected(
      s.flux,
      s.weights,
      rows,
      pixels,
      first.from,
      first.to,
      Int32Array.from({ length: m }, (_, q) => q),
      m,
      chi2,
      new Float64Array(m),
      new Float64Array(m),
    )
    let least = Infinity
    for (let q = 0; q < m; q++) least = Math.min(least, chi2[q]!)
    return { fwhm, chi2: least }
  })
  let j = 0
  for (let i = 1; i < curve.length; i++) if (curve[i]!.chi2 < curve[j]!.chi2) j = i
  if (j === 0) return { fwhm: levels[0]!, bound: 'sharpest', curve }
  if (j === curve.length - 1) return { fwhm: levels[j]!, bound: 'coarsest', curve }
  const x = (i: number) => Math.log(curve[i]!.fwhm)
  const v = parabolaVertex(x(j - 1), curve[j - 1]!.chi2, x(j), curve[j]!.chi2, x(j + 1), curve[j + 1]!.chi2)
  const clamped = Math.min(x(j + 1), Math.max(x(j - 1), Number.isFinite(v) ? v : x(j)))
  return { fwhm: Math.round(Math.exp(clamped) * 100) / 100, bound: 'within', curve }
}
