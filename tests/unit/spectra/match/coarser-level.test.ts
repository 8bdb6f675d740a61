// A spectrum whose type sits at an end of its library level is matched again at the sharpest
// coarser level whose standards reach further (pipeline.ts). The pipeline looks there without line
// measurements first, which is only right if the type a match gives never depends on them.
// Published types are those of the libraries' own indexes: MILES v9.1 (Sánchez-Blázquez et al. 2006,
// MNRAS 371, 703; 2.5 Å FWHM, Falcón-Barroso et al. 2011) and the JHC library (Jacoby, Hunter &
// Christian 1984, ApJS 56, 257; these copies smoothed to about 15 Å).
import { describe, expect, it } from 'vitest'
import { analyseSpectrum } from '../../../../server/spectra/analyse'
import { levelFor, matchSpectrum } from '../../../../server/spectra/match'
import { defaultLibrary } from '../../../../server/spectra/match/load'
import { runPipeline } from '../../../../server/spectra/pipeline'
import { referenceStars } from '../../../../bench/reference'

const library = defaultLibrary()
const stars = referenceStars()
const star = (name: string) => {
  const s = stars.find((x) => x.star === name)
  if (!s) throw new Error(`no reference star ${name}`)
  return s
}

describe('the coarser level for a type at the end of a level', () => {
  it('matches O dwarfs stated at 10 Å where the O standards are (a coarser level), and calls them O stars', () => {
    // HD 12993 O6.5 V and HD 44811 O7.5 V (JHC). The library's O standards are all JHC stars at
    // ≈15 Å, so no level at 10 Å holds them.
    for (const name of ['HD 12993', 'HD 44811']) {
      const s = star(name)
      const out = runPipeline({ spectrum: s.spectrum, inputFwhm: 10, exclude: s.exclude }, library)
      expect(out.suggestion!.letter, name).toBe('O')
      expect(out.resolution.level!, name).toBeGreaterThan(10)
      expect(
        out.notes.some((n) => n.includes('where the library reaches further')),
        name,
      ).toBe(true)
    }
  })

  it('gives the same type with the line measurements as without them (only the emission flag reads them)', () => {
    // Across types and classes, including emission-line and supergiant stars whose flags the lines set.
    for (const name of ['HD 12993', 'HD 14357', 'HD 108', 'HD164353', 'HD039970', 'HD050420', 'HD127334', 'HD145250', 'HD173740']) {
      const s = star(name)
      const level = levelFor(library, s.fwhm)
      const options = level > s.fwhm * 1.001 ? { inputFwhm: s.fwhm, targetFwhm: level } : { inputFwhm: s.fwhm }
      const full = analyseSpectrum(s.spectrum, options)
      const input = { rectified: full.prepared.rectified, mask: full.prepared.mask, snr: full.snr, fwhm: level }
      const exclude = { exclude: s.exclude }
      const withLines = matchSpectrum(library, { ...input, lines: full.lines }, exclude)
      const without = matchSpectrum(library, input, exclude)
      expect(withLines.typeCode, name).toBe(without.typeCode)
      expect(
        full.lines.some((l) => l.measured),
        name,
      ).toBe(true)
    }
  })
})
