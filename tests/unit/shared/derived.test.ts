import { describe, expect, it } from 'vitest'
import {
  deriveParameters,
  distanceFromMagnitudes,
  distanceFromParallax,
  distanceModulus,
  luminosityFromBolometricMagnitude,
  luminosityFromRadius,
  radiusFromLuminosity,
  SOLAR_LUMINOSITY_W,
  SOLAR_RADIUS_M,
  SOLAR_TEFF_K,
  STEFAN_BOLTZMANN,
} from '../../../shared/derived'
import { type MKValue, parseMK } from '../../../shared/mk'

function read(text: string): MKValue {
  const r = parseMK(text)
  if (!r.ok) throw new Error(r.reason)
  return r.value
}

function derived(text: string, input = {}) {
  const r = deriveParameters(read(text), input)
  if (!r.ok) throw new Error(r.reason)
  return r
}

describe('luminosityFromRadius', () => {
  it('closes L = 4πR²σT⁴ for the IAU 2015 nominal Sun to 0.1 % (reference sheet: 0.01 %)', () => {
    const l = 4 * Math.PI * SOLAR_RADIUS_M ** 2 * STEFAN_BOLTZMANN * SOLAR_TEFF_K ** 4
    expect(Math.abs(l / SOLAR_LUMINOSITY_W - 1)).toBeLessThan(1e-3)
    expect(Math.abs(luminosityFromRadius(1, SOLAR_TEFF_K) - 1)).toBeLessThan(1e-3)
  })
  it('scales as R² T⁴', () => {
    expect(luminosityFromRadius(2, 2 * SOLAR_TEFF_K) / luminosityFromRadius(1, SOLAR_TEFF_K)).toBeCloseTo(64, 10)
  })
})

describe('radiusFromLuminosity', () => {
  it('gives the Sun one solar radius to 0.1 %', () => {
    expect(Math.abs(radiusFromLuminosity(1, SOLAR_TEFF_K) - 1)).toBeLessThan(1e-3)
  })
  it('inverts luminosityFromRadius', () => {
    expect(radiusFromLuminosity(luminosityFromRadius(123.4, 4100), 4100)).toBeCloseTo(123.4, 9)
  })
  it('refuses a non-positive luminosity or temperature', () => {
    expect(() => radiusFromLuminosity(0, 5000)).toThrow('luminosity must be > 0, got 0')
    expect(() => radiusFromLuminosity(1, -1)).toThrow('Teff must be > 0 K, got -1')
  })
})

describe('luminosityFromBolometricMagnitude', () => {
  it('gives 1 L☉ at M_bol = 4.74 (IAU 2015 B2) and 100 L☉ five magnitudes brighter', () => {
    expect(luminosityFromBolometricMagnitude(4.74)).toBe(1)
    expect(luminosityFromBolometricMagnitude(-0.26)).toBeCloseTo(100, 10)
  })
})

describe('distanceModulus', () => {
  it('is 0 at 10 pc and 5 per factor of ten', () => {
    expect(distanceModulus(10)).toBe(0)
    expect(distanceModulus(100)).toBeCloseTo(5, 12)
  })
  it('round-trips with distanceFromMagnitudes, with and without extinction', () => {
    for (const d of [1.3, 10, 250, 8000]) {
      expect(distanceFromMagnitudes(distanceModulus(d) + 3.2, 3.2)).toBeCloseTo(d, 9)
      expect(distanceFromMagnitudes(distanceModulus(d) + 3.2 + 1.5, 3.2, 1.5)).toBeCloseTo(d, 9)
    }
  })
  it('refuses a non-positive distance', () => {
    expect(() => distanceModulus(0)).toThrow('distance must be > 0 pc, got 0')
  })
})

describe('distanceFromParallax', () => {
  it('gives 1000/ϖ pc for ϖ in mas', () => {
    expect(distanceFromParallax(100)).toBe(10)
  })
  it('refuses a non-positive parallax', () => {
    expect(() => distanceFromParallax(-2)).toThrow('parallax must be > 0 mas, got -2')
  })
})

// Radius ranges are the trade's rough figures (common practice): a G2 dwarf ≈ 1 R☉, a K0 giant
// ~10 R☉, an M2 supergiant hundreds to about a thousand R☉.
describe('deriveParameters', () => {
  it('gives a G2 V star about one solar radius (0.8–1.25 R☉)', () => {
    const r = derived('G2V')
    expect(r.radiusSolar.value).toBeGreaterThan(0.8)
    expect(r.radiusSolar.value).toBeLessThan(1.25)
    expect(r.teff.value).toBeGreaterThan(5600)
    expect(r.teff.value).toBeLessThan(5900)
  })
  it('gives a K0 III star about ten solar radii (5–20 R☉)', () => {
    const r = derived('K0III')
    expect(r.radiusSolar.value).toBeGreaterThan(5)
    expect(r.radiusSolar.value).toBeLessThan(20)
  })
  it('gives an M2 Ia star hundreds to about a thousand solar radii (200–1500 R☉)', () => {
    const r = derived('M2Ia')
    expect(r.radiusSolar.value).toBeGreaterThan(200)
    expect(r.radiusSolar.value).toBeLessThan(1500)
  })
  it('keeps L, R and Teff consistent with L = 4πR²σT⁴', () => {
    const r = derived('K1.5IIIb')
    expect(luminosityFromRadius(r.radiusSolar.value, r.teff.value)).toBeCloseTo(r.luminositySolar.value, 9)
  })
  it('interpolates an intermediate class between its neighbours', () => {
    const iv = derived('G5IV').absoluteMagnitudeV.value
    const v = derived('G5V').absoluteMagnitudeV.value
    expect(derived('G5IV-V').absoluteMagnitudeV.value).toBeCloseTo((iv + v) / 2, 12)
  })
  it('gives the spectroscopic distance that round-trips the distance modulus, with A_V = R_V·E(B−V)', () => {
    const mv = derived('A0V').absoluteMagnitudeV.value
    const m = mv + distanceModulus(250) + 3.1 * 0.2
    const r = derived('A0V', { apparentMagnitudeV: m, ebv: 0.2 })
    expect(r.av).toBeCloseTo(0.62, 12)
    expect(r.spectroscopicDistancePc!.value).toBeCloseTo(250, 9)
    expect(r.spectroscopicDistancePc!.uncertainty).toBeGreaterThan(0)
  })
  it('gives the parallax distance and its error', () => {
    const r = derived('K0III', { parallaxMas: 10, parallaxErrorMas: 0.5 })
    expect(r.parallaxDistancePc).toEqual({ value: 100, uncertainty: 5 })
  })
  it('grows the uncertainty from the classification with the type and class uncertainty', () => {
    const tight = derived('K0III', { typeUncertainty: 0.1, classUncertainty: 0.1 })
    const loose = derived('K0III', { typeUncertainty: 2, classUncertainty: 1 })
    expect(loose.teff.fromClassification).toBeGreaterThan(tight.teff.fromClassification)
    expect(loose.radiusSolar.uncertainty).toBeGreaterThan(tight.radiusSolar.uncertainty)
    expect(tight.teff.calibrationScatter).toBeCloseTo(0.03 * tight.teff.value, 9)
  })
  it('has no spread from the classification when the classification is certain', () => {
    const r = derived('G2V', { typeUncertainty: 0, classUncertainty: 0 })
    expect(r.teff.fromClassification).toBe(0)
    expect(r.teff.uncertainty).toBe(r.teff.calibrationScatter)
  })
  it('names the calibrations it used', () => {
    expect(derived('G2V').sources.bolometricCorrectionV).toContain('Flower (1996)')
  })
  it.each([
    ['DA3.4', 'a white-dwarf type has no MK calibration'],
    ['C-N5', 'a carbon type has no MK calibration'],
    ['WN7h', 'a wolf-rayet type has no MK calibration'],
    ['S4/2', 'a s-type type has no MK calibration'],
    ['sdB5', 'the "sd" prefix has no MK calibration'],
    ['G', 'the type has no subtype'],
    ['G2', 'there is no luminosity class'],
    ['B1Ia+', 'luminosity class Ia+ is beyond the calibrated classes Ia–V'],
    ['F5VI', 'luminosity class VI is beyond the calibrated classes Ia–V'],
    ['O3V', 'type code 3 is outside the calibration (5–65) for class V'],
    ['M2IV', 'type code 62 is outside the calibration (10–53) for class IV'],
  ])('flags %s as outside the MK grid: %s', (text, reason) => {
    expect(deriveParameters(read(text))).toEqual({ ok: false, flag: 'outside the MK grid', reason })
  })
  it('refuses negative uncertainties', () => {
    expect(() => deriveParameters(read('G2V'), { typeUncertainty: -1 })).toThrow('uncertainties must be ≥ 0')
  })
})

describe('deriveParameters between classes', () => {
  it('uses only the dwarf table for class V, so M2 V is derived though class IV stops at K3', () => {
    expect(deriveParameters(read('M2V')).ok).toBe(true)
  })
  it('needs both neighbouring tables for an intermediate class, so M2 IV-V is outside the grid', () => {
    expect(deriveParameters(read('M2IV-V'))).toEqual({
      ok: false,
      flag: 'outside the MK grid',
      reason: 'type code 62 is outside the calibration (10–53) for class IV-V',
    })
  })
})
