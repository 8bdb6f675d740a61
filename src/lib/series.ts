/** Binary spectrum series from /api/spectra/:id/data and /prepared: float32 little-endian columns, one after another. */

export interface SeriesLayout {
  points: number
  total: number
  decimated: boolean
  columns: string[]
  measurementId?: number
}

export interface DecodedSeries {
  layout: SeriesLayout
  /** Each column by name, `points` values long; masked pixels are NaN. */
  columns: Record<string, Float32Array>
}

/** Reads the `x-series-layout` header; throws a plain message when it is missing or malformed. */
export function parseSeriesLayout(header: string | null): SeriesLayout {
  if (!header) throw new Error('The server sent spectrum data without its layout.')
  let raw: unknown
  try {
    raw = JSON.parse(header)
  } catch {
    throw new Error('The spectrum data layout is not readable.')
  }
  const l = raw as Partial<SeriesLayout> | null
  if (!l || typeof l.points !== 'number' || !Number.isInteger(l.points) || l.points < 0 || !Array.isArray(l.columns) || !l.columns.every((c) => typeof c === 'string')) {
    throw new Error('The spectrum data layout is not readable.')
  }
  return {
    points: l.points,
    total: typeof l.total === 'number' ? l.total : l.points,
    decimated: l.decimated === true,
    columns: l.columns,
    ...(typeof l.measurementId === 'number' ? { measurementId: l.measurementId } : {}),
  }
}

/** Splits the body into its columns (copying, so the result is aligned whatever the buffer's offset). */
export function decodeSeries(body: ArrayBuffer, layout: SeriesLayout): DecodedSeries {
  const { points, columns: names } = layout
  const expected = points * names.length * 4
  if (body.byteLength !== expected) {
    throw new Error(`The spectrum data is ${body.byteLength} bytes; its layout says ${expected}.`)
  }
  const view = new DataView(body)
  const columns: Record<string, Float32Array> = {}
  names.forEach((name, c) => {
    const out = new Float32Array(points)
    const base = c * points * 4
    for (let i = 0; i < points; i++) out[i] = view.getFloat32(base + i * 4, true)
    columns[name] = out
  })
  return { layout, columns }
}

/** A named column, or an error naming the one that is missing. */
export function column(series: DecodedSeries, name: string): Float32Array {
  const c = series.columns[name]
  if (!c) throw new Error(`The spectrum data has no ${name} column.`)
  return c
}

/** Values for uPlot: NaN and ±Infinity become null, so masked pixels draw as gaps. */
export function toPlotValues(values: ArrayLike<number>): (number | null)[] {
  const out = new Array<number | null>(values.length)
  for (let i = 0; i < values.length; i++) {
    const v = values[i]!
    out[i] = Number.isFinite(v) ? v : null
  }
  return out
}

/**
 * Linear interpolation of (x, y) onto the sorted grid `at`; null outside (x, y)'s range or next to a gap.
 * Overlays on other grids (a standard star, a model) are drawn on the main series' wavelengths this way.
 */
export function interpolateOnto(at: ArrayLike<number>, x: ArrayLike<number>, y: ArrayLike<number>): (number | null)[] {
  const out = new Array<number | null>(at.length).fill(null)
  const n = Math.min(x.length, y.length)
  if (n === 0) return out
  let j = 0
  for (let i = 0; i < at.length; i++) {
    const w = at[i]!
    if (w < x[0]! || w > x[n - 1]!) continue
    while (j < n - 2 && x[j + 1]! < w) j++
    const x0 = x[j]!
    const x1 = x[Math.min(j + 1, n - 1)]!
    const y0 = y[j]!
    const y1 = y[Math.min(j + 1, n - 1)]!
    if (!Number.isFinite(y0) || !Number.isFinite(y1)) continue
    out[i] = x1 === x0 ? y0 : y0 + ((y1 - y0) * (w - x0)) / (x1 - x0)
  }
  return out
}
