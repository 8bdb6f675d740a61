import { computed, ref, shallowRef, watch, type Ref } from 'vue'
import { useStandardSeries } from '@/composables/useReview'
import { neighbourCells, type CompareMode, type MatrixPosition } from '@/lib/neighbourMatrix'
import { nearestStandard, type OverlayStandard } from '@/lib/reviewOverlay'

/** The standard drawn over the star in the large plot, with its flux and why it is shown. */
export interface ShownOverlay {
  standard: OverlayStandard
  wavelength: Float32Array
  flux: Float32Array
  why: string
}

const DIRECTION: Record<string, string> = {
  '-1,-1': 'one class brighter, one subtype earlier',
  '-1,0': 'one class brighter',
  '-1,1': 'one class brighter, one subtype later',
  '0,-1': 'one subtype earlier',
  '0,1': 'one subtype later',
  '1,-1': 'one class fainter, one subtype earlier',
  '1,0': 'one class fainter',
  '1,1': 'one class fainter, one subtype later',
}

/**
 * The review workspace's comparison state: the standard in the middle of the neighbour matrix, the
 * one shown in the large plot, the highlighted cell, and the series of the standards on screen.
 */
export function useNeighbourMatrix(standardList: Ref<OverlayStandard[]>) {
  const standardById = computed(() => new Map(standardList.value.map((s) => [s.id, s])))
  const centreId = ref<number | null>(null)
  const pickedId = ref<number | null>(null)
  const pickedWhy = ref('')
  const cursor = ref<MatrixPosition>({ row: 0, col: 0 })
  const mode = ref<CompareMode>('difference')

  const centre = computed(() => (centreId.value === null ? null : (standardById.value.get(centreId.value) ?? null)))
  const cells = computed(() => neighbourCells(standardList.value, centre.value))
  const cursorCell = computed(() => cells.value.find((c) => c.row === cursor.value.row && c.col === cursor.value.col) ?? null)
  const picked = computed(() => (pickedId.value === null ? null : (standardById.value.get(pickedId.value) ?? null)))

  const seriesIds = computed(() => {
    const ids = cells.value.map((c) => c.standard?.id).filter((id): id is number => id !== undefined)
    if (pickedId.value !== null) ids.push(pickedId.value)
    return [...new Set(ids)]
  })
  const standardSeries = useStandardSeries(seriesIds)
  const seriesOf = (id: number) => {
    const s = standardSeries.data.value.get(id)
    const wavelength = s?.columns.wavelength
    const flux = s?.columns.rectified ?? s?.columns.flux
    return wavelength && flux ? { wavelength, flux } : null
  }

  function centreOn(id: number | null, why: string): void {
    centreId.value = id
    pickedId.value = id
    pickedWhy.value = why
    cursor.value = { row: 0, col: 0 }
  }

  /** Shows the cell's standard in the large plot and makes it the middle of the matrix. */
  function pickCell(at: MatrixPosition): boolean {
    const cell = cells.value.find((c) => c.row === at.row && c.col === at.col)
    if (!cell?.standard) return false
    const why = at.row === 0 && at.col === 0 ? pickedWhy.value || 'picked' : (DIRECTION[`${at.row},${at.col}`] ?? 'picked')
    centreOn(cell.standard.id, why)
    return true
  }

  function chooseStandard(id: number | null): void {
    if (id !== null) centreOn(id, 'chosen by name')
  }

  /** The standard nearest a type and class, e.g. the call being written, so a blind classifier can check it. */
  function overlayNearest(typeCode: number, classCode: number): void {
    const s = nearestStandard(standardList.value, typeCode, classCode)
    if (s) centreOn(s.id, 'nearest your call')
  }

  // While the next standard loads, the one before stays drawn, so the plot does not flicker to no overlay.
  const lastOverlay = shallowRef<ShownOverlay | null>(null)
  const overlay = computed<ShownOverlay | null>(() => {
    const std = picked.value
    if (!std) return null
    const s = seriesOf(std.id)
    return s ? { standard: std, wavelength: s.wavelength, flux: s.flux, why: pickedWhy.value } : lastOverlay.value
  })
  watch(overlay, (shown) => (lastOverlay.value = shown))

  return { standardById, centreId, pickedId, pickedWhy, cursor, mode, centre, cells, cursorCell, picked, standardSeries, seriesOf, centreOn, pickCell, chooseStandard, overlayNearest, overlay }
}
