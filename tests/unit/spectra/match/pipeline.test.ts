// runPipeline on stars of the shipped observed library (templates/observed-v2): MILES v9.1
// (Sánchez-Blázquez et al. 2006; 2.5 Å FWHM, Falcón-Barroso et al. 2011) and the JHC library
// (Jacoby, Hunter & Christian 1984, ApJS 56, 257; these copies at about 15 Å). Published types
// as the libraries give them (templates/observed-v2/manifest.json).
import { describe, expect, it } from 'vitest'
import { DEFAULT_GRID, SPEED_OF_LIGHT_KMS, gridWavelengths } from '../../../../shared/grid'
import { DEFAULT_OBSERVED_DIR, defaultLibrary, observedLibraryAt } from '../../../../server/spectra/match/load'
import { analyseSpectrum } from '../../../../server/spectra/analyse'
import { standardOnGrid } from '../../../../server/spectra/match'
import { fitSpectrumAtLevel } from '../../../../server/spectra/match/classify'
import { residualSnr, runPipeline } from '../../../../server/spectra/pipeline'
import { measureSpectrumRadialVelocity } from '../../../../server/spectra/prepare/rv'

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
  it('measures at rest what analyseSpectrum measures with the best standard as the radial-velocity reference', () => {
    for (const row of [40, 150]) {
      const spectrum = shifted(row)
      const out = runPipeline({ spectrum, inputFwhm: 2.5 }, library)
      // The best standard at the spectrum's level, found as the pipeline finds it: among the
      // standards rectified over the 3800–5500 Å the spectrum covers.
      const matched = library.rectifiedOver([3800, 5500])
      const first = analyseSpectrum(spectrum, { inputFwhm: 2.5, snrFloor: Infinity })
      const { level, fit } = fitSpectrumAtLevel(matched, { rectified: first.prepared.rectified, mask: first.prepared.mask, snr: first.snr, fwhm: 2.5 }, 2.5)
      let best = 0
      for (let r = 1; r < fit.chi2.length; r++) if (fit.chi2[r]! < fit.chi2[best]!) best = r
      const reference = standardOnGrid(matched, level, best)
      const p = first.prepared
      const velocity = measureSpectrumRadialVelocity({ wavelength: gridWavelengths(p.grid), flux: p.rectified, mask: p.mask }, reference, { grid: p.grid, region: [3850, 5000] })
      const residual = residualSnr(matched, level, best, first, spectrum, [3850, 5000], velocity.found ? velocity.velocity : 0)
      expect(residual).not.toBeNull()
      const direct = analyseSpectrum(spectrum, { inputFwhm: 2.5, rvReference: reference, residualSnr: residual! })
      expect(out.analysis.rv!.v).toBe(direct.rv!.v)
      // The standards are at rest only to about ±10 km/s each (from memory of the MILES papers), so the
      // velocity against another star carries that too.
      expect(Math.abs(out.analysis.rv!.v - 120)).toBeLessThan(25)
      expect(out.analysis.snr!).toBeCloseTo(direct.snr!, 6)
      expect(out.analysis.warnings).toEqual(direct.warnings)
      // The pipeline shifts its observed-frame preparation to rest instead of preparing the shifted
      // pixels again: the same spectrum to within the 1 % ripple, the same lines to within a tenth of their errors.
      const wavelength = gridWavelengths(direct.prepared.grid)
      let worst = 0
      let maskDiffers = 0
      for (let i = 0; i < wavelength.length; i++) {
        if (out.analysis.prepared.mask[i] !== direct.prepared.mask[i]) maskDiffers++
        else if (wavelength[i]! >= 3850 && wavelength[i]! <= 5000) worst = Math.max(worst, Math.abs(out.analysis.prepared.rectified[i]! - direct.prepared.rectified[i]!))
      }
      expect(maskDiffers).toBeLessThanOrEqual(2)
      expect(worst).toBeLessThan(0.01 * 3)
      expect(out.analysis.lines.map((l) => [l.id, l.measured])).toEqual(direct.lines.map((l) => [l.id, l.measured]))
      direct.lines.forEach((line, k) => {
        if (!line.measured || line.equivalentWidthError === null) return
        const ours = out.analysis.lines[k]!
        if (!ours.measured) return
        expect(Math.abs(ours.equivalentWidth - line.equivalentWidth), line.id).toBeLessThan(0.1 * line.equivalentWidthError)
      })
      expect(out.resolution).toEqual({ fwhm: 2.5, source: 'given', bound: null, level: 2.5 })
    }
  }, 60_000)

  it('brings a spectrum broader than the sharpest standards to the level at or just above its resolution', () => {
    const out = runPipeline({ spectrum: shifted(40), inputFwhm: 6.3 }, library)
    expect(out.resolution.source).toBe('given')
    expect(out.resolution.level).toBe(library.resolutions.find((l) => l >= 6.3))
    expect(out.suggestion!.levelFwhm).toBe(out.resolution.level)
  }, 60_000)

  it('classifies O dwarfs of the 15 Å library as O stars from the other standards, the resolution given or estimated', () => {
    // HD 242908 O5 V and HD 44811 O7.5 V in the JHC library; the sharper MILES standards start at B.
    for (const id of ['jhc-HD242908', 'jhc-HD44811']) {
      const row = rowOf(id)
      expect(row, id).toBeGreaterThanOrEqual(0)
      const flux = observed.standards[row]!.flux
      const spectrum = {
        wavelength: gridWavelengths(DEFAULT_GRID),
        flux: Float64Array.from(flux, (v) => (Number.isFinite(v) ? v : 0)),
        mask: Uint8Array.from(flux, (v) => (Number.isFinite(v) ? 0 : 1)),
      }
      for (const given of [15, undefined]) {
        const out = runPipeline({ spectrum, ...(given ? { inputFwhm: given } : {}), exclude: sameStar(row) }, library)
        expect(out.suggestion!.letter, `${id} ${given ?? 'estimated'}`).toBe('O')
      }
    }
  }, 60_000)
})
