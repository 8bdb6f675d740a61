import { describe, expect, it } from 'vitest'
import { gridWavelengths } from '../../../shared/grid'
import { analyseSpectrum, type MeasuredLine } from '../../../server/spectra/analyse'
import { DEFAULT_OBSERVED_DIR, observedLibraryAt } from '../../../server/spectra/match/load'

// Real stars of the shipped observed library (MILES v9.1, Sánchez-Blázquez et al. 2006, 2.5 Å FWHM;
// types as published with the library), measured by the same code that measures uploads.
const { library } = observedLibraryAt(DEFAULT_OBSERVED_DIR)
const wavelength = gridWavelengths(library.grid)

function measure(id: string) {
  const std = [...library.standards, ...library.retired].find((s) => s.entry.id === id)
  if (!std) throw new Error(`no standard ${id}`)
  const flux = Float64Array.from(std.flux, (v) => (Number.isFinite(v) ? v : 0))
  const mask = Uint8Array.from(std.flux, (v) => (Number.isFinite(v) ? 0 : 1))
  const result = analyseSpectrum({ wavelength, flux, mask }, { grid: library.grid, inputFwhm: std.source.resolutionFwhm })
  const line = (lineId: string) => {
    const l = result.lines.find((x) => x.id === lineId)
    if (!l || !l.measured) throw new Error(`${lineId} not measured in ${id}`)
    return l as MeasuredLine
  }
  return { line }
}

describe('what the measurements show across real stars', () => {
  it('finds the hydrogen lines strongest near A0–A2 among dwarfs (Hγ + Hδ equivalent widths; common practice)', () => {
    // B5 V HD 198183, B9 V HD 130095, A0 V HD 31295, A2 V HD 196544, A4 V HD 109307, A7 V HD 23607, F0 V HD 8829, F1 V HD 222451.
    const ids = ['miles-m0775', 'miles-m0523', 'miles-m0166', 'miles-m0767', 'miles-m0922', 'miles-m0129', 'miles-m0058', 'miles-m0889']
    const strength = ids.map((id) => {
      const m = measure(id)
      return m.line('h-gamma').equivalentWidth + m.line('h-delta').equivalentWidth
    })
    const peak = ids[strength.indexOf(Math.max(...strength))]
    expect(['miles-m0523', 'miles-m0166', 'miles-m0767']).toContain(peak)
    // The F dwarfs have clearly weaker hydrogen than the A0–A2 dwarfs.
    expect(Math.max(strength[6]!, strength[7]!)).toBeLessThan(0.7 * Math.max(...strength))
  })

  it('gives A dwarf Balmer lines a larger Lorentzian width than A supergiant ones (Voigt fits of Hγ and Hδ; common practice)', () => {
    // A0 V HD 31295 and A1 V HD 60179 against A0 Ia HD 39970 and A0 Ib HD 87737.
    for (const [dwarfId, supergiantId] of [
      ['miles-m0166', 'miles-m0200'],
      ['miles-m0262', 'miles-m0371'],
    ]) {
      const dwarf = measure(dwarfId!)
      const supergiant = measure(supergiantId!)
      for (const id of ['h-gamma', 'h-delta']) {
        const d = dwarf.line(id).voigt
        const s = supergiant.line(id).voigt
        expect(d, `${dwarfId} ${id}`).toBeTruthy()
        expect(s, `${supergiantId} ${id}`).toBeTruthy()
        expect(d!.lorentzianFwhm, `${dwarfId} vs ${supergiantId} ${id}`).toBeGreaterThan(s!.lorentzianFwhm)
      }
    }
  })
})
