import { LUMINOSITY_CLASSES, formatTypeCode, neighbourClass, neighbourType } from '@shared/mk'

/** What overlay choice needs to know of a standard. */
export interface OverlayStandard {
  id: number
  spectralType: string
  typeCode: number
  luminosityClass: string
  classCode: number
}

/** Distance in the (type, class) grid: one subtype counts as one, one class step as two subtypes. */
function distance(s: OverlayStandard, typeCode: number, classCode: number): number {
  return Math.abs(s.typeCode - typeCode) + 2 * Math.abs(s.classCode - classCode)
}

/** The existing standard nearest a (type code, class code) point; ties go to the earlier type, then the brighter class. */
export function nearestStandard<S extends OverlayStandard>(standards: readonly S[], typeCode: number, classCode: number, exclude?: number): S | null {
  let best: S | null = null
  let bestD = Infinity
  for (const s of standards) {
    if (s.id === exclude) continue
    const d = distance(s, typeCode, classCode)
    if (d < bestD - 1e-9 || (Math.abs(d - bestD) <= 1e-9 && best !== null && (s.typeCode < best.typeCode || (s.typeCode === best.typeCode && s.classCode < best.classCode)))) {
      best = s
      bestD = d
    }
  }
  return best
}

export type NeighbourStep = 'earlier' | 'later' | 'brighter' | 'fainter'

function classTextOfCode(code: number): string {
  let best = LUMINOSITY_CLASSES[0]!
  for (const c of LUMINOSITY_CLASSES) if (Math.abs(c.code - code) < Math.abs(best.code - code)) best = c
  return best.text
}

/**
 * The standard one step away from `from`: one subtype earlier or later at the same class, or one
 * class brighter or fainter at the same type. Looks further along the same direction until a
 * different standard turns up, so a sparse grid still moves; null at the edge of the library.
 */
export function neighbourStandard<S extends OverlayStandard>(standards: readonly S[], from: OverlayStandard, step: NeighbourStep): S | null {
  const along = standards.filter((s) => {
    if (s.id === from.id) return false
    if (step === 'earlier') return s.typeCode < from.typeCode - 1e-9
    if (step === 'later') return s.typeCode > from.typeCode + 1e-9
    if (step === 'brighter') return s.classCode < from.classCode - 1e-9
    return s.classCode > from.classCode + 1e-9
  })
  if (along.length === 0) return null
  if (step === 'earlier' || step === 'later') {
    const sign = step === 'earlier' ? -1 : 1
    for (let k = 1; k <= 70; k++) {
      const target = neighbourType(from.typeCode, sign * k)
      const hit = nearestStandard(along, target, from.classCode)
      if (hit && Math.abs(hit.typeCode - from.typeCode) > 1e-9) return hit
    }
    return null
  }
  const sign = step === 'brighter' ? -1 : 1
  let text = classTextOfCode(from.classCode)
  for (let k = 0; k < LUMINOSITY_CLASSES.length; k++) {
    text = neighbourClass(text, sign)
    const code = LUMINOSITY_CLASSES.find((c) => c.text === text)!.code
    const hit = nearestStandard(along, from.typeCode, code)
    if (hit) return hit
  }
  return null
}

/** Label for a standard in buttons and legends: "B8 III". */
export function standardLabel(s: Pick<OverlayStandard, 'spectralType' | 'typeCode' | 'luminosityClass'>): string {
  return s.spectralType || `${formatTypeCode(s.typeCode)} ${s.luminosityClass}`
}
