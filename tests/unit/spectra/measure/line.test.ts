import { describe, expect, it } from 'vitest'
import { measureSpectrumLine } from '../../../../server/spectra/measure/line'
import type { ClassificationLine } from '../../../../shared/lines'
import { linearWavelengths, syntheticSpectrum } from '../prepare/synthetic'

const line = (over: Partial<ClassificationLine> = {}): ClassificationLine => ({
  id: 'test',
  name: 'test line',
  wavelength: 4500,
  wavelengthSource: 'synthetic',
  family: 'metal',
  window: [4400, 4600],
  blue: [4300, 4350],
  red: [4650, 4700],
  windowSource: 'synthetic',
  indicates: ['temperature'],
  ...over,
})
const wavelength = linearWavelengths(4250, 4750, 0.25)
function measured(m: ReturnType<typeof measureSpectrumLine>) {
  if (!m.measured) throw new Error(m.detail)
  return m
}

describe('measureSpectrumLine', () => {
  it('gives EW = A σ √(2π) for a Gaussian line (1e-6 Å), with its FWHM, depth and centroid', () => {
    const A = 0.6
    const sigma = 2
    const ew = A * sigma * Math.sqrt(2 * Math.PI)
    const m = measured(measureSpectrumLine(syntheticSpectrum(wavelength, [{ centre: 4500.1, ew, sigma, gamma: 0 }]), line()))
    expect(m.equivalentWidth).toBeCloseTo(ew, 6)
    expect(m.depth).toBeCloseTo(A, 3)
    expect(m.fwhm! / (2.3548200450309493 * sigma)).toBeCloseTo(1, 3)
    expect(m.centroid).toBeCloseTo(4500.1, 6)
  })
  it('gives EW = A π γ for a Lorentzian line, less the wings beyond the window: 2Aγ·atan(W/γ) (5e-5 Å, the pixel-sum error on a 0.25 Å grid)', () => {
    const A = 0.5
    const gamma = 0.5
    const ew = A * Math.PI * gamma // area of the whole profile
    const spectrum = syntheticSpectrum(wavelength, [{ centre: 4500, ew, sigma: 1e-7, gamma }])
    const m = measured(measureSpectrumLine(spectrum, line()))
    // Inside ±100 Å the Lorentzian holds 2Aγ·atan(100/γ) = 99.68 % of A π γ. Its wings also lower
    // both side bands (150–200 Å out) by δ = Aγ(atan(200/γ) − atan(150/γ))/50, so the measured
    // value is W − (W − EW_window)/(1 − δ) with W = 200 Å.
    const inWindow = 2 * A * gamma * Math.atan(100 / gamma)
    const delta = (A * gamma * (Math.atan(200 / gamma) - Math.atan(150 / gamma))) / 50
    expect(m.equivalentWidth).toBeCloseTo(200 - (200 - inWindow) / (1 - delta), 4)
    expect(inWindow / ew).toBeCloseTo(1 - (2 / Math.PI) * Math.atan(gamma / 100), 12)
    expect(m.fwhm).toBeCloseTo(2 * gamma, 2)
  })
  it('gives no FWHM when the window sits above its side bands, as in a blanketed cool star', () => {
    // Side bands depressed by absorption, the window itself clear: no line core to measure a width of.
    const spectrum = syntheticSpectrum(wavelength, [
      { centre: 4325, ew: 20, sigma: 20, gamma: 0 },
      { centre: 4675, ew: 20, sigma: 20, gamma: 0 },
    ])
    const m = measured(measureSpectrumLine(spectrum, line()))
    expect(m.equivalentWidth).toBeLessThan(0)
    expect(m.fwhm).toBeNull()
  })
  it('takes the continuum as the straight line through the side-band means', () => {
    const spectrum = syntheticSpectrum(wavelength, [{ centre: 4500, ew: 2, sigma: 3, gamma: 0 }], {
      continuum: (w) => 1 + (w - 4500) / 1000,
    })
    const m = measured(measureSpectrumLine(spectrum, line()))
    expect(m.continuum.blue).toBeCloseTo(1 + (4325 - 4500) / 1000, 9)
    expect(m.equivalentWidth).toBeCloseTo(2, 3)
  })
  it('recovers injected EWs with errors that match the scatter, across noise levels (seeded)', () => {
    for (const snr of [30, 100, 300]) {
      const values: number[] = []
      let reported = 0
      for (let seed = 1; seed <= 150; seed++) {
        const spectrum = syntheticSpectrum(wavelength, [{ centre: 4500, ew: 1.5, sigma: 2, gamma: 0.3 }], { snr, seed: seed * 7919 + snr })
        const m = measured(measureSpectrumLine(spectrum, line({ window: [4480, 4520] })))
        values.push(m.equivalentWidth)
        reported += m.equivalentWidthError! / 150
      }
      const mean = values.reduce((s, v) => s + v, 0) / values.length
      const sd = Math.sqrt(values.reduce((s, v) => s + (v - mean) ** 2, 0) / (values.length - 1))
      // Truth inside ±20 Å: the Voigt wings beyond hold ~1 % of the area; compare with the window value.
      const truthInWindow = measured(measureSpectrumLine(syntheticSpectrum(wavelength, [{ centre: 4500, ew: 1.5, sigma: 2, gamma: 0.3 }]), line({ window: [4480, 4520] }))).equivalentWidth
      expect(Math.abs(mean - truthInWindow)).toBeLessThan((3 * sd) / Math.sqrt(150))
      expect(Math.abs(sd / reported - 1)).toBeLessThan(0.2)
    }
  })
  it('propagates an S/N into an EW error when the spectrum has no errors', () => {
    const { flux } = syntheticSpectrum(wavelength, [{ centre: 4500, ew: 1, sigma: 2, gamma: 0 }])
    const m = measured(measureSpectrumLine({ wavelength, flux }, line(), { snr: 100 }))
    // 800 pixels of 0.25 Å at σ = 0.01: √800 · 0.25 · 0.01 = 0.0707 Å plus the continuum term.
    expect(m.equivalentWidthError!).toBeGreaterThan(0.07)
    expect(m.equivalentWidthError!).toBeLessThan(0.2)
    expect(measured(measureSpectrumLine({ wavelength, flux }, line())).equivalentWidthError).toBeNull()
  })
  it('scales the variance by the noise correlation', () => {
    const spectrum = syntheticSpectrum(wavelength, [{ centre: 4500, ew: 1, sigma: 2, gamma: 0 }], { snr: 50 })
    const one = measured(measureSpectrumLine(spectrum, line())).equivalentWidthError!
    const four = measured(measureSpectrumLine(spectrum, line(), { noiseCorrelation: 4 })).equivalentWidthError!
    expect(four / one).toBeCloseTo(2, 9)
  })
  it('reports a band depth as the mean depth over the window', () => {
    const flux = Float64Array.from(wavelength, (w) => (w >= 4400 && w <= 4600 ? 0.7 : 1))
    const m = measured(measureSpectrumLine({ wavelength, flux }, line({ family: 'band' })))
    expect(m.depth).toBeCloseTo(0.3, 2)
  })
  it('does not measure a line outside the coverage, and says why', () => {
    const m = measureSpectrumLine(syntheticSpectrum(wavelength, []), line({ red: [4700, 4800] }))
    expect(m).toMatchObject({ measured: false, reason: 'outside-coverage', detail: 'needs 4300.0–4800.0 Å; the spectrum covers 4249.9–4750.1 Å' })
  })
  it('does not measure a line under the S/N floor', () => {
    const m = measureSpectrumLine(syntheticSpectrum(wavelength, []), line(), { snr: 4, snrFloor: 10 })
    expect(m).toMatchObject({ measured: false, reason: 'low-snr', detail: 'S/N 4.0 is below the floor of 10' })
  })
  it('does not measure a line whose side band is mostly masked', () => {
    const spectrum = syntheticSpectrum(wavelength, [])
    const mask = Uint8Array.from(wavelength, (w) => (w > 4300 && w < 4340 ? 1 : 0))
    expect(measureSpectrumLine({ ...spectrum, mask }, line())).toMatchObject({
      measured: false,
      reason: 'masked-pixels',
      detail: '80 % of the blue side band is masked',
    })
  })
  it('refuses a one-pixel spectrum', () => {
    expect(() => measureSpectrumLine({ wavelength: Float64Array.from([4500]), flux: Float64Array.from([1]) }, line())).toThrow('spectrum has 1 pixel; at least 2 are needed')
  })
})
