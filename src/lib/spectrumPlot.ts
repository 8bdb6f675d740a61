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

/**
 * The region strip: named stretches of the classification region, each with the lines it is read
 * for. Bounds are ours (round numbers that hold each group of lines with some continuum around it).
 */
export interface NamedRegion {
  id: string
  name: string
  lines: string
  region: WavelengthRegion
}
export const NAMED_REGIONS: readonly NamedRegion[] = [
  { id: 'violet', name: 'Violet end', lines: 'H8 · Ca II K and H · Hε', region: [3860, 4000] },
  { id: 'delta', name: 'Around Hδ', lines: 'He I 4026 · Sr II 4077 · Si IV · Hδ · He I 4144', region: [4000, 4180] },
  { id: 'gamma', name: 'Hγ, G band', lines: 'Ca I 4226 · G band · Hγ · He I 4388', region: [4200, 4400] },
  { id: 'helium', name: 'He I, Mg II', lines: 'He I 4471 · Mg II 4481 · He II 4542 · Si III 4553', region: [4420, 4580] },
  { id: 'beta', name: 'He II 4686, Hβ', lines: 'He II 4686 · TiO 4762 · MgH · Hβ', region: [4660, 4940] },
  { id: 'green', name: 'Green bands', lines: 'TiO 4954 · Mg b · TiO 5167', region: [4940, 5220] },
  { id: 'yellow', name: 'Na D, TiO', lines: 'Fe I 5270 · Na D · TiO 6159', region: [5220, 6200] },
  { id: 'alpha', name: 'Around Hα', lines: 'Ca I 6439 · Hα · TiO 6651', region: [6380, 6800] },
]

/** The named regions that lie (at least three quarters) inside [lo, hi]. */
export function regionsWithin(lo: number, hi: number): NamedRegion[] {
  return NAMED_REGIONS.filter((r) => {
    const overlap = Math.min(hi, r.region[1]) - Math.max(lo, r.region[0])
    return overlap >= 0.75 * (r.region[1] - r.region[0])
  })
}

/**
 * The line families worth labelling for a suggested type (type code: O0 = 0, B0 = 10 … M0 = 60):
 * helium in O and B stars, the metals from late B on, the molecular bands from late F on; Balmer
 * lines until the K stars, where the metals and bands take over (common practice of MK work).
 */
export function familiesForType(typeCode: number | null | undefined): LineFamily[] {
  if (typeCode == null || !Number.isFinite(typeCode)) return ['balmer', 'helium', 'metal', 'band']
  const out: LineFamily[] = []
  if (typeCode < 50) out.push('balmer')
  if (typeCode < 20) out.push('helium')
  if (typeCode >= 15) out.push('metal')
  if (typeCode >= 35) out.push('band')
  return out
}

export interface PlotPalette {
  axis: string
  grid: string
  series: string[]
  overlays: string[]
  families: Record<LineFamily, string>
  markerText: string
  selection: string
}

/**
 * Colours for light and dark, in step with the app's theme (theme/overrides.ts). Curves and markers take
 * the colour-blind-safe set of Okabe & Ito (2008, "Color Universal Design"), distinct under the
 * common colour-vision deficiencies.
 */
export function plotPalette(dark: boolean): PlotPalette {
  return dark
    ? {
        axis: '#98a1ad',
        grid: '#2a3038',
        series: ['#dfe4ea', '#e69f00', '#56b4e9', '#009e73'],
        overlays: ['#e69f00', '#56b4e9', '#009e73', '#cc79a7'],
        families: { balmer: '#56b4e9', helium: '#f0e442', metal: '#cc79a7', band: '#009e73' },
        markerText: '#c3cad3',
        selection: 'rgba(90, 174, 203, 0.18)',
      }
    : {
        axis: '#5d6775',
        grid: '#e8ebef',
        series: ['#1c2330', '#d55e00', '#0072b2', '#009e73'],
        overlays: ['#d55e00', '#0072b2', '#009e73', '#cc79a7'],
        families: { balmer: '#0072b2', helium: '#9a7d00', metal: '#cc79a7', band: '#009e73' },
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
