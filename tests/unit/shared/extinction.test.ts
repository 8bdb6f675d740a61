import { readFileSync } from 'node:fs'
import { fileURLToPath } from 'node:url'
import { describe, expect, it } from 'vitest'
import { ccm89, ccm89Coefficients, extinctionMagnitudes, spectrumDeredden } from '../../../shared/extinction'

// Made by tests/reference/extinction_ccm89.py with Debian's python3-extinction (version inside).
const reference = JSON.parse(readFileSync(fileURLToPath(new URL('../../reference/out/extinction_ccm89.json', import.meta.url)), 'utf8')) as {
  extinction_version: string
  wavelength_angstrom: number[]
  cases: Array<{ r_v: number; a_lambda_over_a_v: number[] }>
}

describe('ccm89Coefficients', () => {
  it('gives a = 1, b = 0 at y = 0 (x = 1.82 µm⁻¹, the V band), from the form of eqs. 3a–b', () => {
    expect(ccm89Coefficients(1.82)).toEqual({ a: 1, b: 0 })
  })
  it('refuses wavenumbers outside 0.3–10 µm⁻¹', () => {
    expect(() => ccm89Coefficients(0.2)).toThrow('wavenumber 0.2 µm⁻¹ is outside the CCM89 range 0.3–10 µm⁻¹ (1000 Å–3.33 µm)')
    expect(() => ccm89Coefficients(Number.NaN)).toThrow('outside the CCM89 range')
  })
})

describe('ccm89', () => {
  it(`matches python3-extinction ${reference.extinction_version} to 1e-9 over 0.3–10 µm⁻¹ for R_V = 2.1, 3.1, 4.0, 5.5`, () => {
    expect(reference.wavelength_angstrom.length).toBeGreaterThan(80)
    for (const c of reference.cases) {
      reference.wavelength_angstrom.forEach((lam, i) => {
        expect(Math.abs(ccm89(lam, c.r_v) - c.a_lambda_over_a_v[i]!), `${lam} Å, R_V ${c.r_v}`).toBeLessThan(1e-9)
      })
    }
  })
  it('uses R_V = 3.1 by default', () => {
    expect(ccm89(4400)).toBe(ccm89(4400, 3.1))
  })
  it('gives A(B)/A(V) − 1 = 1/R_V near the B and V bands (E(B−V) = A(V)/R_V, to 3 %, common practice)', () => {
    // 4400 Å and 5500 Å as B and V effective wavelengths (common practice).
    const rv = 3.1
    expect((ccm89(4400, rv) - ccm89(5500, rv)) * rv).toBeCloseTo(1, 1)
  })
  it('refuses R_V ≤ 0 and wavelengths ≤ 0', () => {
    expect(() => ccm89(5000, 0)).toThrow('R_V must be > 0, got 0')
    expect(() => ccm89(-5, 3.1)).toThrow('wavelength must be > 0 Å, got -5')
  })
})

describe('extinctionMagnitudes', () => {
  it('scales the law by A(V)', () => {
    expect(extinctionMagnitudes(4000, { av: 2 })).toBeCloseTo(2 * ccm89(4000), 14)
  })
  it('takes E(B−V) and R_V instead, with A(V) = R_V·E(B−V)', () => {
    expect(extinctionMagnitudes(4000, { ebv: 0.5, rv: 4 })).toBeCloseTo(2 * ccm89(4000, 4), 14)
  })
  it('refuses both or neither of A(V) and E(B−V)', () => {
    expect(() => extinctionMagnitudes(4000, { av: 1, ebv: 1 })).toThrow('give A(V) or E(B−V), not both')
    expect(() => extinctionMagnitudes(4000, {})).toThrow('give A(V) or E(B−V)')
  })
})

describe('spectrumDeredden', () => {
  it('multiplies flux and error by 10^(0.4 A(λ)) and returns new arrays', () => {
    const spectrum = {
      wavelength: new Float64Array([4000, 5000, 6000]),
      flux: new Float64Array([1, 2, 3]),
      error: new Float64Array([0.1, 0.2, 0.3]),
    }
    const out = spectrumDeredden(spectrum, { av: 1 })
    for (let i = 0; i < 3; i++) {
      const f = 10 ** (0.4 * ccm89(spectrum.wavelength[i]!))
      expect(out.flux[i]).toBeCloseTo(spectrum.flux[i]! * f, 12)
      expect(out.error![i]).toBeCloseTo(spectrum.error[i]! * f, 12)
    }
    expect(spectrum.flux[0]).toBe(1)
    expect(out.flux).not.toBe(spectrum.flux)
  })
  it('leaves a spectrum unchanged for A(V) = 0', () => {
    const spectrum = { wavelength: new Float64Array([5000]), flux: new Float64Array([7]) }
    expect(spectrumDeredden(spectrum, { av: 0 }).flux[0]).toBe(7)
  })
})
