/**
 * Cells of type × class coverage: how an instrument's standards are counted when the standards
 * library looks for gaps. A cell is one subtype (the type code rounded) and one luminosity class
 * (the nearest of Ia … V; intermediate classes fall to the brighter, Keenan's IIIa and IIIb to III).
 */
import { LUMINOSITY_CLASSES, formatTypeCode } from './mk'

/** Classes a cell can have, brightest first: the MK classes from Ia to V (shared/mk.ts). */
export const COVERAGE_CLASSES: ReadonlyArray<{ text: string; code: number }> = LUMINOSITY_CLASSES.filter((c) => c.code >= 1 && c.code <= 6)

export interface CoverageCell {
  /** The subtype, as a whole type code (O0 = 0 … M9 = 69). */
  typeCode: number
  /** One of COVERAGE_CLASSES' codes. */
  classCode: number
  /** E.g. "K0 III". */
  label: string
}

/** The coverage cell of a type and class code. */
export function coverageCell(typeCode: number, classCode: number): CoverageCell {
  const t = Math.max(0, Math.min(69, Math.round(typeCode)))
  let best = COVERAGE_CLASSES[0]!
  for (const c of COVERAGE_CLASSES) if (Math.abs(c.code - classCode) < Math.abs(best.code - classCode) - 1e-9) best = c
  return { typeCode: t, classCode: best.code, label: `${formatTypeCode(t)} ${best.text}` }
}

/** A key that is the same for two codes in one cell. */
export const cellKey = (cell: Pick<CoverageCell, 'typeCode' | 'classCode'>) => `${cell.typeCode}|${cell.classCode}`
