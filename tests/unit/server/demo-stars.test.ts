// The demo's invented stars: interpolated across the shipped MILES standards, never one of them,
// and normal enough that the demo queue shows what real work looks like.
import { describe, expect, it } from 'vitest'
import { DEMO_ENTRIES, DEMO_RESOLUTION_FWHM, demoObservation } from '../../../server/db/demo-spectra'
import { DEMO_MAX_SHARE, DEMO_MIN_STANDARDS, demoStar, typicalParameters } from '../../../server/db/demo-stars'
import { defaultLibrary } from '../../../server/spectra/match/load'
import { runPipeline } from '../../../server/spectra/pipeline'
import { parseMK } from '../../../shared/mk'

describe('demo stars', () => {
  it('is a blend of many standards for every demo entry, none carrying more than a quarter of it', () => {
    for (const e of DEMO_ENTRIES) {
      const star = demoStar(e.mkType)
      expect(star.maxShare, e.mkType).toBeLessThanOrEqual(DEMO_MAX_SHARE)
      expect(star.effectiveStandards, e.mkType).toBeGreaterThanOrEqual(DEMO_MIN_STANDARDS)
      expect(star.flux.every((f) => Number.isFinite(f) && f > 0)).toBe(true)
    }
  })

  it('puts the types at the temperatures and gravities of the trade', () => {
    // The Sun, G2 V: Teff 5772 K, log g 4.44 (IAU 2015 Resolution B3 nominal values, from memory).
    const sun = typicalParameters('G2 V')
    expect(Math.abs(sun.teff - 5772)).toBeLessThan(250)
    expect(Math.abs(sun.logg - 4.44)).toBeLessThan(0.4)
    // K0 III giants near 4750 K, log g about 2.5 (Alonso et al. 1999 giant calibration; Gray & Corbally 2009, from memory).
    const k0 = typicalParameters('K0 III')
    expect(Math.abs(k0.teff - 4750)).toBeLessThan(250)
    expect(Math.abs(k0.logg - 2.5)).toBeLessThan(0.6)
    // A0 V near 9500–9700 K (Vega, A0 V: 9600 K; common practice, from memory).
    expect(Math.abs(typicalParameters('A0 V').teff - 9600)).toBeLessThan(500)
  })

  it('gives demo spectra at their stated S/N that the classifier takes for normal stars near their type', () => {
    const library = defaultLibrary()
    const off: number[] = []
    for (const [k, e] of DEMO_ENTRIES.entries()) {
      const out = runPipeline({ spectrum: demoObservation(e, 2026 + k), inputFwhm: DEMO_RESOLUTION_FWHM }, library)
      const s = out.suggestion!
      // The noise added is the entry's S/N over 4000–5000 Å; the measured S/N should read it back.
      expect(Math.abs(out.analysis.snr! / e.snr - 1), e.objectName).toBeLessThan(0.15)
      const wanted = parseMK(e.mkType)
      if (!wanted.ok) throw new Error(e.mkType)
      expect(s.flags, e.objectName).not.toContain('poor-fit')
      off.push(Math.abs(s.typeCode - wanted.value.typeCode!))
    }
    // A demo is not a benchmark (bench/accuracy.ts is): most within two subtypes, none beyond four.
    expect(off.filter((d) => d <= 2).length).toBeGreaterThanOrEqual(20)
    expect(Math.max(...off)).toBeLessThanOrEqual(4)
  }, 60_000)
})
