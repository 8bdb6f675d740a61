import { gridIndex, gridWavelength, type LogGrid } from '../../../shared/grid'

/**
 * Equivalent width, Å, of a rectified spectrum over [lo, hi] Å: Σ (1 − f) Δλ with the pixel
 * width Δλ = λ Δlnλ of a log grid. A plain window integral, enough to compare models.
 */
export function windowEquivalentWidth(rectified: Float32Array, grid: LogGrid, lo: number, hi: number): number {
  const from = Math.ceil(gridIndex(grid, lo))
  const to = Math.floor(gridIndex(grid, hi))
  let sum = 0
  for (let i = from; i <= to; i++) sum += (1 - rectified[i]!) * gridWavelength(grid, i) * grid.step
  return sum
}
