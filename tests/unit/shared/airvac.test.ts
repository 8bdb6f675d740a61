import { describe, expect, it } from 'vitest'
import { airToVacuum, vacuumToAir, vacuumToAirArray } from '../../../shared/airvac'

describe('vacuumToAir', () => {
  // Worked values of the Morton (2000) formula, as listed in the project's reference sheet
  // (computed from that formula): 4862.68 vac → 4861.32 air; 6564.61 vac → 6562.80 air.
  it('turns the vacuum Hβ wavelength into its air value', () => {
    expect(vacuumToAir(4862.68)).toBeCloseTo(4861.32, 2)
  })
  it('turns the vacuum Hα wavelength into its air value', () => {
    expect(vacuumToAir(6564.61)).toBeCloseTo(6562.8, 2)
  })
  it('leaves far-ultraviolet wavelengths alone, as the convention has it', () => {
    expect(vacuumToAir(1215.67)).toBe(1215.67)
  })
  it('converts arrays element by element', () => {
    const out = vacuumToAirArray(new Float64Array([4862.68, 6564.61]))
    expect(out[0]).toBeCloseTo(4861.32, 2)
    expect(out[1]).toBeCloseTo(6562.8, 2)
  })
})

describe('airToVacuum', () => {
  it('inverts vacuumToAir to a micro-ångström across the optical', () => {
    for (let lam = 3000; lam <= 10000; lam += 250) {
      expect(Math.abs(vacuumToAir(airToVacuum(lam)) - lam)).toBeLessThan(1e-6)
    }
  })
})
