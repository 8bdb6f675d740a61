import { interpolateOnto } from './series'
import { neighbourStandard, type NeighbourStep, type OverlayStandard } from './reviewOverlay'
import type { WavelengthRegion } from './spectrumPlot'

/**
 * The neighbour matrix of the review workspace: the standard in the middle and the standards one
 * step each way in spectral type (columns) and luminosity class (rows), each compared with the star
 * over the chosen region.
 */

/** Column −1 is one subtype earlier, +1 one later; row −1 is one class brighter, +1 one fainter. */
export type Offset = -1 | 0 | 1
export interface MatrixPosition {
  col: Offset
  row: Offset
}

export const MATRIX_OFFSETS: readonly Offset[] = [-1, 0, 1]

export interface MatrixCell<S extends OverlayStandard = OverlayStandard> extends MatrixPosition {
  standard: S | null
}

const TYPE_STEP: Record<Exclude<Offset, 0>, NeighbourStep> = { [-1]: 'earlier', [1]: 'later' }
const CLASS_STEP: Record<Exclude<Offset, 0>, NeighbourStep> = { [-1]: 'brighter', [1]: 'fainter' }

/**
 * The nine cells around `centre`, row by row (brighter first), earlier type on the left. A corner is
 * the type step taken from the class neighbour, falling back to the class step from the type
 * neighbour, so a sparse grid still fills it where it can; null where the library has nothing.
 */
export function neighbourCells<S extends OverlayStandard>(standards: readonly S[], centre: S | null): MatrixCell<S>[] {
  const cells: MatrixCell<S>[] = []
  for (const row of MATRIX_OFFSETS) {
    for (const col of MATRIX_OFFSETS) {
      let standard: S | null = null
      if (centre) {
        if (row === 0 && col === 0) standard = centre
        else if (row === 0) standard = neighbourStandard(standards, centre, TYPE_STEP[col as -1 | 1])
        else if (col === 0) standard = neighbourStandard(standards, centre, CLASS_STEP[row as -1 | 1])
        else {
          const byClass = neighbourStandard(standards, centre, CLASS_STEP[row as -1 | 1])
          const byType = neighbourStandard(standards, centre, TYPE_STEP[col as -1 | 1])
          standard = (byClass && neighbourStandard(standards, byClass, TYPE_STEP[col as -1 | 1])) ?? (byType && neighbourStandard(standards, byType, CLASS_STEP[row as -1 | 1])) ?? null
          // A corner that lands on an edge cell's standard would show it twice.
          if (standard && (standard.id === byClass?.id || standard.id === byType?.id || standard.id === centre.id)) standard = null
        }
      }
      cells.push({ row, col, standard })
    }
  }
  return cells
}

/** The position one arrow press away, or the same position at the edge of the matrix. */
export function moveCursor(at: MatrixPosition, key: 'ArrowLeft' | 'ArrowRight' | 'ArrowUp' | 'ArrowDown'): MatrixPosition {
  const clamp = (v: number) => Math.max(-1, Math.min(1, v)) as Offset
  switch (key) {
    case 'ArrowLeft':
      return { ...at, col: clamp(at.col - 1) }
    case 'ArrowRight':
      return { ...at, col: clamp(at.col + 1) }
    case 'ArrowUp':
      return { ...at, row: clamp(at.row - 1) }
    case 'ArrowDown':
      return { ...at, row: clamp(at.row + 1) }
  }
}

export type CompareMode = 'difference' | 'ratio'

export interface Comparison {
  /** Wavelengths (Å) of the star's pixels inside the region where both curves have a value. */
  wavelength: number[]
  /** Star − standard, or star / standard − 1, on those pixels. */
  values: number[]
  /** χ² per degree of freedom of star against standard over those pixels (no free parameters). */
  reducedChi2: number | null
  pixels: number
}

/**
 * Compares the rectified star with a rectified standard over a region: the pixel-by-pixel difference
 * (or ratio − 1) and χ²_ν = Σ((f − s)/σ)² / N with σ the star's rectified noise (1 / (S/N), common
 * practice for continuum-normalised flux). Both are continuum-normalised, so no scale is fitted:
 * the number ranks the cells of one matrix, it is not the matcher's χ².
 */
export function compareInRegion(
  star: { wavelength: ArrayLike<number>; flux: ArrayLike<number> },
  standard: { wavelength: ArrayLike<number>; flux: ArrayLike<number> },
  region: WavelengthRegion,
  options: { mode?: CompareMode; sigma: number },
): Comparison {
  const { mode = 'difference', sigma } = options
  if (!(sigma > 0)) throw new RangeError('sigma must be positive')
  const at: number[] = []
  const flux: number[] = []
  for (let i = 0; i < star.wavelength.length; i++) {
    const w = star.wavelength[i]!
    const f = star.flux[i]!
    if (w >= region[0] && w <= region[1] && Number.isFinite(f)) {
      at.push(w)
      flux.push(f)
    }
  }
  const s = interpolateOnto(at, standard.wavelength, standard.flux)
  const wavelength: number[] = []
  const values: number[] = []
  let sum = 0
  for (let i = 0; i < at.length; i++) {
    const v = s[i]
    if (v == null) continue
    const d = flux[i]! - v
    sum += (d / sigma) ** 2
    wavelength.push(at[i]!)
    values.push(mode === 'difference' ? d : v !== 0 ? flux[i]! / v - 1 : NaN)
  }
  const pixels = wavelength.length
  return { wavelength, values, reducedChi2: pixels > 0 ? sum / pixels : null, pixels }
}

/**
 * One symmetric axis half-range for all tiles, so their curves compare by eye: the largest |value|
 * over the tiles, rounded up to 1, 2 or 5 × 10ⁿ. Never below `floor`.
 */
export function sharedScale(tiles: readonly { values: readonly number[] }[], floor = 0.01): number {
  let max = 0
  for (const t of tiles) for (const v of t.values) if (Number.isFinite(v) && Math.abs(v) > max) max = Math.abs(v)
  return niceCeil(Math.max(max, floor))
}

/** The least of 1, 2, 5 × 10ⁿ at or above x (x > 0). */
export function niceCeil(x: number): number {
  const p = 10 ** Math.floor(Math.log10(x))
  for (const m of [1, 2, 5, 10]) if (m * p >= x * (1 - 1e-12)) return m * p
  return 10 * p
}

/** The noise of rectified flux from the spectrum's S/N; a missing or absurd S/N is read as 100. */
export function rectifiedSigma(snr: number | null | undefined): number {
  const s = snr != null && Number.isFinite(snr) && snr > 0 ? Math.min(snr, 1000) : 100
  return 1 / s
}

/** Up to `max` points of a curve for a small drawing: every k-th point, keeping both ends. */
export function thinOut(x: readonly number[], y: readonly number[], max: number): { x: number[]; y: number[] } {
  const n = Math.min(x.length, y.length)
  if (n <= max) return { x: x.slice(0, n), y: y.slice(0, n) }
  const step = (n - 1) / (max - 1)
  const xs: number[] = []
  const ys: number[] = []
  for (let k = 0; k < max; k++) {
    const i = Math.round(k * step)
    xs.push(x[i]!)
    ys.push(y[i]!)
  }
  return { x: xs, y: ys }
}
