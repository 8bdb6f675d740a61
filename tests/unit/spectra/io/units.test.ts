import { describe, expect, it } from 'vitest'
import { angstromsPerUnit, vacuumFromText } from '../../../../server/spectra/io/units'
import { regionCoverage } from '../../../../server/spectra/io/finalize'

describe('angstromsPerUnit', () => {
  // SI prefixes (1 nm = 10 Å, 1 µm = 10⁴ Å, 1 m = 10¹⁰ Å): common practice; spellings from FITS Standard 4.0 and IRAF files.
  it('knows the spellings files use for Å, nm, µm and m', () => {
    expect(['Angstrom', 'angstroms', 'ANGSTROMS', 'AA', 'Å', '0.1 nm'].map(angstromsPerUnit)).toEqual([1, 1, 1, 1, 1, 1])
    expect(['nm', 'nanometer'].map(angstromsPerUnit)).toEqual([10, 10])
    expect(['um', 'µm', 'micron', 'MICRONS'].map(angstromsPerUnit)).toEqual([1e4, 1e4, 1e4, 1e4])
    expect(['m', 'meter'].map(angstromsPerUnit)).toEqual([1e10, 1e10])
  })
  it('returns undefined for a unit that is not a length', () => {
    expect(angstromsPerUnit('Hz')).toBeUndefined()
  })
})

describe('vacuumFromText', () => {
  it('reads vacuum, air, or neither', () => {
    expect(vacuumFromText('All wavelengths are in vacuum.')).toBe(true)
    expect(vacuumFromText('air wavelengths')).toBe(false)
    expect(vacuumFromText('airmass 1.2')).toBeUndefined()
    // A conversion names the medium the numbers end up in last (common practice in reducers' notes).
    expect(vacuumFromText('converted from vacuum to air')).toBe(false)
    expect(vacuumFromText('wavelengths converted from air to vacuum (Morton 2000)')).toBe(true)
    expect(vacuumFromText('air-to-vacuum correction applied')).toBe(true)
    expect(vacuumFromText('vacuum wavelengths converted to air')).toBe(false)
    expect(vacuumFromText('air and vacuum')).toBeUndefined()
  })
})

describe('regionCoverage', () => {
  const w = Float64Array.from({ length: 11 }, (_, i) => 3900 + 100 * i)
  it('is 1 for a spectrum spanning the region and 0.5 for half of it', () => {
    expect(regionCoverage(w, undefined, [3900, 4900])).toBe(1)
    expect(regionCoverage(w, undefined, [4400, 5400])).toBe(0.5)
  })
  it('does not count intervals next to masked pixels', () => {
    const mask = new Uint8Array(11)
    mask[5] = 1
    expect(regionCoverage(w, mask, [3900, 4900])).toBeCloseTo(0.8, 12)
  })
})
