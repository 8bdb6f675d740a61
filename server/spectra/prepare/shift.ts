import { SPEED_OF_LIGHT_KMS, type LogGrid } from '../../../shared/grid'

export interface GridShift {
  /** 1 where the shifted pixel has no usable pixel on each side. */
  mask: Uint8Array
  /** The arrays shifted, in the order given; NaN where masked (except those marked `everywhere`). */
  values: Float64Array[]
}

export interface ShiftedArray {
  values: ArrayLike<number>
  /** Defined at every pixel, masked or not (a continuum): shifted everywhere, the ends held. */
  everywhere?: boolean
}

/**
 * Arrays on a log-λ grid moved to the rest frame of a source at `velocity` km/s: on such a grid a
 * velocity is a shift of ln(1 + v/c)/step pixels, the inverse of shiftSpectrumToRest's
 * λ/(1 + v/c). Values between pixels by cubic convolution (Keys 1981, IEEE Trans. ASSP 29, 1153,
 * a = −1/2), linearly where one of the outer two pixels is masked or off the grid; a pixel whose two
 * neighbours are not both usable is masked.
 */
export function shiftGridToRest(grid: LogGrid, velocity: number, mask: ArrayLike<number>, arrays: readonly ShiftedArray[]): GridShift {
  if (!(Math.abs(velocity) < SPEED_OF_LIGHT_KMS)) throw new Error('velocity must be finite and below c')
  const n = grid.length
  const shift = Math.log1p(velocity / SPEED_OF_LIGHT_KMS) / grid.step
  const whole = Math.floor(shift)
  const t = shift - whole
  // Cubic-convolution weights of pixels j − 1 … j + 2 at offset t from j (the same for every pixel).
  const w0 = ((-t + 2) * t - 1) * t * 0.5
  const w1 = ((3 * t - 5) * t * t + 2) * 0.5
  const w2 = ((-3 * t + 4) * t + 1) * t * 0.5
  const w3 = (t - 1) * t * t * 0.5
  const usable = (j: number) => j >= 0 && j < n && mask[j] === 0
  const outMask = new Uint8Array(n)
  const out = arrays.map(() => new Float64Array(n))
  for (let i = 0; i < n; i++) {
    const j = i + whole
    const inside = usable(j) && (t === 0 || usable(j + 1))
    outMask[i] = inside ? 0 : 1
    const cubic = inside && usable(j - 1) && usable(j + 2)
    for (let k = 0; k < arrays.length; k++) {
      const { values, everywhere } = arrays[k]!
      const target = out[k]!
      if (cubic) {
        target[i] = w0 * values[j - 1]! + w1 * values[j]! + w2 * values[j + 1]! + w3 * values[j + 2]!
      } else if (inside) {
        target[i] = t === 0 ? values[j]! : values[j]! + (values[j + 1]! - values[j]!) * t
      } else if (everywhere) {
        const a = Math.min(n - 1, Math.max(0, j))
        const b = Math.min(n - 1, Math.max(0, j + 1))
        target[i] = values[a]! + (values[b]! - values[a]!) * t
      } else {
        target[i] = Number.NaN
      }
    }
  }
  return { mask: outMask, values: out }
}
