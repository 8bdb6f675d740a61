import { readFileSync, readdirSync } from 'node:fs'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { vacuumToAir } from '../../../../shared/airvac'
import { readSpectrum, type ReadResult, type ReadSuccess } from '../../../../server/spectra/io'
import { concat, dataFloat32, header, linearImage, type Card } from './fitsBuilder'

const FITS_DIR = join(__dirname, '../../../fixtures/fits')
const REAL = join(__dirname, '../../../fixtures/real/alpha_lyr_stis_010.fits')

interface FixtureRef {
  file: string
  method: string
  vacuum?: boolean
  hdu?: number
  pixels?: number
  refused?: string
  indices?: number[]
  wavelength?: number[]
  flux?: (number | null)[]
  error?: (number | null)[]
  astropy: string
  maskedIndices?: number[]
  spectrumHdus?: number[]
  sky?: FixtureRef
}

function load(name: string): Uint8Array {
  return new Uint8Array(readFileSync(join(FITS_DIR, name)))
}
function ok(r: ReadResult): ReadSuccess {
  if (!r.ok) throw new Error(`expected a spectrum, got ${r.code}: ${r.message}`)
  return r
}
function relClose(actual: number, expected: number, rel: number) {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(rel * Math.abs(expected))
}
/** Compares sampled pixels with a fixture's reference; wavelengths as stored (assumeVacuum: false skips conversion). */
function checkAgainst(r: ReadSuccess, ref: FixtureRef) {
  expect(r.meta.pixels).toBe(ref.pixels)
  // A descending file is reversed by the reader: file pixel i is output pixel n − 1 − i.
  const at = (i: number) => (r.meta.reversed ? r.meta.pixels - 1 - i : i)
  ref.indices!.forEach((filePix, k) => {
    const pix = at(filePix)
    relClose(r.spectrum.wavelengthAir[pix]!, ref.wavelength![k]!, 1e-6)
    const f = ref.flux![k]
    if (f === null) expect(r.spectrum.mask?.[pix]).toBe(1)
    else relClose(r.spectrum.flux[pix]!, f!, 1e-6)
    const e = ref.error?.[k]
    if (e !== undefined && e !== null) relClose(r.spectrum.error![pix]!, e, 1e-6)
  })
}

const refs: FixtureRef[] = readdirSync(FITS_DIR)
  .filter((f) => f.endsWith('.json'))
  .map((f) => JSON.parse(readFileSync(join(FITS_DIR, f), 'utf8')) as FixtureRef)

describe('readSpectrum on FITS layouts', () => {
  // Reference: astropy 5.2.1 (astropy.wcs for standard spectral WCS; numpy for DC-FLAG, COEFF0/1 and
  // table columns), tests/reference/make_fits_fixtures.py; agreement to 1e-6 relative.
  for (const ref of refs.filter((r) => !r.refused)) {
    it(`reads ${ref.file} as astropy does (${ref.method}, astropy ${ref.astropy})`, () => {
      const r = ok(readSpectrum(load(ref.file), ref.file, { assumeVacuum: false }))
      expect(r.meta.hdu).toBe(ref.hdu)
      checkAgainst(r, ref)
    })
    it(`reports what ${ref.file} says about air or vacuum and converts vacuum to air`, () => {
      const r = ok(readSpectrum(load(ref.file), ref.file))
      expect(r.meta.vacuumConverted).toBe(ref.vacuum)
      const pix = r.meta.reversed ? r.meta.pixels - 1 - ref.indices![2]! : ref.indices![2]!
      const stated = ref.wavelength![2]!
      relClose(r.spectrum.wavelengthAir[pix]!, ref.vacuum ? vacuumToAir(stated) : stated, 1e-9)
    })
  }
  for (const ref of refs.filter((r) => r.refused)) {
    it(`refuses ${ref.file} with ${ref.refused}`, () => {
      const r = readSpectrum(load(ref.file), ref.file)
      expect(r.ok).toBe(false)
      if (!r.ok) expect(r.code).toBe(ref.refused)
    })
  }

  it('masks BLANK pixels of 16-bit images and keeps the rest scaled by BSCALE and BZERO', () => {
    const r = ok(readSpectrum(load('image_int16_bscale_blank.fits'), 'x.fits'))
    expect(r.meta.maskedPixels).toBe(3)
    expect([10, 11, 500].map((i) => r.spectrum.mask![i])).toEqual([1, 1, 1])
  })
  it('reverses a descending wavelength axis and says so', () => {
    const r = ok(readSpectrum(load('image_uint8_desc_m.fits'), 'x.fits'))
    expect(r.meta.reversed).toBe(true)
    expect(r.spectrum.wavelengthAir[0]!).toBeLessThan(r.spectrum.wavelengthAir[1]!)
  })
  it('takes the error from the sigma plane that BANDID names in a multispec cube', () => {
    const r = ok(readSpectrum(load('image_multispec_3d.fits'), 'x.fits'))
    expect(r.spectrum.error).toBeDefined()
  })
  it('masks pixels whose inverse variance is zero', () => {
    const r = ok(readSpectrum(load('table_rows_nm_ivar.fits'), 'x.fits'))
    expect(r.meta.maskedPixels).toBe(2)
    expect(r.spectrum.mask![5]).toBe(1)
    expect(r.meta.wavelengthUnit).toBe('nm')
  })
  it('keeps observation keywords as the file writes them', () => {
    const r = ok(readSpectrum(load('image_awav_cdelt_f32.fits'), 'x.fits'))
    expect(r.meta.header).toMatchObject({ OBJECT: 'SYNTH-A', RA: '12:00:00.0', DEC: '+10:00:00', 'DATE-OBS': '2023-04-01T02:03:04', EXPTIME: 600, INSTRUME: 'TESTSPEC', SPECRES: 2000 })
    expect(r.meta.fluxUnit).toBe('erg/s/cm2/Angstrom')
  })
  it('follows the user when told the wavelengths are vacuum', () => {
    const r = ok(readSpectrum(load('image_awav_cdelt_f32.fits'), 'x.fits', { assumeVacuum: true }))
    expect(r.meta.vacuumConverted).toBe(true)
    expect(r.meta.vacuumSource).toBe('your choice (vacuum)')
    expect(r.meta.decisions!.medium.conflict).toBe("the file says air (CTYPE1 = 'AWAV' (air, FITS WCS Paper III)); your choice was used")
    expect(r.spectrum.wavelengthAir[0]).toBeCloseTo(vacuumToAir(3600), 9)
  })
})

describe('readSpectrum on multi-extension files', () => {
  const ref = refs.find((r) => r.file === 'mef_frame_table_sky.fits')!
  it('reads the first HDU that holds a spectrum and lists every such HDU', () => {
    const r = ok(readSpectrum(load(ref.file), ref.file))
    expect(r.meta.hdu).toBe(2)
    expect(r.meta.format).toBe('fits-table')
    expect(r.meta.hdus!.map((h) => h.index)).toEqual(ref.spectrumHdus)
    expect(r.meta.hdus!.map((h) => h.name)).toEqual(['SCI', 'SKY'])
  })
  it('reads the extension the user picks, by number or by name', () => {
    for (const hdu of [3, 'sky']) {
      const r = ok(readSpectrum(load(ref.file), ref.file, { hdu }))
      expect(r.meta.hdu).toBe(3)
      checkAgainst(r, ref.sky!)
    }
  })
  it('refuses a picked extension that does not exist', () => {
    const r = readSpectrum(load(ref.file), 'mef.fits', { hdu: 9 })
    expect(r).toEqual({ ok: false, code: 'HDU_NOT_FOUND', message: 'mef.fits: there is no HDU 9 (the file has 4, numbered 0–3)' })
  })
  it('refuses a picked extension that is not a spectrum', () => {
    const r = readSpectrum(load(ref.file), 'mef.fits', { hdu: 1 })
    expect(r.ok).toBe(false)
    if (!r.ok)
      expect(r.message).toBe(
        'mef.fits: HDU 1 is not a spectrum: it is a 50 × 40 image with 40 rows and nothing saying what the rows are (no multispec keywords, wavelength image or wavelength row), not a 1-D spectrum: extract a 1-D spectrum first',
      )
  })
})

describe('readSpectrum on the real HST spectrum', () => {
  // Reference: astropy 5.2.1 via tests/reference/alpha_lyr_reader_reference.py → alpha_lyr_reader_reference.json.
  const ref = JSON.parse(readFileSync(join(__dirname, '../../../reference/alpha_lyr_reader_reference.json'), 'utf8')) as {
    rows: number
    wavelengthMin: number
    wavelengthMax: number
    astropy: string
    sample: { rows: number[]; wavelength: number[]; flux: number[]; staterror: number[] }
  }
  const bytes = new Uint8Array(readFileSync(REAL))
  it('reads every row of the SCI table, as astropy counts them', () => {
    const r = ok(readSpectrum(bytes, 'alpha_lyr_stis_010.fits', { assumeVacuum: false }))
    expect(r.meta.pixels).toBe(ref.rows)
    expect(r.meta.hdu).toBe(1)
    relClose(r.spectrum.wavelengthAir[0]!, ref.wavelengthMin, 1e-9)
    relClose(r.spectrum.wavelengthAir[ref.rows - 1]!, ref.wavelengthMax, 1e-9)
    ref.sample.rows.forEach((row, k) => {
      relClose(r.spectrum.wavelengthAir[row]!, ref.sample.wavelength[k]!, 1e-9)
      relClose(r.spectrum.flux[row]!, ref.sample.flux[k]!, 1e-6)
      relClose(r.spectrum.error![row]!, ref.sample.staterror[k]!, 1e-6)
    })
  })
  it('finds the vacuum statement in the header text and converts to air', () => {
    const r = ok(readSpectrum(bytes, 'alpha_lyr_stis_010.fits'))
    expect(r.meta.vacuumConverted).toBe(true)
    expect(r.meta.vacuumSource).toBe('header text "All wavelengths are in vacuum."')
    expect(r.meta.wavelengthUnit).toBe('ANGSTROMS')
    expect(r.meta.fluxUnit).toBe('FLAM')
    // Far-UV pixels stay as they are (vacuumToAir leaves λ < 2000 Å alone, the convention).
    expect(r.spectrum.wavelengthAir[0]).toBe(ref.wavelengthMin)
    expect(r.meta.coverage).toBeGreaterThan(0.99)
  })
  it('refuses it when its pixel count passes maxPixels', () => {
    const r = readSpectrum(bytes, 'a.fits', { maxPixels: 9000 })
    expect(r).toEqual({ ok: false, code: 'TOO_MANY_PIXELS', message: 'a.fits: 9192 pixels is more than the limit of 9000' })
  })
})

describe('readSpectrum on the real HST table with DATAQUAL', () => {
  // Reference: astropy 5.2.1 via tests/reference/calspec_dataqual_reference.py → out/calspec_dataqual.json.
  const ref = JSON.parse(readFileSync(join(__dirname, '../../../reference/out/calspec_dataqual.json'), 'utf8')) as {
    rows: number
    dataqualComment: string
    flaggedByDataqual: number
    wavelengthMin: number
    wavelengthMax: number
    airMin: number
    airMax: number
    sample: { rows: number[]; wavelength: number[]; flux: number[]; staterror: number[]; dataqual: number[] }
  }
  const bytes = new Uint8Array(readFileSync(join(__dirname, '../../../fixtures/real/bd_75d325_stis_001.fits')))
  it('reads every row and masks exactly the rows whose DATAQUAL is 0, as the column comment says', () => {
    const r = ok(readSpectrum(bytes, 'bd_75d325_stis_001.fits'))
    expect(r.meta.pixels).toBe(ref.rows)
    expect(r.meta.maskedPixels).toBe(ref.flaggedByDataqual)
    expect(ref.dataqualComment).toBe('Data quality: 1=good, 0=bad')
    expect(r.meta.decisions!.masks).toEqual([{ source: 'DATAQUAL column', rule: `0 is bad, 1 is good (as its comment says: "${ref.dataqualComment}")`, pixels: ref.flaggedByDataqual }])
    ref.sample.rows.forEach((row, k) => {
      expect(r.spectrum.mask?.[row] ?? 0).toBe(ref.sample.dataqual[k] === 0 ? 1 : 0)
      relClose(r.spectrum.flux[row]!, ref.sample.flux[k]!, 1e-6)
      relClose(r.spectrum.error![row]!, ref.sample.staterror[k]!, 1e-6)
    })
  })
  it('converts its vacuum wavelengths to air as the reference formula does', () => {
    const r = ok(readSpectrum(bytes, 'bd_75d325_stis_001.fits'))
    expect(r.meta.decisions!.medium).toEqual({ vacuum: true, why: 'header text "All wavelengths are in vacuum."' })
    relClose(r.spectrum.wavelengthAir[0]!, ref.airMin, 1e-9)
    relClose(r.spectrum.wavelengthAir[ref.rows - 1]!, ref.airMax, 1e-9)
    expect(r.meta.decisions!.ignored).toEqual(['columns SYSERROR, FWHM, TOTEXP'])
  })
})

const flat = (i: number) => 1 + 0.001 * (i % 7)
function refusal(bytes: Uint8Array, options = {}) {
  const r = readSpectrum(bytes, 'bad.fits', options)
  if (r.ok) throw new Error('expected a refusal')
  return r
}

describe('readSpectrum refusals for FITS', () => {
  it('refuses a header that claims more data than the file holds', () => {
    const bytes = concat(
      header([
        ['SIMPLE', true],
        ['BITPIX', -32],
        ['NAXIS', 1],
        ['NAXIS1', 1_000_000_000],
        ['CRVAL1', 4000],
        ['CDELT1', 1],
      ]),
      dataFloat32([1, 2, 3]),
    )
    expect(refusal(bytes)).toEqual({ ok: false, code: 'FITS_TRUNCATED', message: 'bad.fits: HDU 0 claims more data than the file holds (2880 bytes left after its header)' })
  })
  it('refuses absurd axis products without allocating them', () => {
    const cards: Card[] = [
      ['SIMPLE', true],
      ['BITPIX', -64],
      ['NAXIS', 3],
      ['NAXIS1', 2 ** 40],
      ['NAXIS2', 2 ** 40],
      ['NAXIS3', 2 ** 40],
    ]
    expect(refusal(header(cards)).code).toBe('FITS_TRUNCATED')
  })
  it('refuses a header without an END card', () => {
    const bytes = header([
      ['SIMPLE', true],
      ['BITPIX', -32],
      ['NAXIS', 0],
    ]).slice(0, 2000)
    expect(refusal(bytes)).toEqual({ ok: false, code: 'FITS_TRUNCATED', message: 'bad.fits: the header of HDU 0 is cut off before its END card' })
  })
  it('refuses a BITPIX that FITS does not allow', () => {
    expect(
      refusal(
        header([
          ['SIMPLE', true],
          ['BITPIX', 12],
          ['NAXIS', 0],
        ]),
      ).message,
    ).toBe('bad.fits: HDU 0 has BITPIX = 12, which FITS does not allow')
  })
  it('refuses a file over maxBytes, an empty file and an unknown format', () => {
    expect(refusal(new Uint8Array(10), { maxBytes: 5 })).toEqual({ ok: false, code: 'FILE_TOO_LARGE', message: 'bad.fits is 10 bytes; the limit is 5' })
    expect(refusal(new Uint8Array(0))).toEqual({ ok: false, code: 'EMPTY_FILE', message: 'bad.fits is empty' })
    expect(refusal(new Uint8Array([0, 1, 2, 3, 255, 0]))).toEqual({ ok: false, code: 'UNKNOWN_FORMAT', message: "bad.fits is neither FITS (it does not start with 'SIMPLE  =') nor a text table" })
  })
  it('refuses an image without a wavelength scale', () => {
    const bytes = concat(
      header([
        ['SIMPLE', true],
        ['BITPIX', -32],
        ['NAXIS', 1],
        ['NAXIS1', 500],
        ['CDELT1', 1],
      ]),
      dataFloat32(new Array(500).fill(1)),
    )
    expect(refusal(bytes, { hdu: 0 }).code).toBe('NO_WAVELENGTH_SCALE')
  })
  it('refuses a frequency axis and an unknown wavelength unit', () => {
    expect(refusal(linearImage(500, 4000, 1, flat, [['CTYPE1', 'FREQ']])).code).toBe('NO_WAVELENGTH_SCALE')
    expect(refusal(linearImage(500, 4000, 1, flat, [['CUNIT1', 'furlong']]))).toEqual({
      ok: false,
      code: 'UNKNOWN_UNIT',
      message: "bad.fits: wavelength unit 'furlong' (CUNIT1) is not one of Angstrom, nm, um, m; choose the unit when you submit (--unit with npm run classify)",
    })
  })
  it('refuses all-NaN and all-zero flux', () => {
    expect(refusal(linearImage(500, 3800, 2.5, () => NaN))).toEqual({ ok: false, code: 'NO_VALID_FLUX', message: 'bad.fits: every flux value is NaN or flagged' })
    expect(refusal(linearImage(500, 3800, 2.5, () => 0))).toEqual({ ok: false, code: 'NO_VALID_FLUX', message: 'bad.fits: every valid flux value is zero' })
  })
  it('refuses fewer pixels than minPixels', () => {
    expect(refusal(linearImage(50, 3800, 25, flat))).toEqual({ ok: false, code: 'TOO_FEW_PIXELS', message: 'bad.fits: 50 pixels is fewer than the minimum of 100' })
  })
  it('refuses a spectrum that misses most of 3900–4900 Å', () => {
    expect(refusal(linearImage(1000, 5000, 2, flat)).code).toBe('NO_COVERAGE')
    // A gap of flagged pixels across the region counts as missing.
    const holed = linearImage(1000, 3800, 1.2, (i) => (i > 200 && i < 700 ? NaN : 1))
    expect(refusal(holed).code).toBe('NO_COVERAGE')
  })
  it('refuses wavelengths that cannot be optical and hints at a missing unit', () => {
    expect(refusal(linearImage(500, 380, 0.2, flat))).toEqual({
      ok: false,
      code: 'NOT_OPTICAL',
      message:
        'bad.fits: wavelengths run from 380.0 to 479.8 Å, which cannot be an optical spectrum; they look like nm but the file names no unit: choose the wavelength unit when you submit (--unit with npm run classify), or name it in the file (CUNIT1, TUNITn, or a "wavelength (nm)" column header)',
    })
    const told = readSpectrum(linearImage(500, 380, 0.2, flat), 'bad.fits', { wavelengthUnit: 'nm' })
    expect(told.ok && told.spectrum.wavelengthAir[0]).toBe(3800)
    expect(refusal(linearImage(500, 20000, 10, flat, [['CUNIT1', 'Angstrom']])).code).toBe('NOT_OPTICAL')
  })
  it('accepts a spectrum far wider than the optical and leaves cropping to the pipeline', () => {
    const r = ok(readSpectrum(linearImage(2000, 1000, 2000, flat), 'wide.fits'))
    expect(r.spectrum.wavelengthAir[1999]).toBe(1000 + 1999 * 2000)
  })
  it('refuses non-positive wavelengths', () => {
    expect(refusal(linearImage(500, -100, 10, flat)).code).toBe('BAD_WAVELENGTHS')
  })
})

describe('readSpectrum bounds the work on many-line images', () => {
  it('refuses a multispec image whose lines hold more pixels in all than four spectra may', () => {
    // 60 apertures of 2000 pixels with multispec keywords: 120 000 pixels, limit 4 × 20 000.
    const n = 2000
    const lines = 60
    const cards: Card[] = [
      ['SIMPLE', true],
      ['BITPIX', -32],
      ['NAXIS', 2],
      ['NAXIS1', n],
      ['NAXIS2', lines],
      ['CTYPE1', 'LINEAR'],
      ['CRVAL1', 3800],
      ['CDELT1', 1],
      ['APNUM1', '1 1 1 2'],
    ]
    const r = readSpectrum(concat(header(cards), dataFloat32(new Array(n * lines).fill(1))), 'many.fits', { maxPixels: 20_000 })
    expect(r).toEqual({ ok: false, code: 'TOO_MANY_PIXELS', message: 'many.fits: 60 lines of 2000 pixels is more than the limit of 80000 pixels in all; pick the spectrum out of the file first' })
  })
})
