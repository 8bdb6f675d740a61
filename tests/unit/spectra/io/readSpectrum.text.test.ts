import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { readSpectrum } from '../../../../server/spectra/io'
import { parseNumberToken } from '../../../../server/spectra/io/text'

const DIR = join(__dirname, '../../../fixtures/text')
// Reference: tests/reference/make_reader_text_fixtures.py (numpy) → tests/fixtures/text/text_reference.json.
const REF = JSON.parse(readFileSync(join(DIR, 'text_reference.json'), 'utf8')) as {
  files: Record<string, { pixels?: number; vacuum?: boolean | null; error?: number; reversed?: boolean; refused?: string; firstWavelength?: number; lastWavelength?: number; firstFlux?: number }>
}
const enc = new TextEncoder()
const read = (text: string, options = {}) => readSpectrum(enc.encode(text), 'spec.txt', options)
const rows = (n: number, f: (w: number) => string) => Array.from({ length: n }, (_, i) => f(3800 + 2 * i)).join('\n')

describe('readSpectrum on text files', () => {
  for (const [name, ref] of Object.entries(REF.files)) {
    if (ref.refused) {
      it(`refuses ${name} with ${ref.refused}`, () => {
        const r = readSpectrum(new Uint8Array(readFileSync(join(DIR, name))), name)
        expect(r.ok ? 'accepted' : r.code).toBe(ref.refused)
      })
      continue
    }
    it(`reads ${name} with the values the generator wrote`, () => {
      const r = readSpectrum(new Uint8Array(readFileSync(join(DIR, name))), name, { assumeVacuum: false })
      if (!r.ok) throw new Error(r.message)
      expect(r.meta.format).toBe('text')
      expect(r.meta.pixels).toBe(ref.pixels)
      expect(r.spectrum.wavelengthAir[0]).toBeCloseTo(ref.firstWavelength!, 6)
      expect(r.spectrum.wavelengthAir[ref.pixels! - 1]).toBeCloseTo(ref.lastWavelength!, 6)
      expect(r.spectrum.flux[0]).toBeCloseTo(ref.firstFlux!, 6)
      if (ref.error !== undefined) expect(r.spectrum.error![0]).toBeCloseTo(ref.error, 9)
      else expect(r.spectrum.error).toBeUndefined()
      expect(r.meta.reversed).toBe(!!ref.reversed)
    })
    it(`reads what ${name} says about air or vacuum`, () => {
      const r = readSpectrum(new Uint8Array(readFileSync(join(DIR, name))), name)
      if (!r.ok) throw new Error(r.message)
      expect(r.meta.vacuumConverted).toBe(ref.vacuum === true)
      if (ref.vacuum === null) expect(r.meta.vacuumSource).toBe('the file does not say; air assumed (common practice for ground-based spectra)')
    })
  }
  it('refuses a file with four unnamed columns', () => {
    const r = read(rows(200, (w) => `${w} 1 0.1 7`))
    expect(r).toEqual({
      ok: false,
      code: 'TEXT_MALFORMED',
      message: 'spec.txt: the rows have 4 columns; without a header row naming them, 2 or 3 columns (wavelength, flux, error) are expected: add a header row such as "wavelength flux error"',
    })
  })
  it('picks named columns out of a wider table', () => {
    const r = read('id,flux,err,wavelength_A\n' + rows(600, (w) => `7,${1 + w / 1e5},0.1,${w}`))
    if (!r.ok) throw new Error(r.message)
    expect(r.spectrum.wavelengthAir[0]).toBe(3800)
    expect(r.spectrum.flux[0]).toBeCloseTo(1.038, 12)
    expect(r.meta.wavelengthUnit).toBe('A')
  })
  it('refuses a header row that names no flux column', () => {
    expect(read('wavelength,temperature,pressure\n' + rows(200, (w) => `${w},1,2`))).toEqual({
      ok: false,
      code: 'TEXT_MALFORMED',
      message: 'spec.txt: the header row names no flux column (wavelength, temperature, pressure); name the columns wavelength and flux (with the unit, e.g. "wavelength (nm)")',
    })
  })
  it('refuses a text file with no numbers at all', () => {
    expect(read('# only a comment\n\n').ok).toBe(false)
  })
  it('refuses more rows than maxPixels', () => {
    expect(
      read(
        rows(600, (w) => `${w} 1`),
        { maxPixels: 500 },
      ),
    ).toEqual({ ok: false, code: 'TOO_MANY_PIXELS', message: 'spec.txt: more than 500 rows, the limit' })
  })
  it('takes the wavelength unit from a comment line', () => {
    const r = read('# wavelength unit: nm\n' + rows(600, (w) => `${w / 10} 1`))
    if (!r.ok) throw new Error(r.message)
    expect(r.spectrum.wavelengthAir[0]).toBeCloseTo(3800, 9)
  })
})

describe('parseNumberToken', () => {
  it('reads Fortran D exponents (common practice in Fortran output)', () => {
    expect(parseNumberToken('1.0D+03')).toBe(1000)
    expect(parseNumberToken('-2.5d-2')).toBe(-0.025)
  })
  it('reads NaN and infinities and nothing else that is not a number', () => {
    expect(parseNumberToken('NaN')).toBeNaN()
    expect(parseNumberToken('-inf')).toBe(-Infinity)
    expect(parseNumberToken('constructor')).toBeUndefined()
    expect(parseNumberToken('12abc')).toBeUndefined()
    expect(parseNumberToken('0x10')).toBeUndefined()
  })
})

describe('readSpectrum on the library text spectra in ../shared/data/jhc-reference', () => {
  // The file's own first and last rows: 349.70 nm (flux 17.5332) and 744.22 nm; 2821 lines less the two
  // comment lines. The unit is named only in the comment "# Wavelength [nm]    Normalized Amplitude".
  const path = join(__dirname, '../../../../../shared/data/jhc-reference/HD23733-Jacoby-spec.csv')
  it('reads the unit from the commented header and gives the range in Å', () => {
    const r = readSpectrum(new Uint8Array(readFileSync(path)), 'HD23733-Jacoby-spec.csv')
    if (!r.ok) throw new Error(r.message)
    expect(r.meta.pixels).toBe(2819)
    expect(r.spectrum.wavelengthAir[0]).toBeCloseTo(3497.0, 9)
    expect(r.spectrum.wavelengthAir[2818]).toBeCloseTo(7442.2, 9)
    expect(r.spectrum.flux[0]).toBeCloseTo(17.5332, 12)
    expect(r.meta.wavelengthUnit).toBe('nm')
    expect(r.meta.decisions!.unit.why).toBe("the column header 'Wavelength [nm]'")
    expect(r.meta.decisions!.medium).toEqual({ vacuum: false, why: 'the file does not say; air assumed (common practice for ground-based spectra)' })
  })
})
