import { describe, expect, it } from 'vitest'
import { assertSpectrum } from '../../../../server/spectra/prepare/guards'
import { estimateSpectrumSnr } from '../../../../server/spectra/prepare/snr'
import { rebinSpectrumToLogGrid } from '../../../../server/spectra/prepare/rebin'
import { fitSpectrumContinuum } from '../../../../server/spectra/prepare/continuum'
import { maskSpectrumBadPixels } from '../../../../server/spectra/prepare/mask'
import { DEFAULT_GRID } from '../../../../shared/grid'

const f64 = (...v: number[]) => Float64Array.from(v)

describe('assertSpectrum', () => {
  it('refuses an empty spectrum', () => {
    expect(() => assertSpectrum({ wavelength: f64(), flux: f64() })).toThrow('spectrum is empty')
  })
  it('refuses a one-pixel spectrum where two are needed', () => {
    expect(() => assertSpectrum({ wavelength: f64(4000), flux: f64(1) }, 2)).toThrow('spectrum has 1 pixel; at least 2 are needed')
  })
  it('refuses flux and wavelength of different lengths', () => {
    expect(() => assertSpectrum({ wavelength: f64(4000, 4001), flux: f64(1) })).toThrow('flux has 1 values but wavelength has 2')
  })
  it('refuses an error array of the wrong length', () => {
    expect(() => assertSpectrum({ wavelength: f64(4000, 4001), flux: f64(1, 1), error: f64(1) })).toThrow('error has 1 values but wavelength has 2')
  })
  it('refuses a mask of the wrong length', () => {
    expect(() => assertSpectrum({ wavelength: f64(4000, 4001), flux: f64(1, 1), mask: new Uint8Array(3) })).toThrow('mask has 3 values but wavelength has 2')
  })
  it('refuses a NaN wavelength and names the pixel', () => {
    expect(() => assertSpectrum({ wavelength: f64(4000, Number.NaN), flux: f64(1, 1) })).toThrow('wavelength must be finite and strictly ascending (pixel 1)')
  })
  it('refuses descending or repeated wavelengths', () => {
    expect(() => assertSpectrum({ wavelength: f64(4000, 4000), flux: f64(1, 1) })).toThrow('wavelength must be finite and strictly ascending (pixel 1)')
  })
  it('accepts NaN flux, which later steps mask', () => {
    expect(() => assertSpectrum({ wavelength: f64(4000, 4001), flux: f64(Number.NaN, 1) })).not.toThrow()
  })
})

describe('guards of the preparation steps', () => {
  it('refuses to estimate S/N of an empty spectrum', () => {
    expect(() => estimateSpectrumSnr({ wavelength: f64(), flux: f64() })).toThrow('spectrum is empty')
  })
  it('refuses to rebin a one-pixel spectrum', () => {
    expect(() => rebinSpectrumToLogGrid({ wavelength: f64(4000), flux: f64(1) }, { grid: DEFAULT_GRID })).toThrow('spectrum has 1 pixel; at least 2 are needed')
  })
  it('refuses a continuum fit with no usable pixel', () => {
    expect(() => fitSpectrumContinuum({ wavelength: f64(4000, 4001), flux: f64(Number.NaN, Number.NaN) })).toThrow('spectrum has no usable pixels for a continuum fit')
  })
  it('refuses flags of the wrong length when masking', () => {
    expect(() => maskSpectrumBadPixels({ wavelength: f64(4000, 4001), flux: f64(1, 1) }, { flagged: [0] })).toThrow('flags have 1 values but wavelength has 2')
  })
})
