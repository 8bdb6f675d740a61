// The real A0 V standard: HST CALSPEC (STIS) spectrum of the MK primary standard of type A0 V
// (tests/fixtures/real/alpha_lyr_stis_010.fits, from python3-pysynphot; see its PROVENANCE note).
// Its type and class, A0 V, are common practice. Resolution ≈ 5.5 Å FWHM (tests/fixtures/real).
import { describe, expect, it } from 'vitest'
import { defaultLibrary } from '../../../../server/spectra/match/load'
import { readSpectrum } from '../../../../server/spectra/io'
import { toSpectrum1D } from '../../../../server/spectra/io/types'
import { runPipeline } from '../../../../server/spectra/pipeline'
import { smoothSpectrumToFwhm } from '../../../../server/spectra/prepare/smooth'
import { rebinSpectrumToLogGrid } from '../../../../server/spectra/prepare/rebin'
import { makeLogGrid } from '../../../../shared/grid'
import { realA0V } from '../../../helpers/spectra'

const library = defaultLibrary()
const read = readSpectrum(realA0V(), 'alpha_lyr_stis_010.fits')
if (!read.ok) throw new Error(read.message)
const spectrum = toSpectrum1D(read.spectrum)

function expectA0V(r: { typeCode: number; classCode: number; luminosityClass: string }) {
  expect(Math.abs(r.typeCode - 20)).toBeLessThanOrEqual(1)
  // Class V, or IV-V (class code 5.5).
  expect(r.classCode).toBeGreaterThanOrEqual(5.5)
}

describe('matchSpectrum on the real A0 V standard', () => {
  it('classifies it A0 V within one subtype at its own resolution', () => {
    const out = runPipeline({ spectrum, inputFwhm: 5.5 }, library)
    expectA0V(out.suggestion!)
    expect(out.suggestion!.flags).not.toContain('not-mk')
    expect(out.suggestion!.flags).not.toContain('emission')
  }, 30_000)

  it('classifies it A0 V when the resolution is not given', () => {
    expectA0V(runPipeline({ spectrum }, library).suggestion!)
  }, 30_000)

  it('classifies it A0 V when a wrong, sharper resolution of 3 Å is claimed (the spectrum cannot be smoothed to 3 Å: it is at 5.5 Å)', () => {
    expectA0V(runPipeline({ spectrum, inputFwhm: 3 }, library).suggestion!)
  }, 30_000)

  it('classifies it A0 V after smoothing to 8 Å', () => {
    const grid = makeLogGrid(3500, 7200, 2e-4)
    const onGrid = rebinSpectrumToLogGrid(spectrum, { grid })
    const smooth = smoothSpectrumToFwhm(onGrid, { grid, targetFwhm: 8, inputFwhm: 5.5 })
    const keep: number[] = []
    for (let i = 0; i < grid.length; i++) if (smooth.mask![i] === 0 && Number.isFinite(smooth.flux[i]!)) keep.push(i)
    const s = { wavelength: Float64Array.from(keep, (i) => smooth.wavelength[i]!), flux: Float64Array.from(keep, (i) => smooth.flux[i]!) }
    expectA0V(runPipeline({ spectrum: s, inputFwhm: 8 }, library).suggestion!)
  }, 30_000)
})
