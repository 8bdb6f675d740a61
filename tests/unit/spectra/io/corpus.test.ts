import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { beforeAll, describe, expect, it } from 'vitest'
import { CORPUS_DIR, loadCorpus, scoreEntry, type CorpusEntry } from '../../../../bench/corpus'
import { defaultLibrary } from '../../../../server/jobs/worker'
import { readSpectrum, toSpectrum1D, type ReadResult, type ReadSuccess } from '../../../../server/spectra/io'
import type { PreparedMatchLibrary } from '../../../../server/spectra/match'
import { runPipeline } from '../../../../server/spectra/pipeline'

// Reference: tests/reference/make_reader_corpus.py (astropy 5.2.1, numpy 1.24) → tests/fixtures/corpus/corpus.json:
// one known spectrum (model F5 V) in each layout; a right read gives the stated air range (to 0.05 Å),
// pixel count, medium and a radial velocity of about 0.
const corpus = loadCorpus()
const read = (e: CorpusEntry): ReadResult => readSpectrum(new Uint8Array(readFileSync(join(CORPUS_DIR, e.file))), e.file, e.options ?? {})
const ok = (r: ReadResult): ReadSuccess => {
  if (!r.ok) throw new Error(`${r.code}: ${r.message}`)
  return r
}
const byFile = (name: string) => corpus.files.find((e) => e.file === name)!

/** What each refusal must tell the observer to do (the option or keyword to use). */
const REFUSAL_ADVICE: Record<string, RegExp> = {
  'mef-inherit-false.fits': /set INHERIT = T, or pick the primary HDU/,
  'refuse-2d-frame.fits': /extract a 1-D spectrum first/,
  'refuse-frequency-axis.fits': /save the spectrum on a wavelength axis/,
  'refuse-table-no-flux.fits': /no flux column among WAVE, SKY .*rename the column/,
  'refuse-no-wcs.fits': /add CRVAL1 and CDELT1/,
  'refuse-red-only.fits': /cover 0 % of 3900–4900 Å \(the spectrum runs 5600.0–7099.0 Å\)/,
  'refuse-nm-no-unit.txt': /look like nm but the file names no unit: choose the wavelength unit when you submit \(--unit/,
}

describe('the reader corpus', () => {
  it('holds every layout the readers must handle, built by the committed astropy script', () => {
    expect(corpus.files.length).toBe(95)
    expect(corpus.astropy).toBe('5.2.1')
    expect(corpus.files.filter((e) => e.expect === 'read').length).toBe(88)
  })
  for (const e of corpus.files.filter((f) => f.expect === 'read')) {
    it(`reads ${e.file} right: ${e.layout}`, () => {
      const s = scoreEntry(readSpectrum, e, corpus.tolerances.rangeAngstrom)
      expect(s.problems).toEqual([])
      const r = ok(s.read as ReadResult)
      const d = r.meta.decisions!
      if (e.hdu !== undefined) expect(r.meta.hdu).toBe(e.hdu)
      if (e.aperture !== undefined) expect(d.aperture?.number ?? 1).toBe(e.aperture)
      if (e.merged) expect(d.aperture?.of).toBe(e.merged)
      if (e.maskedPixels !== undefined) expect(r.meta.maskedPixels).toBe(e.maskedPixels)
      expect(r.spectrum.error !== undefined).toBe(!!e.error)
      if (e.warning === 'contradict') expect(d.medium.conflict).toMatch(/^the header contradicts itself/)
      else expect(d.medium.conflict).toBeUndefined()
      expect(d.wavelengthSolution).not.toBe('')
      expect(d.unit.why).not.toBe('')
    })
  }
  for (const e of corpus.files.filter((f) => f.expect === 'refused')) {
    it(`refuses ${e.file} with ${e.code} and says what to do: ${e.layout}`, () => {
      const r = read(e)
      expect(r.ok).toBe(false)
      if (r.ok) return
      expect(r.code).toBe(e.code)
      expect(r.message).toMatch(REFUSAL_ADVICE[e.file]!)
    })
  }

  describe('radial velocity of every file read', () => {
    let library: PreparedMatchLibrary
    beforeAll(() => {
      library = defaultLibrary()
    })
    // A scale in the wrong medium moves lines by about 84 km/s at 4000–5000 Å (Morton 2000 index
    // n − 1 ≈ 2.8e-4); the pipeline matches the known spectrum to well under 5 km/s.
    it('is within 25 km/s of zero for all 88 readable files (a medium mistake gives 84 km/s)', () => {
      const off: string[] = []
      for (const e of corpus.files.filter((f) => f.expect === 'read')) {
        const out = runPipeline({ spectrum: toSpectrum1D(ok(read(e)).spectrum) }, library)
        const v = out.analysis.rv?.v
        if (v === undefined || !(Math.abs(v) < 25)) off.push(`${e.file}: ${v}`)
      }
      expect(off).toEqual([])
    }, 120_000)
  })

  describe('decisions the observer sees', () => {
    it('names the red arm it did not read and why it read the blue one', () => {
      const d = ok(read(byFile('two-arm-images.fits'))).meta.decisions!
      expect(d.hdu).toEqual({ index: 2, name: 'BLUE', why: 'the first HDU that covers the classification region (HDU 1 (RED) does not)' })
      expect(d.ignored).toEqual(['HDU 1 (RED): another spectrum (5600–6959 Å); pick it with the HDU option'])
    })
    it('reads the aperture that covers the region and names the others', () => {
      const d = ok(read(byFile('ms-3ap-red-first.fits'))).meta.decisions!
      expect(d.aperture).toEqual({ number: 2, of: 3, why: 'the first one that covers the classification region (aperture 1 (line 1) does not) — aperture 2 (line 2)' })
      expect(d.ignored).toContain('2 other apertures (aperture 1 (line 1), aperture 3 (line 3)): 3 are in the file; pick another with the aperture option')
    })
    it('merges echelle orders, says how, and warns that no blaze correction was made', () => {
      const d = ok(read(byFile('ms-echelle-orders.fits'))).meta.decisions!
      expect(d.aperture!.number).toBe('merged')
      expect(d.aperture!.why).toMatch(/all 24 were merged in wavelength order/)
      expect(d.warnings).toEqual(['24 orders were merged without a blaze correction or flux matching between them: check the continuum, or pick one order with the aperture option'])
    })
    it('applies DATAQUAL by its column comment, and IVAR and the AND mask of a survey table', () => {
      expect(ok(read(byFile('tab-dataqual.fits'))).meta.decisions!.masks).toEqual([
        { source: 'DATAQUAL column', rule: '0 is bad, 1 is good (as its comment says: "Data quality: 1=good, 0=bad")', pixels: 5 },
      ])
      const d = ok(read(byFile('tab-sdss-loglam.fits'))).meta.decisions!
      expect(d.masks.map((m) => [m.source, m.pixels])).toEqual([
        ['ivar column', 2],
        ['and_mask column', 3],
      ])
      expect(d.ignored).toEqual(['column or_mask: the AND mask is the one used for science', 'columns wdisp, sky, model'])
      expect(d.medium).toEqual({ vacuum: true, why: 'LOGLAM column: log10 vacuum wavelengths by the survey convention' })
    })
    it('says why CTYPE1 WAVE beside AIRORVAC = air is read as air', () => {
      const d = ok(read(byFile('img-wave-airorvac-air.fits'))).meta.decisions!
      expect(d.medium.vacuum).toBe(false)
      expect(d.medium.why).toBe("AIRORVAC = 'air'")
      expect(d.medium.conflict).toMatch(/AIRORVAC = 'air' is the stronger statement\. If that is wrong, choose the medium/)
      expect(d.warnings).toContain(d.medium.conflict)
    })
    it('reads an old IRAF PIXEL axis with DC-FLAG = 0 as dispersion-corrected', () => {
      const d = ok(read(byFile('img-pixel-dcflag0.fits'))).meta.decisions!
      expect(d.wavelengthSolution).toBe("linear: λ = CRVAL1 + CDELT1 (p − CRPIX1) (DC-FLAG = 0: dispersion-corrected, CTYPE1 = 'PIXEL' of older IRAF files)")
    })
    it('takes the unit from the commented header of a library text file', () => {
      const d = ok(read(byFile('txt-wavelength-nm-comment.txt'))).meta.decisions!
      expect(d.unit).toEqual({ unit: 'nm', why: "the column header 'Wavelength [nm]'" })
    })
    it('uses the error extension and the DQ flags of an HST-style file', () => {
      const d = ok(read(byFile('mef-sci-err-dq-inherit.fits'))).meta.decisions!
      expect(d.errors).toBe('HDU 2 (ERR)')
      expect(d.masks).toEqual([{ source: 'HDU 3 (DQ)', rule: '0 is good, non-zero is bad (common practice for quality flags)', pixels: 3 }])
      expect(d.wavelengthSolution).toMatch(/keywords from the primary header, INHERIT = T/)
    })
    it('follows the observer who picks another aperture or names the unit', () => {
      const e = byFile('ms-2ap-default.fits')
      const r = ok(readSpectrum(new Uint8Array(readFileSync(join(CORPUS_DIR, e.file))), e.file, { aperture: 2 }))
      expect(r.meta.decisions!.aperture).toEqual({ number: 2, of: 2, why: 'your choice — aperture 2 (line 2)' })
      const none = readSpectrum(new Uint8Array(readFileSync(join(CORPUS_DIR, e.file))), e.file, { aperture: 5 })
      expect(none).toEqual({ ok: false, code: 'APERTURE_NOT_FOUND', message: 'ms-2ap-default.fits: there is no aperture 5; HDU 0 holds 2 (aperture 1 (line 1), aperture 2 (line 2)), counted from 1' })
      const nm = ok(readSpectrum(new Uint8Array(readFileSync(join(CORPUS_DIR, 'refuse-nm-no-unit.txt'))), 'x.txt', { wavelengthUnit: 'nm' }))
      expect(nm.spectrum.wavelengthAir[0]).toBeCloseTo(3800, 9)
      expect(nm.meta.decisions!.unit).toEqual({ unit: 'nm', why: 'your choice' })
    })
    it('does not apply a quality convention that would flag every pixel, and says so', () => {
      // DATAQUAL without a comment follows CALSPEC (1 = good); a file whose flags are all 0 under that rule is not refused.
      const e = byFile('tab-quality.fits')
      const bytes = new Uint8Array(readFileSync(join(CORPUS_DIR, e.file)))
      const text = new TextDecoder('latin1').decode(bytes)
      const at = text.indexOf("TTYPE3  = 'QUALITY '")
      const edited = bytes.slice()
      edited.set(new TextEncoder().encode("TTYPE3  = 'DATAQUAL'"), at)
      const r = ok(readSpectrum(edited, 'q.fits'))
      expect(r.meta.decisions!.masks).toEqual([])
      expect(r.meta.decisions!.warnings[0]).toMatch(/^DATAQUAL column was not applied: by the rule "0 is bad, 1 is good \(the HST CALSPEC convention/)
    })
  })
})
