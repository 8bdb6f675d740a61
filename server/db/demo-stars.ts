// The flux of an invented demo star: no star's spectrum, but a smooth interpolation across the
// shipped observed standards of one source (MILES, with published Teff, log g and [Fe/H]) at the
// parameters typical of the star's MK type. A star of the library never stands in for a demo star:
// the blend is widened until no standard carries more than a quarter of its weight.
import { DEFAULT_OBSERVED_DIR, observedLibraryAt } from '../spectra/match/load'
import type { ObservedStandard } from '../../templates/observed/library'
import { parseMK } from '../../shared/mk'
import { solveLinearInPlace } from '../spectra/linear'
import { medianInPlace } from '../spectra/prepare/stats'

/** The source whose standards carry the parameters the interpolation runs over. */
const SOURCE = 'miles'
/** Kernel widths at the start: log10 Teff, log g, [Fe/H]; all widened together until the blend is wide enough. */
const WIDTHS = [0.03, 0.7, 0.4] as const
/** The widest share one standard may have in a demo star's blend, and the fewest standards it may rest on (effective number). */
export const DEMO_MAX_SHARE = 0.25
export const DEMO_MIN_STANDARDS = 6

export interface DemoStar {
  /** Flux on the observed library's grid, normalised as its standards are. */
  flux: Float64Array
  teff: number
  logg: number
  feh: number
  /** Resolution of the source, FWHM Å. */
  fwhm: number
  /** The largest share of one standard in the blend (|weight| / Σ|weight|), and the effective number of standards under its kernel, (Σk)²/Σk². */
  maxShare: number
  effectiveStandards: number
}

interface Source {
  stars: ObservedStandard[]
  /** ln F of every star, star-major. */
  lnFlux: Float64Array
  pixels: number
  fwhm: number
}
let source: Source | null = null

function loadSource(): Source {
  if (source) return source
  // The copy the matcher loads (once per thread), not a second read of the file.
  const { library } = observedLibraryAt(DEFAULT_OBSERVED_DIR)
  const pixels = library.grid.length
  const stars = library.standards.filter((s) => s.entry.source === SOURCE && s.entry.teff !== null && s.entry.logg !== null && s.flux.every((f) => f > 0))
  const lnFlux = new Float64Array(stars.length * pixels)
  stars.forEach((s, k) => {
    for (let i = 0; i < pixels; i++) lnFlux[k * pixels + i] = Math.log(s.flux[i]!)
  })
  const fwhm = library.manifest.sources.find((s) => s.key === SOURCE)!.resolutionFwhm
  return (source = { stars, lnFlux, pixels, fwhm })
}

const median = (values: number[]) => medianInPlace(Float64Array.from(values), values.length)

/** Teff and log g typical of an MK type and class: the medians over the source's standards of that class within a subtype, widened until three are found. */
export function typicalParameters(mkType: string): { teff: number; logg: number } {
  const parsed = parseMK(mkType)
  if (!parsed.ok || parsed.value.typeCode === undefined || parsed.value.classCode === undefined) throw new Error(`not an MK type with a class: ${mkType}`)
  const { typeCode, classCode } = parsed.value
  const { stars } = loadSource()
  for (const [subtypes, classes] of [
    [1, 0.5],
    [2, 0.5],
    [3, 1],
    [5, 1],
  ] as const) {
    const near = stars.filter((s) => Math.abs(s.entry.typeCode - typeCode) <= subtypes && Math.abs(s.entry.classCode - classCode!) <= classes)
    if (near.length >= 3) return { teff: median(near.map((s) => s.entry.teff!)), logg: median(near.map((s) => s.entry.logg!)) }
  }
  throw new Error(`too few standards near ${mkType}`)
}

/**
 * ln F at (Teff, log g, [Fe/H]) by locally weighted regression over the source's standards:
 * Gaussian weights in (log Teff, log g, [Fe/H]), a model linear in each parameter and quadratic in
 * log Teff (the flux of hot and cool stars bends with temperature). The prediction is a fixed
 * combination of the standards' ln F; its weights are what the share limits apply to.
 */
function blendAt(teff: number, logg: number, feh: number, widen: number): { weights: Float64Array; maxShare: number; effective: number } {
  const { stars } = loadSource()
  const t = Math.log10(teff)
  const rows = stars.map((s) => {
    const d = Math.log10(s.entry.teff!) - t
    return [1, d, s.entry.logg! - logg, (s.entry.feh ?? 0) - feh, (d / WIDTHS[0]) ** 2]
  })
  const kernel = rows.map((r) => Math.exp(-0.5 * ((r[1]! / (widen * WIDTHS[0])) ** 2 + (r[2]! / (widen * WIDTHS[1])) ** 2 + (r[3]! / (widen * WIDTHS[2])) ** 2)))
  const q = rows[0]!.length
  const normal = new Float64Array(q * q)
  rows.forEach((r, k) => {
    for (let a = 0; a < q; a++) for (let b = 0; b < q; b++) normal[a * q + b] = normal[a * q + b]! + kernel[k]! * r[a]! * r[b]!
  })
  // The intercept's row of (XᵀWX)⁻¹ gives each standard's weight in the prediction at the point itself.
  const unit = new Float64Array(q)
  if (
    !solveLinearInPlace(
      normal,
      Float64Array.from({ length: q }, (_, i) => (i === 0 ? 1 : 0)),
      unit,
      q,
    )
  )
    throw new Error('the standards do not constrain the blend')
  const weights = Float64Array.from(rows, (r, k) => kernel[k]! * r.reduce((sum, x, j) => sum + unit[j]! * x, 0))
  let abs = 0
  let most = 0
  let sum = 0
  let sum2 = 0
  for (const w of weights) {
    abs += Math.abs(w)
    most = Math.max(most, Math.abs(w))
  }
  for (const k of kernel) {
    sum += k
    sum2 += k * k
  }
  return { weights, maxShare: most / abs, effective: (sum * sum) / sum2 }
}

const cache = new Map<string, DemoStar>()

/** The flux of a demo star of type `mkType` (e.g. "G8 III"), solar [Fe/H]; computed once per type. */
export function demoStar(mkType: string): DemoStar {
  const known = cache.get(mkType)
  if (known) return known
  const { teff, logg } = typicalParameters(mkType)
  const feh = 0
  const { lnFlux, pixels, fwhm } = loadSource()
  for (let widen = 1; widen < 30; widen *= 1.2) {
    const blend = blendAt(teff, logg, feh, widen)
    if (blend.maxShare > DEMO_MAX_SHARE || blend.effective < DEMO_MIN_STANDARDS) continue
    const flux = new Float64Array(pixels)
    blend.weights.forEach((w, k) => {
      for (let i = 0; i < pixels; i++) flux[i] = flux[i]! + w * lnFlux[k * pixels + i]!
    })
    for (let i = 0; i < pixels; i++) flux[i] = Math.exp(flux[i]!)
    const star = { flux, teff, logg, feh, fwhm, maxShare: blend.maxShare, effectiveStandards: blend.effective }
    cache.set(mkType, star)
    return star
  }
  throw new Error(`no blend of standards is wide enough for ${mkType}`)
}
