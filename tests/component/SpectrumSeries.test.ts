import { describe, expect, it } from 'vitest'
import { column, decodeSeries, interpolateOnto, parseSeriesLayout, toPlotValues } from '@/lib/series'
import { panRegion, zoomRegion } from '@/lib/spectrumPlot'

/** Float32 little-endian columns one after another, as the server writes them (server/services/spectra.service.ts). */
function body(columns: number[][]): ArrayBuffer {
  const n = columns[0]?.length ?? 0
  const buf = new ArrayBuffer(n * columns.length * 4)
  const view = new DataView(buf)
  columns.forEach((c, k) => c.forEach((v, i) => view.setFloat32((k * n + i) * 4, v, true)))
  return buf
}

describe('parseSeriesLayout', () => {
  it('reads the layout header', () => {
    expect(parseSeriesLayout('{"points":3,"total":9,"decimated":true,"columns":["wavelength","flux"]}')).toEqual({ points: 3, total: 9, decimated: true, columns: ['wavelength', 'flux'] })
  })

  it('keeps the measurement id of prepared data', () => {
    expect(parseSeriesLayout('{"points":0,"total":0,"decimated":false,"columns":[],"measurementId":7}').measurementId).toBe(7)
  })

  it('refuses a missing or malformed header with a plain message', () => {
    expect(() => parseSeriesLayout(null)).toThrow('The server sent spectrum data without its layout.')
    expect(() => parseSeriesLayout('{oops')).toThrow('The spectrum data layout is not readable.')
    expect(() => parseSeriesLayout('{"points":-1,"columns":[]}')).toThrow('The spectrum data layout is not readable.')
    expect(() => parseSeriesLayout('{"points":2,"columns":[3]}')).toThrow('The spectrum data layout is not readable.')
  })
})

describe('decodeSeries', () => {
  it('splits the body into named columns in order', () => {
    const layout = parseSeriesLayout('{"points":3,"total":3,"decimated":false,"columns":["wavelength","flux","error"]}')
    const s = decodeSeries(
      body([
        [4000, 4000.5, 4001],
        [1.5, 0.25, -2],
        [0.01, 0.02, 0.03],
      ]),
      layout,
    )
    expect(Array.from(column(s, 'wavelength'))).toEqual([4000, 4000.5, 4001])
    expect(Array.from(column(s, 'flux'))).toEqual([1.5, 0.25, -2])
    // float32 rounding of 0.01 etc.: compare within 1e-7.
    column(s, 'error').forEach((v, i) => expect(v).toBeCloseTo([0.01, 0.02, 0.03][i]!, 7))
  })

  it('keeps NaN for masked pixels', () => {
    const s = decodeSeries(
      body([
        [1, 2],
        [Number.NaN, 3],
      ]),
      { points: 2, total: 2, decimated: false, columns: ['wavelength', 'flux'] },
    )
    expect(Number.isNaN(column(s, 'flux')[0]!)).toBe(true)
  })

  it('decodes an empty range', () => {
    const s = decodeSeries(new ArrayBuffer(0), { points: 0, total: 0, decimated: false, columns: ['wavelength', 'flux'] })
    expect(column(s, 'flux')).toHaveLength(0)
  })

  it('refuses a body whose length does not match the layout', () => {
    expect(() => decodeSeries(new ArrayBuffer(12), { points: 2, total: 2, decimated: false, columns: ['wavelength', 'flux'] })).toThrow('The spectrum data is 12 bytes; its layout says 16.')
  })

  it('names a missing column', () => {
    const s = decodeSeries(new ArrayBuffer(0), { points: 0, total: 0, decimated: false, columns: ['wavelength'] })
    expect(() => column(s, 'continuum')).toThrow('The spectrum data has no continuum column.')
  })
})

describe('toPlotValues', () => {
  it('turns NaN and infinities into gaps', () => {
    expect(toPlotValues(new Float32Array([1, Number.NaN, Number.POSITIVE_INFINITY, -2]))).toEqual([1, null, null, -2])
  })
})

describe('interpolateOnto', () => {
  it('interpolates linearly and leaves gaps outside the overlay and next to its NaNs', () => {
    expect(interpolateOnto([3999, 4000, 4000.5, 4001, 4002, 4003], [4000, 4001, 4002], [1, 2, Number.NaN])).toEqual([null, 1, 1.5, 2, null, null])
  })

  it('gives all gaps for an empty overlay', () => {
    expect(interpolateOnto([1, 2], [], [])).toEqual([null, null])
  })
})

describe('panRegion and zoomRegion', () => {
  const extent = [3800, 5200] as const
  it('pans by a fraction of the view and stops at the ends', () => {
    expect(panRegion([4000, 4100], 0.5, extent)).toEqual([4050, 4150])
    expect(panRegion([3820, 3920], -0.5, extent)).toEqual([3800, 3900])
    expect(panRegion([5150, 5190], 1, extent)).toEqual([5160, 5200])
  })

  it('widens about the centre and reports the full view as null', () => {
    expect(zoomRegion([4000, 4100], 2, extent)).toEqual([3950, 4150])
    expect(zoomRegion([3900, 5100], 2, extent)).toBeNull()
  })
})
