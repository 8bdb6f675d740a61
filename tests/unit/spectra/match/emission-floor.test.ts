// mayShowEmission lets the pipeline skip the running median and the local noise of the not-a-star
// check; that is only right if notStarEvidence can find nothing whenever it says no.
import { describe, expect, it } from 'vitest'
import { seededRandom as random } from '../../../helpers/random'
import { mayShowEmission, notStarEvidence } from '../../../../server/spectra/match'

const n = 2000
const wavelength = Float64Array.from({ length: n }, (_, i) => 3900 + i * 0.8)

/** A flat continuum with noise, NaN gaps and, at `at`, a Gaussian bump of `height` and FWHM `fwhm` Å. */
function spectrum(next: () => number, height: number, fwhm: number, at: number): Float64Array {
  const s = fwhm / 2.3548
  return Float64Array.from({ length: n }, (_, i) => (next() < 0.02 ? Number.NaN : 1 + 0.01 * (next() - 0.5) + height * Math.exp(-0.5 * ((wavelength[i]! - at) / s) ** 2)))
}

describe('mayShowEmission', () => {
  it('says no only where notStarEvidence finds nothing, whatever the residual and the noise', () => {
    const next = random(21)
    let skipped = 0
    for (let trial = 0; trial < 300; trial++) {
      const typeCode = [20, 45, 58, 62][trial % 4]!
      // Heights around both floors (0.2, and 0.5 for M stars), broad and narrow, away from every stellar line.
      const rectified = spectrum(next, next() * 0.8, 5 + next() * 60, 4200 + next() * 1000)
      const residual = spectrum(next, next() * 0.8, 5 + next() * 60, 4200 + next() * 1000)
      const sigma = next() < 0.5 ? next() * 0.03 : Float64Array.from({ length: n }, () => next() * 0.03)
      if (mayShowEmission(rectified, typeCode)) continue
      skipped++
      expect(notStarEvidence(wavelength, rectified, residual, sigma, 2.5, typeCode), `trial ${trial}`).toBeNull()
    }
    expect(skipped).toBeGreaterThan(50)
  })

  it('says yes for a galaxy-like emission line 0.4 above the continuum, and the evidence then finds it', () => {
    const next = random(3)
    // 5007 Å redshifted to 5100 Å: away from every stellar emission line (flags.ts); 8 Å wide, well above 0.8 × 2.5 Å.
    const rectified = spectrum(next, 0.4, 8, 5100)
    expect(mayShowEmission(rectified, 20)).toBe(true)
    // Below the M-star floor of 0.5: no feature can count there.
    expect(mayShowEmission(rectified, 62)).toBe(false)
    expect(notStarEvidence(wavelength, rectified, rectified, 0.005, 2.5, 20)?.emission.map((e) => Math.round(e.wavelength))).toContain(5100)
  })
})
