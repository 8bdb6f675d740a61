// runPipeline on stars of the shipped observed library (templates/observed-v1): MILES v9.1
// (Sánchez-Blázquez et al. 2006; 2.5 Å FWHM, Falcón-Barroso et al. 2011) and the JHC library
// (Jacoby, Hunter & Christian 1984, ApJS 56, 257; these copies at about 15 Å). Published types
// as the libraries give them (templates/observed-v1/manifest.json).
import { describe, expect, it } from 'vitest'
import { DEFAULT_GRID, SPEED_OF_LIGHT_KMS, gridWavelengths } from '../../../../shared/grid'
import { DEFAULT_OBSERVED_DIR, defaultLibrary, observedLibraryAt } from '../../../../server/jobs/worker'
import { analyseSpectrum } from '../../../../server/spectra/analyse'
import { standardOnGrid } from '../../../../server/spectra/match'
import { fitSpectrumAtLevel } from '../../../../server/spectra/match/classify'
import { runPipeline } from '../../../../server/spectra/pipeline'

const library = defaultLibrary()
const { library: observed, inputs } = observedLibraryAt(DEFAULT_OBSERVED_DIR)

/** A library star at +120 km/s on 3000 linear pixels 3800–5500 Å with a sloped continuum and a deterministic 1 % ripple as noise. */
function shifted(row: number) {
  const s = observed.standards[row]!.flux
  const n = 3000
  const wavelength = new Float64Array(n)
  const flux = new Float64Array(n)
  const shift = 1 + 120 / SPEED_OF_LIGHT_KMS
  for (let i = 0; i < n; i++) {
    const wl = 3800 + (1700 * i) / (n - 1)
    wavelength[i] = wl
    const x = Math.log(wl / shift / DEFAULT_GRID.start) / DEFAULT_GRID.step
    const j = Math.floor(x)
    flux[i] = (s[j]! + (s[j + 1]! - s[j]!) * (x - j)) * (1 + 0.0002 * (wl - 4500)) * (1 + 0.01 * Math.sin(i * 2.1))
  }
  return { wavelength, flux }
}

const rowOf = (id: string) => observed.standards.findIndex((s) => s.entry.id === id)
const sameStar = (row: number) => new Set(inputs.filter((i) => i.star === inputs[row]!.star).map((i) => i.id))

describe('runPipeline', () => {
  it('gives the analysis that analyseSpectrum gives with the best standard as the radial-velocity reference', () => {
    for (const row of [40, 150]) {
      const spectrum = shifted(row)
      const out = runPipeline({ spectrum, inputFwhm: 2.5 }, library)
      // The best standard at the spectrum's level, found as the pipeline finds it.
      const first = analyseSpectrum(spectrum, { inputFwhm: 2.5, snrFloor: Infinity })
      const { level, fit } = fitSpectrumAtLevel(library, { rectified: first.prepared.rectified, mask: first.prepared.mask, snr: first.snr, fwhm: 2.5 }, 2.5)
      let best = 0
      for (let r = 1; r < fit.chi2.length; r++) if (fit.chi2[r]! < fit.chi2[best]!) best = r
      const direct = analyseSpectrum(spectrum, { inputFwhm: 2.5, rvReference: standardOnGrid(library, level, best) })
      expect(out.analysis.rv!.v).toBe(direct.rv!.v)
      expect(out.analysis.rv!.v).toBeCloseTo(120, -1)
      expect(out.analysis.snr!).toBeCloseTo(direct.snr!, 6)
      expect(Array.from(out.analysis.prepared.rectified)).toEqual(Array.from(direct.prepared.rectified))
      expect(out.analysis.lines).toEqual(direct.lines)
      expect(out.analysis.warnings).toEqual(direct.warnings)
      expect(out.resolution).toEqual({ fwhm: 2.5, source: 'given', bound: null, level: 2.5 })
    }
  }, 60_000)

  it('brings a spectrum broader than the sharpest standards to the level just above its resolution', () => {
    const out = runPipeline({ spectrum: shifted(40), inputFwhm: 6.3 }, library)
    expect(out.resolution.source).toBe('given')
    expect(out.resolution.level).toBeGreaterThanOrEqual(6.3 / 1.08)
    expect(library.resolutions.filter((l) => l >= 6.3 / 1.08)[0]).toBe(out.resolution.level)
    expect(out.suggestion!.levelFwhm).toBe(out.resolution.level)
  }, 60_000)

  it('classifies an O dwarf from the 15 Å standards when its spectrum claims to be sharper, and says so', () => {
    // HD 242908, O5 V in the JHC library; the sharper MILES standards start at B.
    const row = rowOf('jhc-HD242908')
    expect(row).toBeGreaterThanOrEqual(0)
    const wavelength = gridWavelengths(DEFAULT_GRID)
    const spectrum = { wavelength, flux: Float64Array.from(observed.standards[row]!.flux, (v) => (Number.isFinite(v) ? v : 0)), mask: Uint8Array.from(observed.standards[row]!.flux, (v) => (Number.isFinite(v) ? 0 : 1)) }
    const out = runPipeline({ spectrum, inputFwhm: 2.5, exclude: sameStar(row) }, library)
    expect(out.suggestion!.letter).toBe('O')
    expect(out.resolution.level).toBe(15)
    expect(out.notes.join(' ')).toContain('matched at 15 Å')
  }, 60_000)
})
