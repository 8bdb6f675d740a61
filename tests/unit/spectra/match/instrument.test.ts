import { describe, expect, it } from 'vitest'
import { DEFAULT_GRID, gridWavelengths } from '../../../../shared/grid'
import { seededRandom } from '../../../../shared/random'
import { matchSpectrum, prepareMatchLibrary, type MatchStandardInput } from '../../../../server/spectra/match'
import { libraryForInstrument, responseCorrection, standardsUsed } from '../../../../server/spectra/match/instrument'

const wl = gridWavelengths(DEFAULT_GRID)

/** A made-up rectified spectrum: Gaussian absorption lines whose depths follow `t` (0–1). */
function lines(t: number, width = 3): Float64Array {
  const centres = [3933.66, 4101.74, 4226.73, 4340.47, 4383.55, 4481.2, 4861.33]
  const depths = [0.1 + 0.5 * t, 0.5 - 0.3 * t, 0.05 + 0.4 * t, 0.5 - 0.3 * t, 0.05 + 0.3 * t, 0.3 - 0.2 * t, 0.5 - 0.3 * t]
  return Float64Array.from(wl, (w) => 1 - centres.reduce((f, c, k) => f + depths[k]! * Math.exp(-0.5 * ((w - c) / width) ** 2), 0))
}

function gaussian(random: () => number): number {
  return Math.sqrt(-2 * Math.log(random() + 1e-12)) * Math.cos(2 * Math.PI * random())
}

const noisy = (flux: Float64Array, snr: number, seed: number) => {
  const random = seededRandom(seed)
  return Float64Array.from(flux, (v) => v + gaussian(random) / snr)
}

function standard(id: number, typeCode: number, classCode: number, extra: Partial<MatchStandardInput> = {}): MatchStandardInput {
  return {
    id,
    modelId: null,
    templateId: null,
    source: 'observed',
    star: `S${id}`,
    origin: 'made up',
    spectralType: `t${typeCode} c${classCode}`,
    typeCode,
    luminosityClass: classCode === 6 ? 'V' : 'III',
    classCode,
    teff: null,
    logg: null,
    feh: null,
    rectified: lines((typeCode - 20) / 30, classCode === 6 ? 4 : 2.5),
    resolutionFwhm: 2.5,
    ...extra,
  }
}

/** Eight general standards (types 20–48 in steps of 4, class III), two of instrument 1 and one of instrument 2. */
function inputs(): MatchStandardInput[] {
  const general = [20, 24, 28, 32, 36, 40, 44, 48].map((t, k) => standard(k + 1, t, 4))
  return [...general, standard(101, 32, 4, { instrumentId: 1, star: 'own 32' }), standard(102, 44, 4, { instrumentId: 1, star: 'own 44' }), standard(201, 28, 4, { instrumentId: 2, star: 'other 28' })]
}

const library = prepareMatchLibrary(inputs(), { versionId: 1, versionName: 'toy', grid: DEFAULT_GRID, resolutions: [2.5] })
const idsAt = (lib: ReturnType<typeof libraryForInstrument>) => Array.from(lib.level(2.5).rows, (k) => lib.standards[k]!.id)

describe('libraryForInstrument', () => {
  it('gives a library without instrument standards back level for level, so spectra of no instrument match as before', () => {
    const plain = prepareMatchLibrary(
      inputs().filter((s) => !s.instrumentId),
      { versionId: 2, versionName: 'plain', grid: DEFAULT_GRID, resolutions: [2.5] },
    )
    const view = libraryForInstrument(plain, null)
    expect(view.level(2.5)).toBe(plain.level(2.5))
    expect(libraryForInstrument(plain, 1).level(2.5)).toBe(plain.level(2.5))
  })

  it("keeps the general standards and its own, never another instrument's", () => {
    expect(idsAt(libraryForInstrument(library, 1))).toEqual([1, 2, 3, 4, 5, 6, 7, 8, 101, 102])
    expect(idsAt(libraryForInstrument(library, 2))).toEqual([1, 2, 3, 4, 5, 6, 7, 8, 201])
    expect(idsAt(libraryForInstrument(library, null))).toEqual([1, 2, 3, 4, 5, 6, 7, 8])
    expect(libraryForInstrument(library, 1).levelInfo(2.5)).toMatchObject({ instrumentStandards: 2, covered: 0, general: 8, correction: null })
  })

  it('leaves out the general standards its own cover when asked, and an excluded own standard covers nothing', () => {
    const cover = { types: 4, classes: 0.5 }
    // Own 32 covers 28, 32, 36; own 44 covers 40, 44, 48.
    expect(idsAt(libraryForInstrument(library, 1, { cover }))).toEqual([1, 2, 101, 102])
    expect(idsAt(libraryForInstrument(library, 1, { cover, exclude: new Set([101]) }))).toEqual([1, 2, 3, 4, 5, 101, 102])
    expect(libraryForInstrument(library, 1, { cover, exclude: new Set([101]) }).levelInfo(2.5)).toMatchObject({ instrumentStandards: 1, covered: 3 })
    // The rows kept carry their own flux and measures.
    const view = libraryForInstrument(library, 1, { cover })
    const base = library.level(2.5)
    const level = view.level(2.5)
    const row = Array.from(base.rows).indexOf(library.standards.findIndex((s) => s.id === 101))
    expect(Array.from(level.flux.subarray(2 * library.pixels, 3 * library.pixels))).toEqual(Array.from(base.flux.subarray(row * library.pixels, (row + 1) * library.pixels)))
    expect(level.typeCodes).toEqual([20, 24, 32, 44])
  })
})

describe("matching with an instrument's noisy standards", () => {
  it("takes a standard's own noise out of its χ², so a noisy copy of the right star fits like a clean one", () => {
    // A spectrum of type 34 at S/N 50; the library has a clean standard of that type and the
    // instrument a copy of it at S/N 50. Without the correction the copy's χ² is about twice the
    // clean one's (two noises, common practice for a difference of two noisy spectra).
    const truth = lines((34 - 20) / 30, 2.5)
    const lib = prepareMatchLibrary(
      [
        standard(1, 30, 4),
        { ...standard(2, 34, 4), rectified: truth },
        standard(3, 38, 4),
        { ...standard(10, 34, 4, { instrumentId: 1, snr: 50 }), rectified: noisy(truth, 50, 7) },
        { ...standard(11, 34, 4, { instrumentId: 1 }), rectified: noisy(truth, 50, 8) },
      ],
      { versionId: 3, versionName: 'noise', grid: DEFAULT_GRID, resolutions: [2.5] },
    )
    const spectrum = { rectified: noisy(truth, 50, 9), snr: 50, fwhm: 2.5 }
    const r = matchSpectrum(libraryForInstrument(lib, 1), spectrum, { exhaustive: true })
    const chi = (id: number) => r.candidates.find((c) => c.standardId === id)!.chi2
    expect(chi(11) / chi(2)).toBeGreaterThan(1.6)
    expect(chi(10) / chi(2)).toBeGreaterThan(0.8)
    expect(chi(10) / chi(2)).toBeLessThan(1.2)
  })
})

describe('standardsUsed', () => {
  it('says which set carried the vote and lists the voters that mattered', () => {
    const truth = lines((44 - 20) / 30, 2.5)
    const view = libraryForInstrument(library, 1)
    const r = matchSpectrum(view, { rectified: noisy(truth, 200, 3), snr: 200, fwhm: 2.5 }, { exhaustive: true })
    const used = standardsUsed(view, r)
    expect(used.instrumentId).toBe(1)
    expect(used.instrumentStandards).toBe(2)
    const own = r.voters.filter((v) => v.standardId >= 100).reduce((a, v) => a + v.typeShare, 0)
    expect(used.instrumentShare.type).toBeCloseTo(own, 2)
    expect(used.deciding.length).toBeGreaterThan(0)
    expect(used.deciding.every((d) => d.typeShare >= 0.05 || d.classShare >= 0.05)).toBe(true)
    expect(used.deciding.find((d) => d.standardId === 102)?.set).toBe('instrument')
    expect(used.deciding.filter((d) => d.set === 'library').every((d) => d.standardId < 100)).toBe(true)
    expect(['instrument', 'mixed']).toContain(used.decidedBy)
    const plain = standardsUsed(libraryForInstrument(library, null), matchSpectrum(libraryForInstrument(library, null), { rectified: truth, snr: 200, fwhm: 2.5 }))
    expect(plain).toMatchObject({ instrumentId: null, instrumentStandards: 0, decidedBy: 'library', instrumentShare: { type: 0, class: 0 } })
  })
})

describe('responseCorrection', () => {
  it("recovers a smooth factor between the instrument's standards and the general ones of the same type and class", () => {
    // Own standards are the general ones of their type times 1 + 0.04 sin(2π (λ − 3750)/1800): the factor to learn.
    const factor = (w: number) => 1 + 0.04 * Math.sin((2 * Math.PI * (w - 3750)) / 1800)
    const own = [24, 32, 40].map((t, k) => ({ ...standard(300 + k, t, 4, { instrumentId: 3 }), rectified: Float64Array.from(lines((t - 20) / 30, 2.5), (v, i) => v * factor(wl[i]!)) }))
    const lib = prepareMatchLibrary([...inputs().slice(0, 8), ...own], { versionId: 4, versionName: 'response', grid: DEFAULT_GRID, resolutions: [2.5] })
    const level = lib.level(2.5)
    const rowsOf = (pred: (id: number) => boolean) => Array.from(level.rows, (k, r) => (pred(lib.standards[k]!.id) ? r : -1)).filter((r) => r >= 0)
    const c = responseCorrection(
      lib,
      level,
      rowsOf((id) => id >= 300),
      rowsOf((id) => id < 100),
    )!
    expect(c.pairs).toBe(3)
    let worst = 0
    for (let i = 0; i < lib.pixels; i++) if (lib.wavelength[i]! > 3900 && lib.wavelength[i]! < 5400) worst = Math.max(worst, Math.abs(c.factor[i]! - factor(lib.wavelength[i]!)))
    expect(worst).toBeLessThan(0.006)
    expect(
      responseCorrection(
        lib,
        level,
        rowsOf((id) => id === 300),
        rowsOf((id) => id < 100),
      ),
    ).toBeNull()
  })
})
