// Suggestions for real stars against the shipped observed library (templates/observed-v2), each
// star left out of the library it is matched against (leave one star out). Published types are
// those of the libraries' own indexes: MILES v9.1 (Sánchez-Blázquez et al. 2006, MNRAS 371, 703;
// 2.5 Å FWHM, Falcón-Barroso et al. 2011) and the JHC library (Jacoby, Hunter & Christian 1984,
// ApJS 56, 257; these copies smoothed to about 15 Å). Flag fixtures: tests/fixtures/flags/PROVENANCE.md.
import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { DEFAULT_GRID, gridWavelengths } from '../../../../shared/grid'
import type { Spectrum1D } from '../../../../shared/spectrum'
import { defaultLibrary } from '../../../../server/spectra/match/load'
import { readSpectrum } from '../../../../server/spectra/io'
import { toSpectrum1D } from '../../../../server/spectra/io/types'
import { runPipeline } from '../../../../server/spectra/pipeline'
import { referenceStars, type ReferenceStar } from '../../../../bench/reference'
import { exactClass } from '../../../../bench/score'
import { cutSpectrum } from '../../../../bench/accuracy'
import { degradeSpectrum } from '../../../../bench/synthetic'
import { realA0V } from '../../../helpers/spectra'

const library = defaultLibrary()
const stars = referenceStars()
// Stars left out of the library (e.g. the metal-poor B9 V HD 130095) are still real spectra for composites.
const retired = referenceStars(undefined, { retired: true })
const star = (name: string): ReferenceStar => {
  const s = stars.find((x) => x.star === name) ?? retired.find((x) => x.star === name)
  if (!s) throw new Error(`no reference star ${name}`)
  return s
}
/** Classifies a reference star (or a spectrum made from it) with every spectrum of it left out; `given: false` leaves the resolution to the pipeline. */
const classify = (s: ReferenceStar, spectrum: Spectrum1D = s.spectrum, given = true) => runPipeline({ spectrum, ...(given ? { inputFwhm: s.fwhm } : {}), exclude: s.exclude }, library)

function fixture(name: string, z = 0): Spectrum1D {
  const read = readSpectrum(readFileSync(new URL(`../../../fixtures/flags/${name}`, import.meta.url)), name)
  if (!read.ok) throw new Error(read.message)
  const s = toSpectrum1D(read.spectrum)
  return { ...s, wavelength: s.wavelength.map((w) => w * (1 + z)) }
}

/** Two library stars summed at equal flux near 5500 Å, on the library grid (the library's copies of their spectra). */
function composite(a: ReferenceStar, b: ReferenceStar): Spectrum1D {
  const wl = gridWavelengths(DEFAULT_GRID)
  const at = (s: ReferenceStar) => {
    const i = s.spectrum.wavelength.findIndex((w) => w >= 5500)
    return s.spectrum.flux[i]!
  }
  const sample = (s: ReferenceStar, lambda: number) => {
    const w = s.spectrum.wavelength
    let j = 0
    while (j < w.length - 2 && w[j + 1]! < lambda) j++
    const t = (lambda - w[j]!) / (w[j + 1]! - w[j]!)
    return s.spectrum.flux[j]! + t * (s.spectrum.flux[j + 1]! - s.spectrum.flux[j]!)
  }
  const fa = at(a)
  const fb = at(b)
  const keep = Array.from(wl).filter((l) => l > 3600 && l < 7300)
  return { wavelength: Float64Array.from(keep), flux: Float64Array.from(keep, (l) => sample(a, l) / fa + sample(b, l) / fb) }
}

describe('the class and type of named reference stars', () => {
  // [star, source]: the published type is checked, not the code's own earlier answers.
  it.each([
    ['HD031295', 'A0 V (MILES)'],
    ['HD204041', 'A1 IV (MILES)'],
    ['HD175640', 'B9 III (MILES)'],
    ['HD160762', 'B3 IV (MILES)'],
    ['HD004307', 'G0 V (MILES)'],
    ['HD010307', 'G2 V (MILES)'],
    ['HD017382', 'K1 V (MILES)'],
    ['HD207130', 'K0 III (MILES)'],
    ['HD013520', 'K4 III (MILES)'],
    ['HD121130', 'M3 III (MILES)'],
    ['SAO 20899', 'B3 I (JHC)'],
  ])(
    '%s, published %s, gets its class and its type within one subtype',
    (name) => {
      const s = star(name)
      const r = classify(s).suggestion!
      expect(Math.abs(r.typeCode - s.typeCode), `${name}: ${r.spectralType} for ${s.publishedType}`).toBeLessThanOrEqual(1)
      const published: [number, number] = s.publishedType.trim().endsWith(' I') ? [1, 2] : s.classRange
      expect(
        exactClass({ truthType: s.typeCode, truthClass: s.classCode, truthClassRange: published, type: r.typeCode, classCode: r.classCode, sigmaType: 0, sigmaClass: 0, flags: [] }),
        `${name}: ${r.spectralType} for ${s.publishedType}`,
      ).toBe(true)
    },
    60_000,
  )

  it.each([
    ['HD065583', 'G8 V, [Fe/H] −0.56 (MILES)'],
    ['HD134063', 'G5 III, [Fe/H] −0.69 (MILES)'],
    ['HD173740', 'M5 V, [Fe/H] −0.54 (MILES)'],
  ])(
    '%s, published %s, gets its type within one subtype from the model of its neighbours in type, class and [Fe/H], and says so',
    (name) => {
      // Metal-poor stars show weaker metal lines than solar ones of their type: common practice. Their
      // nearest standards by χ² are solar ones of another type, which the vote alone followed.
      const s = star(name)
      const out = classify(s)
      const r = out.suggestion!
      expect(Math.abs(r.typeCode - s.typeCode), `${name}: ${r.spectralType} for ${s.publishedType}`).toBeLessThanOrEqual(1)
      expect(r.typeNote).toMatch(/linear model of the \d+ nearest standards in type, class and \[Fe\/H\]/)
      expect(out.notes).toContain(r.typeNote)
    },
    60_000,
  )

  it.each([
    ['HD087737', 'A0 Ib (MILES)'],
    ['HD164353', 'B5 Ib (MILES)'],
  ])(
    '%s, published %s, is a supergiant by its narrow Balmer lines, though its nearest standards are giants and dwarfs',
    (name) => {
      // Balmer lines far narrower in B–A supergiants than in giants and dwarfs of the same type: common practice in MK classification.
      const r = classify(star(name)).suggestion!
      expect(r.classCode, `${name}: ${r.spectralType}`).toBeLessThanOrEqual(2)
      expect(r.classNote).toMatch(/from the Balmer lines/)
      const width = r.votes.find((v) => v.criterion === 'balmer-width')!
      expect(width.vote).toBe(r.luminosityClass)
      expect(r.classShares[0]!.classCode, 'the vote alone says giant or fainter').toBeGreaterThan(2)
    },
    60_000,
  )

  it('lets the best 5 standards vote on the type at 12 Å and coarser, and all 16 on the class', () => {
    // HD 10307, G2 V (MILES), as recorded and degraded to 15 Å.
    const s = star('HD010307')
    const sharp = classify(s).suggestion!
    const coarse = runPipeline({ spectrum: degradeSpectrum(s.spectrum, { from: s.fwhm, to: 15, seed: 7 }), inputFwhm: 15, exclude: s.exclude }, library).suggestion!
    expect(coarse.levelFwhm).toBeGreaterThanOrEqual(12)
    const typeVoters = (r: typeof sharp) => r.voters.filter((v) => v.typeShare > 0).length
    expect(typeVoters(coarse)).toBeLessThanOrEqual(5)
    expect(coarse.voters.filter((v) => v.classShare > 0)).toHaveLength(16)
    expect(typeVoters(sharp)).toBeGreaterThan(5)
    expect(Math.abs(coarse.typeCode - s.typeCode)).toBeLessThanOrEqual(2)
  }, 60_000)

  it('reports Teff, log g and [Fe/H] near the published values of a solar-type dwarf (HD 10307, G2 V; MILES parameter table)', () => {
    const s = star('HD010307')
    const p = classify(s).suggestion!.parameters
    expect(Math.abs(p.teff!.value - s.teff!)).toBeLessThan(Math.max(250, 2 * p.teff!.error))
    expect(Math.abs(p.logg!.value - s.logg!)).toBeLessThan(0.4)
    expect(Math.abs(p.feh!.value - s.feh!)).toBeLessThan(0.3)
  }, 60_000)

  it('matches cool stars that reach past Hα over 3850–6800 Å, and keeps the default or a campaign’s own region otherwise', () => {
    // HD 17382, K1 V, and HD 160762, B3 IV (MILES, which covers 3525–7500 Å).
    const cool = classify(star('HD017382'))
    expect(cool.suggestion!.region).toEqual([3850, 6800])
    expect(cool.notes.join(' ')).toMatch(/matched over 3850–6800 Å/)
    expect(classify(star('HD160762')).suggestion!.region).toEqual([3850, 5000])
    // Cut at 6400 Å (short of Hα) the same K dwarf keeps the default region.
    const s = star('HD017382')
    expect(classify(s, cutSpectrum(s.spectrum, [0, 6400])).suggestion!.region).toEqual([3850, 5000])
    // A campaign region of its own is used as it is.
    expect(runPipeline({ spectrum: s.spectrum, inputFwhm: s.fwhm, exclude: s.exclude, region: [4000, 5200] }, library).suggestion!.region).toEqual([4000, 5200])
  }, 60_000)

  // Uploads must cover 80 % of 3900–4900 Å (the reader's rule), so a spectrum may still miss part of
  // the default region; the pipeline itself classifies any part of the standards' span it is given,
  // over what the spectrum covers and with a note. Published types as above; within ±2 subtypes.
  it.each([
    ['HD017382', 'K1 V', 51, 5000, 7400],
    ['HD207130', 'K0 III', 50, 5000, 7400],
    ['HD004307', 'G0 V', 40, 5600, 6800],
    ['HD160762', 'B3 IV', 13, 3900, 4600],
    ['HD017382', 'K1 V', 51, 3900, 4700],
  ])(
    'classifies %s (%s) from %i–%i Å alone',
    (name, _type, code, lo, hi) => {
      const s = star(name)
      const out = classify(s, cutSpectrum(s.spectrum, [lo, hi]))
      const [from, to] = out.suggestion!.region
      // 50 Å clear of the spectrum's own ends, inside the standards' span.
      expect(from).toBeGreaterThanOrEqual(lo + 50)
      expect(to).toBeLessThanOrEqual(hi - 50)
      expect(to - from).toBeGreaterThanOrEqual(300)
      expect(out.notes.join(' ')).toMatch(lo >= 5000 ? /does not reach the MK classification region 3850–5000 Å/ : /covers \d+–\d+ Å of the classification region/)
      expect(Math.abs(out.suggestion!.typeCode - code)).toBeLessThanOrEqual(2)
    },
    60_000,
  )
})

describe('standards rectified over part of the grid', () => {
  it('is the library itself for a spectrum that spans the grid, and a view rectified over the range otherwise', () => {
    expect(library.rectifiedOver([3500, 7500])).toBe(library)
    const blue = library.rectifiedOver([3900, 4700])
    expect(blue).not.toBe(library)
    expect(library.rectifiedOver([3905, 4690])).toBe(blue)
    const w = blue.wavelength
    const row = Array.from(blue.level(2.5).flux.subarray(0, blue.pixels))
    const inside = row.filter((_, i) => w[i]! >= 3920 && w[i]! <= 4680)
    expect(inside.every(Number.isFinite)).toBe(true)
    expect(row.filter((_, i) => w[i]! < 3880 || w[i]! > 4720).every(Number.isNaN)).toBe(true)
    // Rectified: the upper tenth of the flux lies at the continuum, 1 (common practice: a continuum through the line-free peaks).
    inside.sort((a, b) => a - b)
    expect(inside[Math.floor(0.9 * inside.length)]!).toBeGreaterThan(0.95)
    expect(inside[Math.floor(0.9 * inside.length)]!).toBeLessThan(1.05)
  })
})

describe('the resolution estimate', () => {
  // MILES is at 2.5 Å FWHM (Falcón-Barroso et al. 2011); degraded here with a Gaussian of √(target² − 2.5²).
  it.each([
    ['HD207130', 'K0 III'],
    ['HD004307', 'G0 V'],
  ])(
    'recovers %s (%s) degraded to 4, 7 and 12 Å FWHM within 15 %%',
    (name) => {
      const s = star(name)
      for (const fwhm of [4, 7, 12]) {
        const out = classify(s, degradeSpectrum(s.spectrum, { from: 2.5, to: fwhm, seed: 7 }), false)
        expect(out.resolution.source).toBe('estimated')
        expect(Math.abs(out.resolution.fwhm! / fwhm - 1), `${name} at ${fwhm} Å: ${out.resolution.fwhm}`).toBeLessThan(0.15)
      }
    },
    120_000,
  )

  it("says a spectrum at the standards' own resolution is at least as sharp as they are", () => {
    const out = classify(star('HD207130'), undefined, false)
    expect(out.resolution).toMatchObject({ source: 'estimated', bound: 'sharpest', fwhm: 2.5, level: 2.5 })
  }, 60_000)
})

describe('the flags on real spectra', () => {
  it('raises possible-composite for two stars of different type at equal flux near 5500 Å, and not for either alone', () => {
    // A0 V HD 31295 + K0 III HD 10975, and B9 V HD 130095 + K2 III HD 104307 (MILES types).
    for (const [a, b] of [
      ['HD031295', 'HD010975'],
      ['HD130095', 'HD104307'],
    ] as const) {
      const sa = star(a)
      const sb = star(b)
      const out = runPipeline({ spectrum: composite(sa, sb), inputFwhm: 2.5, exclude: new Set([...sa.exclude, ...sb.exclude]) }, library)
      expect(out.suggestion!.flags, `${a} + ${b}`).toContain('possible-composite')
      expect(classify(sa).suggestion!.flags).not.toContain('possible-composite')
      expect(classify(sb).suggestion!.flags).not.toContain('possible-composite')
    }
  }, 120_000)

  it('calls the DA white dwarf GRW +70 5824 outside the MK system, and neither the A0 V standard Vega nor an M dwarf', () => {
    const da = runPipeline({ spectrum: fixture('grw_70d5824_stisnic_005.fits') }, library).suggestion!
    expect(da.flags).toContain('not-mk')
    expect(da.uncertainty.subtypes).toBeGreaterThanOrEqual(10)
    const read = readSpectrum(realA0V(), 'alpha_lyr_stis_010.fits')
    if (!read.ok) throw new Error(read.message)
    expect(runPipeline({ spectrum: toSpectrum1D(read.spectrum), inputFwhm: 5.5 }, library).suggestion!.flags).not.toContain('not-mk')
    // HD 95735, M2 V (MILES).
    expect(classify(star('HD095735')).suggestion!.flags).not.toContain('not-mk')
  }, 60_000)

  it("does not take the noise of a K giant's faint blue end for emission: not a star on none of five noise draws at S/N 50", () => {
    // HD 83425 K3 III and HD 49161 K4 III (MILES). Near 3900 Å a K giant gives a fraction of its
    // flux at 5000 Å (a 4300 K Planck curve gives half, and the crowded lines there take more: from
    // memory), so its noise there is several times what the headline S/N says.
    for (const id of ['HD083425', 'HD049161']) {
      const s = star(id)
      for (let seed = 1; seed <= 5; seed++) {
        const noisy = degradeSpectrum(s.spectrum, { from: s.fwhm, to: s.fwhm, snr: 50, seed })
        expect(classify(s, noisy).suggestion!.flags, `${id} seed ${seed}`).not.toContain('not-star')
      }
    }
  }, 120_000)

  it('calls a Seyfert galaxy (NGC 1068, at rest and at z = 0.2) and a quasar (at rest and at z = 0.3) not a star, with no confident type', () => {
    for (const [name, z] of [
      ['ngc1068_template.fits', 0],
      ['ngc1068_template.fits', 0.2],
      ['qso_template.fits', 0],
      ['qso_template.fits', 0.3],
    ] as const) {
      const out = runPipeline({ spectrum: fixture(name, z) }, library)
      expect(out.suggestion!.flags, `${name} z=${z}`).toContain('not-star')
      expect(out.suggestion!.uncertainty.subtypes).toBeGreaterThanOrEqual(10)
      expect(out.notes.join(' ')).toContain('Not a star')
    }
  }, 120_000)

  it('raises poor-fit on at most 10 % of normal reference stars, and on the composites and the quasar', () => {
    const sample = stars.filter((_, i) => i % 6 === 0)
    const poor = sample.filter((s) => classify(s).suggestion!.flags.includes('poor-fit')).length
    expect(poor / sample.length).toBeLessThanOrEqual(0.1)
    expect(runPipeline({ spectrum: fixture('qso_template.fits', 0.3) }, library).suggestion!.flags).toContain('poor-fit')
  }, 300_000)

  it('raises poor-fit on at most 10 % of normal MILES stars cut to 3900–4700 Å, a blue spectrum the reader admits', () => {
    // The standards are rectified again over the part the spectrum covers: a continuum fitted over
    // 800 Å differs from one fitted over 3300 Å, and left as it was every fourth such fit looked poor.
    const sample = stars.filter((s, i) => s.source === 'miles' && i % 4 === 0)
    const poor = sample.filter((s) => classify(s, cutSpectrum(s.spectrum, [3900, 4700])).suggestion!.flags.includes('poor-fit')).length
    expect(poor / sample.length).toBeLessThanOrEqual(0.1)
  }, 300_000)

  it('raises poor-fit on at most 10 % of normal MILES stars with 20 cosmic-ray hits each, which it masks and keeps the type', () => {
    // One-pixel hits of 0.5–2.5 × the median flux, as an uncleaned exposure keeps them; the poor-fit
    // limit is the one above. Left in, such hits made every fit look poor.
    const sample = stars.filter((s, i) => s.source === 'miles' && i % 4 === 0)
    let poor = 0
    let within1 = 0
    let masked = 0
    for (const s of sample) {
      const flux = Float64Array.from(s.spectrum.flux)
      const level = [...flux].filter(Number.isFinite).sort((a, b) => a - b)[flux.length >> 1]!
      for (let k = 0; k < 20; k++) flux[150 + k * 190] = flux[150 + k * 190]! + level * (0.5 + 0.1 * k)
      const out = classify(s, { ...s.spectrum, flux })
      if (out.suggestion!.flags.includes('poor-fit')) poor++
      const clean = classify(s).suggestion!
      if (Math.abs(out.suggestion!.typeCode - clean.typeCode) <= 1) within1++
      if (out.notes.some((n) => /masked as narrow spikes/.test(n))) masked++
    }
    expect(poor / sample.length).toBeLessThanOrEqual(0.1)
    expect(masked).toBe(sample.length)
    // The same type as without the hits, within one subtype, for nine stars in ten or more.
    expect(within1 / sample.length).toBeGreaterThanOrEqual(0.9)
  }, 300_000)

  it('raises low-snr for a star with noise to S/N 10, and not for the stars as the libraries give them (S/N from the residual of the best standard)', () => {
    const s = star('HD207130')
    const noisy = degradeSpectrum(s.spectrum, { from: 2.5, to: 2.5, snr: 10, seed: 3 })
    delete noisy.error
    const low = classify(s, noisy)
    expect(low.suggestion!.flags).toContain('low-snr')
    expect(low.analysis.snr!).toBeLessThan(20)
    // K giants at 2.5 Å: DER_SNR alone put these near S/N 20 (its second differences take the lines for noise).
    for (const name of ['HD207130', 'HD013520', 'HD104307']) {
      const out = classify(star(name))
      expect(out.suggestion!.flags, name).not.toContain('low-snr')
      expect(out.analysis.snrMethod).toBe('residual')
    }
  }, 60_000)

  it('reads back the S/N of spectra without errors at the resolution they come in, sharper or broader than a library level', () => {
    // Noise of a known σ added to real stars (MILES spectra are well above S/N 40 per pixel on their own:
    // Sánchez-Blázquez et al. 2006, from memory);
    // the truth is the median flux over the classification region (3850–5000 Å) over σ.
    const sample = stars.filter((s, i) => s.source === 'miles' && i % 24 === 0)
    for (const fwhm of [2.5, 3.2, 6]) {
      const ratios = sample.map((s, k) => {
        const noisy = degradeSpectrum(s.spectrum, { from: 2.5, to: fwhm, snr: 40, seed: 50 + k })
        const sigma = noisy.error![0]!
        delete noisy.error
        const inRegion = Array.from(noisy.wavelength.keys())
          .filter((i) => noisy.wavelength[i]! >= 3850 && noisy.wavelength[i]! <= 5000)
          .map((i) => s.spectrum.flux[i]!)
          .sort((a, b) => a - b)
        const truth = inRegion[inRegion.length >> 1]! / sigma
        return runPipeline({ spectrum: noisy, inputFwhm: fwhm, exclude: s.exclude }, library).analysis.snr! / truth
      })
      ratios.sort((a, b) => a - b)
      const median = ratios[ratios.length >> 1]!
      expect(Math.abs(median - 1), `${fwhm} Å: ${ratios.map((r) => r.toFixed(2)).join(' ')}`).toBeLessThan(0.2)
      expect(ratios[ratios.length - 1]!, `${fwhm} Å`).toBeLessThan(1.3)
    }
  }, 120_000)

  it('caps the S/N of a noiseless spectrum and says so', () => {
    const s = star('HD207130')
    const wl = gridWavelengths(DEFAULT_GRID)
    const flux = Float64Array.from(wl, (l) => 1 - 0.5 * Math.exp(-0.5 * ((l - 4340) / 3) ** 2) - 0.4 * Math.exp(-0.5 * ((l - 4861) / 3) ** 2))
    const out = runPipeline({ spectrum: { wavelength: wl, flux }, inputFwhm: 2.5, exclude: s.exclude }, library)
    expect(out.analysis.snr).toBe(1000)
    expect(out.analysis.snrMethod).toBe('capped')
  }, 60_000)

  it('raises emission for a real A dwarf with an Hα emission line added as Be stars show (6 Å FWHM, peak 4 × the continuum, EW about −25 Å)', () => {
    const s = star('HD031295')
    const w = s.spectrum.wavelength
    const withEmission = { ...s.spectrum, flux: s.spectrum.flux.map((f, i) => f * (1 + 4 * Math.exp(-0.5 * ((w[i]! - 6562.8) / 2.55) ** 2))) }
    const r = classify(s, withEmission).suggestion!
    expect(r.flags).toContain('emission')
    expect(classify(s).suggestion!.flags).not.toContain('emission')
  }, 60_000)
})
