import { describe, expect, it } from 'vitest'
import { ELEMENTS } from '../../../templates/generator/atomic'
import {
  balmerJump,
  greyTemperature,
  hydrogenLevelFraction,
  hydrogenMinusBoundFreeCrossSection,
  linearStarkDamping,
  photosphericLayer,
  sahaIonisationFractions,
  voigt,
} from '../../../templates/generator/physics'

// Carroll & Ostlie, An Introduction to Modern Astrophysics (2nd ed.), ch. 8 (from memory):
// at P_e ≈ 200 dyn cm⁻² hydrogen is half ionised near 9600 K (direct calculation ≈ 9560 K)
// and the n = 2 fraction peaks near 9900 K (≈ 9870 K).
const PE_TEXTBOOK = 200

describe('sahaIonisationFractions', () => {
  it('half ionises hydrogen at 9560 ± 20 K for P_e = 200 dyn cm⁻² (Carroll & Ostlie ch. 8, from memory)', () => {
    let half = 0
    for (let t = 9000; t < 10500; t += 1) {
      if (sahaIonisationFractions(ELEMENTS.H, t, PE_TEXTBOOK)[0]! <= 0.5) {
        half = t
        break
      }
    }
    expect(Math.abs(half - 9560)).toBeLessThanOrEqual(20)
  })
  it('returns fractions that sum to one', () => {
    const f = sahaIonisationFractions(ELEMENTS.Si, 20000, 1000)
    expect(f.reduce((s, x) => s + x, 0)).toBeCloseTo(1, 12)
  })
})

describe('hydrogenLevelFraction', () => {
  it('peaks the n = 2 fraction at 9870 ± 30 K for P_e = 200 dyn cm⁻² (Carroll & Ostlie ch. 8, from memory)', () => {
    let best = 0
    let at = 0
    for (let t = 8000; t < 12000; t += 5) {
      const f = hydrogenLevelFraction(2, t, PE_TEXTBOOK)
      if (f > best) {
        best = f
        at = t
      }
    }
    expect(Math.abs(at - 9870)).toBeLessThanOrEqual(30)
  })
})

describe('voigt', () => {
  it('reduces to exp(−v²) without damping', () => {
    for (const v of [0, 0.5, 1, 2]) expect(voigt(0, v)).toBeCloseTo(Math.exp(-v * v), 4)
  })
  it('gives H(1, 0) = e·erfc(1) = 0.427584 (Abramowitz & Stegun, from memory)', () => {
    expect(voigt(1, 0)).toBeCloseTo(0.427584, 4)
  })
  it('follows the Lorentz wing a/(√π v²) far from the core', () => {
    expect(voigt(0.01, 30) / (0.01 / (Math.sqrt(Math.PI) * 900))).toBeCloseTo(1, 2)
  })
  it('integrates to √π over v', () => {
    let s = 0
    for (let v = -200; v <= 200; v += 0.01) s += voigt(0.05, v) * 0.01
    expect(s / Math.sqrt(Math.PI)).toBeCloseTo(1, 2)
  })
})

describe('hydrogenMinusBoundFreeCrossSection', () => {
  it('peaks near 8500 Å at about 4×10⁻¹⁷ cm² (Gray 2005, fig. 8.2, from memory)', () => {
    expect(hydrogenMinusBoundFreeCrossSection(8500)).toBeGreaterThan(3.8e-17)
    expect(hydrogenMinusBoundFreeCrossSection(8500)).toBeLessThan(4.2e-17)
  })
})

describe('photosphericLayer', () => {
  it('places Teff at τ = ⅔ in the grey atmosphere', () => {
    expect(greyTemperature(5772, 2 / 3)).toBeCloseTo(5772, 9)
  })
  it('raises the electron pressure with surface gravity at fixed Teff, as P_e ∝ g^{1/3…1} (Gray 2005, ch. 9)', () => {
    for (const teff of [4500, 6000, 9700, 20000]) {
      const low = photosphericLayer(teff, 2, 2 / 3).electronPressure
      const high = photosphericLayer(teff, 4, 2 / 3).electronPressure
      const slope = Math.log10(high / low) / 2
      expect(slope).toBeGreaterThan(0.25)
      expect(slope).toBeLessThan(1.05)
    }
  })
  it('gives the Sun a photospheric gas pressure of order 10⁵ dyn cm⁻² (Gray 2005, solar model, from memory)', () => {
    const pg = photosphericLayer(5772, 4.438, 2 / 3).gasPressure
    expect(pg).toBeGreaterThan(3e4)
    expect(pg).toBeLessThan(3e5)
  })
})

describe('linearStarkDamping', () => {
  it('grows as N_e^{2/3} (Holtsmark field)', () => {
    expect(linearStarkDamping(2, 4, 1, 8e15) / linearStarkDamping(2, 4, 1, 1e15)).toBeCloseTo(4, 9)
  })
})

describe('balmerJump', () => {
  it('is largest among A stars and small in the Sun and in O stars (common practice)', () => {
    const at = (teff: number, logg: number): number => balmerJump(teff, photosphericLayer(teff, logg, 2 / 3))
    const a0 = at(9700, 4.2)
    expect(a0).toBeGreaterThan(at(5772, 4.44))
    expect(a0).toBeGreaterThan(at(41400, 3.92))
    expect(a0).toBeGreaterThan(0.8)
  })
})
