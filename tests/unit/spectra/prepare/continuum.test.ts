import { describe, expect, it } from 'vitest'
import { fitSpectrumContinuum } from '../../../../server/spectra/prepare/continuum'
import { DEFAULT_GRID, gridWavelengths } from '../../../../shared/grid'
import { findLine } from '../../../../shared/lines'
import { syntheticSpectrum } from './synthetic'

const wavelength = gridWavelengths(DEFAULT_GRID)
const balmer = ['h-beta', 'h-gamma', 'h-delta', 'h-epsilon', 'h-8'].map((id) => findLine(id)!.wavelength)

/** Largest |rectified − 1| over pixels farther than `clear` Å from every listed line. */
function worstOffLine(rectified: Float64Array, centres: number[], clear: number): number {
  let worst = 0
  for (let i = 0; i < wavelength.length; i++) {
    const w = wavelength[i]!
    if (w < 3950 || centres.some((c) => Math.abs(w - c) < clear)) continue
    worst = Math.max(worst, Math.abs(rectified[i]! - 1))
  }
  return worst
}

describe('fitSpectrumContinuum', () => {
  it('follows the steep blue continuum of a hot star to 0.5 % away from the lines', () => {
    // f_λ ∝ λ⁻⁴ (the Rayleigh–Jeans tail: a continuum falls 13-fold from 3700 to 7000 Å).
    const hot = syntheticSpectrum(
      wavelength,
      [
        ...balmer.map((centre) => ({ centre, ew: 3, sigma: 2, gamma: 1.5 })),
        { centre: findLine('he-i-4471')!.wavelength, ew: 0.8, sigma: 1.5, gamma: 0 },
        { centre: findLine('he-ii-4542')!.wavelength, ew: 0.5, sigma: 1.5, gamma: 0 },
      ],
      { continuum: (w) => (4000 / w) ** 4, snr: 300, seed: 11 },
    )
    const fit = fitSpectrumContinuum(hot)
    expect(fit.pseudoContinuum).toBe(false)
    expect(worstOffLine(fit.rectified, [...balmer, 4471.48, 4541.59], 60)).toBeLessThan(0.02)
    // Smooth continuum: compare the fitted continuum with the truth directly.
    for (let i = 0; i < wavelength.length; i += 97) {
      const w = wavelength[i]!
      if (w > 3950) expect(Math.abs(fit.continuum[i]! / (4000 / w) ** 4 - 1)).toBeLessThan(0.005)
    }
  })
  it('rides above the lines of an A star with broad Balmer wings (continuum within 1 %)', () => {
    const star = syntheticSpectrum(
      wavelength,
      balmer.map((centre) => ({ centre, ew: 12, sigma: 2.5, gamma: 4 })),
      { continuum: (w) => (w / 5000) ** -2.5, snr: 200, seed: 5 },
    )
    const fit = fitSpectrumContinuum(star)
    for (let i = 0; i < wavelength.length; i += 53) {
      const w = wavelength[i]!
      if (w > 3950) expect(Math.abs(fit.continuum[i]! / (w / 5000) ** -2.5 - 1)).toBeLessThan(0.01)
    }
  })
  it('falls back to a pseudo-continuum through band-free peaks for an M star, and says so', () => {
    const heads = ['tio-4762', 'tio-4954', 'tio-5167'].map((id) => findLine(id)!.wavelength).concat([5448, 5847, 6158])
    const flux = Float64Array.from(wavelength, (w) => {
      let f = w / 7000 // red continuum
      for (const h of heads) if (w >= h && w < h + 150) f *= 1 - 0.5 * Math.exp(-(w - h) / 60)
      return f
    })
    const fit = fitSpectrumContinuum({ wavelength, flux })
    expect(fit.pseudoContinuum).toBe(true)
    expect(fit.bandDepth!).toBeGreaterThan(0.3)
    // The envelope sits on the band-free peaks just blueward of the heads.
    for (const h of heads) {
      const i = Math.round(Math.log((h - 3) / DEFAULT_GRID.start) / DEFAULT_GRID.step)
      expect(Math.abs(fit.rectified[i]! - 1)).toBeLessThan(0.05)
    }
  })
  it('can be told never to use a pseudo-continuum', () => {
    const flux = Float64Array.from(wavelength, (w) => (w >= 4954 && w < 5050 ? 0.4 : 1))
    expect(fitSpectrumContinuum({ wavelength, flux }, { pseudoContinuum: 'never' }).pseudoContinuum).toBe(false)
    expect(fitSpectrumContinuum({ wavelength, flux }).pseudoContinuum).toBe(true)
  })
  it('returns NaN continuum and rectified flux on masked pixels', () => {
    const flux = new Float64Array(wavelength.length).fill(2)
    const mask = new Uint8Array(wavelength.length)
    mask[100] = 1
    const fit = fitSpectrumContinuum({ wavelength, flux, mask })
    expect(fit.rectified[100]).toBeNaN()
    expect(fit.rectified[200]).toBeCloseTo(1, 10)
  })
  it('refuses to fit when too few points remain outside the masks', () => {
    const w = Float64Array.from([4860, 4861, 4862, 4863])
    expect(() => fitSpectrumContinuum({ wavelength: w, flux: Float64Array.from([1, 1, 1, 1]) })).toThrow('too few continuum points to fit: 0')
  })
})

describe('fitSpectrumContinuum in ln F', () => {
  it('rectifies a real K giant and the same star reddened by E(B−V) = 1 more alike than a fit in F does (CCM89 law, checked against python3-extinction)', async () => {
    const { loadObservedLibrary } = await import('../../../../templates/observed/library')
    const { DEFAULT_OBSERVED_DIR } = await import('../../../../server/spectra/match/load')
    const { extinctionMagnitudes } = await import('../../../../shared/extinction')
    const { gridWavelengths } = await import('../../../../shared/grid')
    // HD 207130, K0 III (MILES v9.1): a line-crowded blue, where a fit in F rides differently once the slope changes.
    const library = loadObservedLibrary(DEFAULT_OBSERVED_DIR)
    const star = library.standards.find((s) => s.entry.star === 'HD207130')!
    const wavelength = gridWavelengths(library.grid)
    const keep = Array.from(wavelength.keys()).filter((i) => wavelength[i]! >= 3800 && wavelength[i]! <= 5600)
    const w = Float64Array.from(keep, (i) => wavelength[i]!)
    const f = Float64Array.from(keep, (i) => star.flux[i]!)
    const reddened = Float64Array.from(w, (l, k) => f[k]! * 10 ** (-0.4 * extinctionMagnitudes(l, { ebv: 1 })))
    const plain = fitSpectrumContinuum({ wavelength: w, flux: f }, { space: 'log' }).rectified
    const red = fitSpectrumContinuum({ wavelength: w, flux: reddened }, { space: 'log' }).rectified
    // Median |difference| of the rectified fluxes over the classification region 3850–5000 Å.
    const medianIn = (a: Float64Array, b: Float64Array) => {
      const d = Array.from(w.keys())
        .filter((k) => w[k]! >= 3850 && w[k]! <= 5000)
        .map((k) => Math.abs(a[k]! - b[k]!))
        .sort((x, y) => x - y)
      return d[d.length >> 1]!
    }
    const inLog = medianIn(plain, red)
    expect(inLog).toBeLessThan(0.025)
    // In F itself the same fit moves by more than twice as much.
    const inF = medianIn(fitSpectrumContinuum({ wavelength: w, flux: f }).rectified, fitSpectrumContinuum({ wavelength: w, flux: reddened }).rectified)
    expect(inF).toBeGreaterThan(2 * inLog)
  }, 30_000)

  it('rectifies a real K giant alike under a response 20× steeper across the spectrum, as an unfluxed spectrum can show, because no pixel weight strays far from the median', async () => {
    const { loadObservedLibrary } = await import('../../../../templates/observed/library')
    const { DEFAULT_OBSERVED_DIR } = await import('../../../../server/spectra/match/load')
    // HD 207130, K0 III (MILES v9.1), 3550–7400 Å, times (λ / 5000 Å)⁴: 0.25 at 3550 Å, 4.8 at 7400 Å.
    const library = loadObservedLibrary(DEFAULT_OBSERVED_DIR)
    const star = library.standards.find((s) => s.entry.star === 'HD207130')!
    const keep = Array.from(wavelength.keys()).filter((i) => wavelength[i]! >= 3550 && wavelength[i]! <= 7400 && Number.isFinite(star.flux[i]!))
    const w = Float64Array.from(keep, (i) => wavelength[i]!)
    const f = Float64Array.from(keep, (i) => star.flux[i]!)
    const steep = Float64Array.from(w, (l, k) => f[k]! * (l / 5000) ** 4)
    // 90th percentile of |difference| of the rectified fluxes over the classification region 3850–5000 Å.
    const p90 = (weightRange?: number) => {
      const a = fitSpectrumContinuum({ wavelength: w, flux: f }, { space: 'log', ...(weightRange ? { weightRange } : {}) }).rectified
      const b = fitSpectrumContinuum({ wavelength: w, flux: steep }, { space: 'log', ...(weightRange ? { weightRange } : {}) }).rectified
      const d = Array.from(w.keys())
        .filter((k) => w[k]! >= 3850 && w[k]! <= 5000)
        .map((k) => Math.abs(a[k]! - b[k]!))
        .sort((x, y) => x - y)
      return d[Math.floor(0.9 * d.length)]!
    }
    // 2 %: below the few-per-cent depths of the weak metal lines that carry a type (common practice).
    expect(p90()).toBeLessThan(0.02)
    // Weights (F/σ)² left as they are: the blue end, 400× less weighted than the red, is where the fit strays.
    expect(p90(Infinity)).toBeGreaterThan(5 * p90())
  }, 30_000)
})
