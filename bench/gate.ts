/**
 * The accuracy gate of `npm test`: a fixed subset of the reference stars (every 6th star of the
 * shipped library, from the library's own copies so that any machine gives the same figures),
 * classified leave-one-star-out at native resolution with the resolution given. bench/accuracy.ts
 * writes its figures to bench/results/accuracy-gate.json; the test fails when either figure falls
 * more than GATE_MARGIN points below them.
 */
import type { PreparedMatchLibrary } from '../server/spectra/match'
import { runPipeline } from '../server/spectra/pipeline'
import { referenceStars } from './reference'
import { figures, type Scored } from './score'

export const GATE_EVERY = 6
export const GATE_MARGIN = 3

export interface GateFigures {
  n: number
  /** Per cent within ±1 subtype, and with the exact class. */
  within1: number
  exactClass: number
}

export function gateFigures(library: PreparedMatchLibrary): GateFigures {
  const stars = referenceStars(undefined, { fromFiles: false }).filter((_, i) => i % GATE_EVERY === 0)
  const rows: Scored[] = stars.map((s) => {
    const r = runPipeline({ spectrum: s.spectrum, inputFwhm: s.fwhm, exclude: s.exclude }, library).suggestion!
    return {
      truthType: s.typeCode,
      truthClass: s.classCode,
      truthClassRange: s.classRange,
      type: r.typeCode,
      classCode: r.classCode,
      sigmaType: r.uncertainty.subtypes,
      sigmaClass: r.uncertainty.classes,
      flags: r.flags,
    }
  })
  const f = figures(rows)
  return { n: f.n, within1: f.within1, exactClass: f.exactClass }
}
