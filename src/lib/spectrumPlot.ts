import type uPlot from 'uplot'
import type { LineFamily } from '@shared/lines'

/** A wavelength interval [from, to] in Å, as the plots zoom to it. */
export type WavelengthRegion = readonly [number, number]

/** A curve on the plot's own wavelength grid (same length as `wavelength`). */
export interface PlotSeries {
  label: string
  values: ArrayLike<number>
  color?: string
  width?: number
  dash?: number[]
}

/** A curve on its own grid (a standard, a model); it is interpolated onto the plot's grid. */
export interface PlotOverlay {
  label: string
  wavelength: ArrayLike<number>
  flux: ArrayLike<number>
  color?: string
  dash?: number[]
}

/** A vertical line with a label at the top, e.g. a classification line. */
export interface PlotMarker {
  id: string
  label: string
  wavelength: number
  family?: LineFamily
  color?: string
}

/** Classic classification regions for one-click zooms. */
export const CLASSIC_REGIONS: readonly { id: string; label: string; region: WavelengthRegion }[] = [
  { id: 'hk', label: 'Ca II H&K · Hε', region: [3900, 4000] },
  { id: 'hdelta', label: 'Hδ · Sr II 4077', region: [4050, 4150] },
  { id: 'gband', label: 'G band · Hγ', region: [4280, 4380] },
  { id: 'he4471', label: 'He I 4471 · Mg II 4481', region: [4440, 4510] },
  { id: 'hbeta', label: 'Hβ', region: [4820, 4900] },
]

export interface PlotPalette {
  axis: string
  grid: string
  series: string[]
  overlays: string[]
  families: Record<LineFamily, string>
  markerText: string
  selection: string
}

/** Colours for light and dark, in step with the app's theme (theme/overrides.ts). */
export function plotPalette(dark: boolean): PlotPalette {
  return dark
    ? {
        axis: '#98a1ad',
        grid: '#2a3038',
        series: ['#dfe4ea', '#f0a35e', '#5aaecb', '#9ccc8a'],
        overlays: ['#e8798a', '#9ccc8a', '#c2a3ef', '#e9c46a'],
        families: { balmer: '#5aaecb', helium: '#e9c46a', metal: '#c2a3ef', band: '#9ccc8a' },
        markerText: '#c3cad3',
        selection: 'rgba(90, 174, 203, 0.18)',
      }
    : {
        axis: '#5d6775',
        grid: '#e8ebef',
        series: ['#1c2330', '#c45a1c', '#1d6f8a', '#3a7d44'],
        overlays: ['#b23a48', '#3a7d44', '#7a4fb0', '#9a6b00'],
        families: { balmer: '#1d6f8a', helium: '#9a6b00', metal: '#7a4fb0', band: '#3a7d44' },
        markerText: '#3b4452',
        selection: 'rgba(29, 111, 138, 0.14)',
      }
}

/** Room kept above the data for marker labels, as a fraction of the data's span. */
export const MARKER_HEADROOM = 0.24

/**
 * Draws markers as dashed vertical lines with their labels on up to three staggered rows at the top,
 * so close lines (Ca II H and Hε) stay readable. Reads the markers at draw time, so the plot only
 * needs a redraw when they change.
 */
export function markersPlugin(getMarkers: () => readonly PlotMarker[], palette: () => PlotPalette): uPlot.Plugin {
  return {
    hooks: {
      draw: [
        (u: uPlot) => {
          const markers = getMarkers()
          const min = u.scales.x?.min
          const max = u.scales.x?.max
          if (markers.length === 0 || min == null || max == null) return
          const colours = palette()
          const ratio = typeof devicePixelRatio === 'number' && devicePixelRatio > 0 ? devicePixelRatio : 1
          const { ctx } = u
          const { left, top, width, height } = u.bbox
          const rowHeight = 14 * ratio
          const rows = [-Infinity, -Infinity, -Infinity]
          ctx.save()
          ctx.beginPath()
          ctx.rect(left, top, width, height)
          ctx.clip()
          ctx.font = `${11 * ratio}px Inter, system-ui, sans-serif`
          ctx.textAlign = 'center'
          ctx.textBaseline = 'top'
          const visible = markers.filter((m) => m.wavelength >= min && m.wavelength <= max).sort((a, b) => a.wavelength - b.wavelength)
          for (const m of visible) {
            const x = Math.round(u.valToPos(m.wavelength, 'x', true)) + 0.5
            const colour = m.color ?? (m.family ? colours.families[m.family] : colours.axis)
            const textWidth = ctx.measureText(m.label).width
            // No free row: the line is drawn without its label rather than over another one (zoom in to read it).
            const row = rows.findIndex((right) => right < x - textWidth / 2 - 4 * ratio)
            const labelTop = top + 2 * ratio + Math.max(row, 0) * rowHeight
            if (row >= 0) {
              rows[row] = x + textWidth / 2
              ctx.fillStyle = colours.markerText
              ctx.fillText(m.label, x, labelTop)
            }
            ctx.strokeStyle = colour
            ctx.lineWidth = ratio
            ctx.setLineDash([4 * ratio, 3 * ratio])
            ctx.beginPath()
            ctx.moveTo(x, row >= 0 ? labelTop + rowHeight - 2 * ratio : top + 3 * rowHeight)
            ctx.lineTo(x, top + height)
            ctx.stroke()
          }
          ctx.restore()
        },
      ],
    },
  }
}

/** The view moved by a fraction of its width (negative: to the blue), kept inside [lo, hi]. */
export function panRegion(region: WavelengthRegion, fraction: number, extent: WavelengthRegion): WavelengthRegion {
  const span = region[1] - region[0]
  let from = region[0] + span * fraction
  from = Math.max(extent[0], Math.min(from, extent[1] - span))
  return [from, Math.min(extent[1], from + span)]
}

/** The view widened (factor > 1) or narrowed about its centre, kept inside the extent; null once it covers it all. */
export function zoomRegion(region: WavelengthRegion, factor: number, extent: WavelengthRegion): WavelengthRegion | null {
  const centre = (region[0] + region[1]) / 2
  const half = ((region[1] - region[0]) * factor) / 2
  const from = Math.max(extent[0], centre - half)
  const to = Math.min(extent[1], centre + half)
  return from <= extent[0] && to >= extent[1] ? null : [from, to]
}
