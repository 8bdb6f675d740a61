import { describe, expect, it } from 'vitest'
import {
  CALIBRATION_SOURCES,
  absoluteMagnitudeV,
  bolometricCorrectionV,
  calibratedRange,
  effectiveTemperature,
  isCalibrated,
  spectralTypeFromCode,
  spectralTypeLabel,
  stellarParameters,
  surfaceGravity,
  typeCode,
} from '../../../shared/calibration'

describe('typeCode', () => {
  it('numbers B8 as 18 and K1.5 as 51.5', () => {
    expect(typeCode('B', 8)).toBe(18)
    expect(typeCode('K', 1.5)).toBe(51.5)
    expect(typeCode('O', 0)).toBe(0)
    expect(typeCode('M', 5)).toBe(65)
  })
  it('refuses a subtype of 10 or more', () => {
    expect(() => typeCode('A', 10)).toThrow('subtype must satisfy 0 ≤ subtype < 10, got 10')
  })
})

describe('spectralTypeFromCode', () => {
  it('inverts typeCode for every letter and half subtype', () => {
    for (const letter of ['O', 'B', 'A', 'F', 'G', 'K', 'M'] as const) {
      for (let s = 0; s < 10; s += 0.5) expect(spectralTypeFromCode(typeCode(letter, s))).toEqual({ letter, subtype: s })
    }
  })
  it('labels 51.5 as K1.5', () => {
    expect(spectralTypeLabel(51.5)).toBe('K1.5')
  })
  it('refuses a code of 70', () => {
    expect(() => spectralTypeFromCode(70)).toThrow('type code must satisfy 0 ≤ code < 70, got 70')
  })
})

describe('effectiveTemperature', () => {
  // Pecaut & Mamajek (2013) dwarf sequence, values as listed in the project's reference sheet (from memory).
  const dwarfs: Array<[string, number, number]> = [
    ['B', 0, 31400],
    ['B', 5, 15700],
    ['A', 0, 9700],
    ['A', 5, 8180],
    ['F', 0, 7220],
    ['F', 5, 6510],
    ['G', 0, 5920],
    ['G', 2, 5770],
    ['G', 5, 5660],
    ['K', 0, 5270],
    ['K', 5, 4440],
    ['M', 0, 3850],
    ['M', 5, 3060],
  ]
  it.each(dwarfs)('gives the Pecaut & Mamajek (2013) Teff of %s%s V', (letter, subtype, teff) => {
    expect(effectiveTemperature(typeCode(letter as 'B', subtype), 'V')).toBe(teff)
  })
  it('gives the Martins et al. (2005) observational Teff of O5 III and O5 I (from memory)', () => {
    expect(effectiveTemperature(5, 'III')).toBe(40060)
    expect(effectiveTemperature(5, 'Ia')).toBe(38520)
  })
  it('gives the Schmidt-Kaler (1982) Teff of K0 III and A0 I (from memory)', () => {
    expect(effectiveTemperature(50, 'III')).toBe(4660)
    expect(effectiveTemperature(20, 'Ib')).toBe(9980)
  })
  it('interpolates linearly in fractional subtype', () => {
    expect(effectiveTemperature(typeCode('G', 1.5), 'V')).toBeCloseTo((5860 + 5770) / 2, 9)
  })
  it('makes giants cooler than dwarfs of the same G and K type (common practice)', () => {
    for (const code of [42, 45, 50, 55]) expect(effectiveTemperature(code, 'III')).toBeLessThan(effectiveTemperature(code, 'V'))
  })
  it('takes class II halfway between the III and I scales', () => {
    expect(effectiveTemperature(50, 'II')).toBe(Math.round((4660 + 4550) / 2))
  })
  it('refuses a subgiant cooler than the subgiant table', () => {
    expect(() => effectiveTemperature(60, 'IV')).toThrow('no Teff calibration for M0 IV (defined B0–K3)')
  })
})

describe('surfaceGravity', () => {
  it('puts the gravity of dwarfs above giants above supergiants at every type (Straižys & Kuriliene 1981)', () => {
    for (const code of [10, 20, 30, 40, 50, 60]) {
      expect(surfaceGravity(code, 'V')).toBeGreaterThan(surfaceGravity(code, 'III'))
      expect(surfaceGravity(code, 'III')).toBeGreaterThan(surfaceGravity(code, 'Ib'))
      expect(surfaceGravity(code, 'Ib')).toBeGreaterThan(surfaceGravity(code, 'Ia'))
    }
  })
})

describe('absoluteMagnitudeV', () => {
  it('gives Schmidt-Kaler (1982) M_V of A0 V = +0.65 and G2 V = +4.7 (from memory)', () => {
    expect(absoluteMagnitudeV(20, 'V')).toBe(0.65)
    expect(absoluteMagnitudeV(42, 'V')).toBe(4.7)
  })
})

describe('bolometricCorrectionV', () => {
  it('gives the Sun BC_V ≈ −0.08 on the Flower (1996)/Torres (2010) scale (Torres 2010 quotes −0.07 for the Sun, from memory)', () => {
    expect(bolometricCorrectionV(5772)).toBeCloseTo(-0.08, 1)
  })
  it('is most positive near 7000 K and strongly negative for hot and cool stars (common practice)', () => {
    expect(bolometricCorrectionV(7000)).toBeGreaterThan(-0.05)
    expect(bolometricCorrectionV(30000)).toBeLessThan(-2.5)
    expect(bolometricCorrectionV(3500)).toBeLessThan(-1.5)
  })
  it('refuses a temperature outside 2500–60000 K', () => {
    expect(() => bolometricCorrectionV(2000)).toThrow('no BC_V calibration for Teff = 2000 K (defined 2500–60000 K)')
  })
})

describe('stellarParameters', () => {
  it('gives the G2 V Sun about one solar luminosity (IAU 2015 nominal Sun: 5772 K, M_bol 4.74)', () => {
    const p = stellarParameters(42, 'V')
    expect(p.teff).toBe(5770)
    expect(p.luminositySolar).toBeGreaterThan(0.8)
    expect(p.luminositySolar).toBeLessThan(1.25)
  })
  it('names a source for every class and quantity', () => {
    for (const q of ['teff', 'logg', 'absoluteMagnitudeV'] as const) {
      for (const c of ['Ia', 'Ib', 'II', 'III', 'IV', 'V'] as const) expect(CALIBRATION_SOURCES[q][c]).toMatch(/\(\d{4}\)/)
    }
  })
  it('covers O5–M5 for every class but IV, which stops at K3', () => {
    expect(calibratedRange('V')).toEqual([5, 65])
    expect(calibratedRange('Ia')).toEqual([5, 65])
    expect(calibratedRange('IV')).toEqual([10, 53])
    expect(isCalibrated(54, 'IV')).toBe(false)
  })
})
