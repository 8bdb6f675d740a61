import { describe, expect, it } from 'vitest'
import { DEFAULT_GRID, gridWavelengths, makeLogGrid } from '../../../../shared/grid'
import type { LineMeasurement } from '../../../../server/spectra/measure/types'
import {
  CRITERIA,
  criterionValue,
  depthScaledPairChiSquare,
  smoothPairChiSquare,
  DEPTH_SCALE_BOUNDS,
  depthScaledChiSquareRows,
  depthScaledChiSquareSelected,
  hasBalmerEmission,
  matchSpectrum,
  parabolaVertex,
  prepareMatchLibrary,
  replaceModelsByObserved,
  scaledChiSquare,
  type MatchStandardInput,
} from '../../../../server/spectra/match'
import { smallestFinite } from '../../../../server/spectra/match/classify'

/** A made-up rectified spectrum: Gaussian absorption lines of the given depths at fixed places. */
function lines(grid: typeof DEFAULT_GRID, depths: number[], width = 3): Float32Array {
  const wl = gridWavelengths(grid)
  const centres = [3933.66, 4101.74, 4340.47, 4383.55, 4481.2, 4861.33]
  const out = new Float32Array(grid.length)
  for (let i = 0; i < grid.length; i++) {
    let f = 1
    centres.forEach((c, k) => {
      f -= (depths[k] ?? 0) * Math.exp(-0.5 * ((wl[i]! - c) / width) ** 2)
    })
    out[i] = f
  }
  return out
}

/** A small made-up library: five types × two classes; class V lines wider, depths trend with type. */
function toyLibrary(): MatchStandardInput[] {
  const out: MatchStandardInput[] = []
  let id = 1
  for (const typeCode of [10, 15, 20, 25, 30]) {
    for (const [cls, classCode, width] of [
      ['III', 4, 2],
      ['V', 6, 4],
    ] as const) {
      const t = (typeCode - 10) / 20
      out.push({
        id: id++,
        modelId: `T${typeCode}-${cls}`,
        templateId: null,
        source: 'model',
        star: null,
        origin: 'toy',
        spectralType: `x${typeCode} ${cls}`,
        typeCode,
        luminosityClass: cls,
        classCode,
        teff: 20000 - 300 * typeCode,
        logg: classCode === 6 ? 4.2 : 3.0,
        feh: 0,
        rectified: lines(DEFAULT_GRID, [0.1 + 0.5 * t, 0.5 - 0.2 * Math.abs(t - 0.5), 0.5 - 0.2 * Math.abs(t - 0.5), 0.05 + 0.3 * t, 0.3 - 0.2 * t, 0.5 - 0.2 * Math.abs(t - 0.5)], width),
        resolutionFwhm: 1.5,
      })
    }
  }
  return out
}

const toy = prepareMatchLibrary(toyLibrary(), { versionId: 7, versionName: 'toy', grid: DEFAULT_GRID, resolutions: [1.5, 3] })

describe('scaledChiSquare', () => {
  it('finds the analytic scale a = Σwft/Σwt² and χ² = Σwf² − (Σwft)²/Σwt²', () => {
    const f = [1, 2, 3]
    const t = [1, 1, 2]
    const w = [1, 2, 0.5]
    // Σwft = 1 + 4 + 3 = 8, Σwt² = 1 + 2 + 2 = 5, Σwf² = 1 + 8 + 4.5 = 13.5 (worked by hand).
    const r = scaledChiSquare(f, t, w)
    expect(r.scale).toBeCloseTo(8 / 5, 12)
    expect(r.chi2).toBeCloseTo(13.5 - 64 / 5, 12)
    expect(r.pixels).toBe(3)
    // The same χ² computed directly at the best scale.
    const direct = f.reduce((s, fi, i) => s + w[i]! * (fi - r.scale * t[i]!) ** 2, 0)
    expect(r.chi2).toBeCloseTo(direct, 12)
  })

  it('is zero for a template that is the data times a constant', () => {
    const r = scaledChiSquare([2, 4, 6], [1, 2, 3], [1, 1, 1])
    expect(r.scale).toBeCloseTo(2, 12)
    expect(r.chi2).toBeCloseTo(0, 12)
  })

  it('leaves out zero weights and non-finite template pixels, and reports no pixels as infinite χ²', () => {
    expect(scaledChiSquare([1, 100], [1, Number.NaN], [1, 1]).pixels).toBe(1)
    expect(scaledChiSquare([1, 2], [1, 2], [0, 0]).chi2).toBe(Infinity)
  })
})

describe('depthScaledChiSquareRows', () => {
  it('recovers a line-depth scale and level exactly, and holds the scale at its bounds', () => {
    const t = new Float32Array([1, 0.5, 0.8, 1, 0.2])
    const rows = new Float32Array([...t, ...t])
    const f = Float64Array.from(t, (v) => 0.02 + 0.9 * v)
    const w = new Float64Array(5).fill(1)
    const chi2 = new Float64Array(2)
    const scale = new Float64Array(2)
    const used = new Float64Array(2)
    depthScaledChiSquareRows(f, w, rows, 5, 0, 5, chi2, scale, used)
    expect(scale[0]).toBeCloseTo(0.9, 6)
    expect(chi2[0]).toBeCloseTo(0, 9)
    const stretched = Float64Array.from(t, (v) => 1 - 3 * (1 - v))
    depthScaledChiSquareRows(stretched, w, rows, 5, 0, 5, chi2, scale, used)
    expect(scale[0]).toBe(DEPTH_SCALE_BOUNDS[1])
    expect(chi2[0]).toBeGreaterThan(0)
  })
})

describe('parabolaVertex', () => {
  it('finds the vertex of y = (x − 2.3)² through unevenly spaced points', () => {
    const y = (x: number) => (x - 2.3) ** 2
    expect(parabolaVertex(1, y(1), 2, y(2), 4, y(4))).toBeCloseTo(2.3, 12)
  })
  it('returns the middle point for a line or a downward parabola, and clamps to the outer points', () => {
    expect(parabolaVertex(0, 0, 1, 1, 2, 2)).toBe(1)
    expect(parabolaVertex(0, 0, 1, 1, 2, 0)).toBe(1)
    const y = (x: number) => (x - 10) ** 2
    expect(parabolaVertex(0, y(0), 1, y(1), 3, y(3))).toBe(3)
  })
})

describe('replaceModelsByObserved', () => {
  it('drops the model standard of a (type, class) point that has an observed one', () => {
    const kept = replaceModelsByObserved([
      { id: 1, source: 'model' as const, typeCode: 20, classCode: 6 },
      { id: 2, source: 'model' as const, typeCode: 20, classCode: 4 },
      { id: 3, source: 'observed' as const, typeCode: 20, classCode: 6 },
    ])
    expect(kept.map((s) => s.id)).toEqual([2, 3])
  })
})

describe('typeCodesAt', () => {
  it('names the types a level reaches, as the prepared level does, standards up to 30 % coarser included', () => {
    // The x30 standards are observed at 3 Å: too coarse for the 1.5 Å level (3 > 1.3 × 1.5), in the 3 Å one.
    const mixed = toyLibrary().map((s) => (s.typeCode === 30 ? { ...s, resolutionFwhm: 3 } : s))
    const lib = prepareMatchLibrary(mixed, { versionId: 8, versionName: 'toy-mixed', grid: DEFAULT_GRID, resolutions: [1.5, 3] })
    expect(lib.typeCodesAt(1.5)).toEqual([10, 15, 20, 25])
    expect(lib.typeCodesAt(3)).toEqual([10, 15, 20, 25, 30])
    for (const fwhm of lib.resolutions) expect(lib.level(fwhm).typeCodes).toEqual(lib.typeCodesAt(fwhm))
  })
})

describe('standardFlux', () => {
  it('gives a standard smoothed to a level exactly as the prepared level holds it, and null where it does not serve', () => {
    const inputs = toyLibrary().map((s) => (s.typeCode === 30 ? { ...s, resolutionFwhm: 3 } : s))
    const alone = prepareMatchLibrary(inputs, { versionId: 9, versionName: 'toy-alone', grid: DEFAULT_GRID, resolutions: [1.5, 3] })
    const whole = prepareMatchLibrary(inputs, { versionId: 10, versionName: 'toy-whole', grid: DEFAULT_GRID, resolutions: [1.5, 3] })
    const level = whole.level(3)
    for (const k of [0, 5, 9]) {
      const r = level.rows.indexOf(k)
      // Standard 9 is at its own 3 Å, the others smoothed from 1.5 Å to 3 Å.
      expect(Array.from(alone.standardFlux(3, k)!)).toEqual(Array.from(level.flux.subarray(r * whole.pixels, (r + 1) * whole.pixels)))
    }
    expect(alone.standardFlux(1.5, 9)).toBeNull()
    expect(() => alone.standardFlux(2, 0)).toThrow(/not a level/)
  })
})

describe('hasBalmerEmission', () => {
  const line = (id: string, ew: number, depth: number): LineMeasurement => ({
    id,
    name: id,
    wavelength: 4340.47,
    family: 'balmer',
    measured: true,
    equivalentWidth: ew,
    equivalentWidthError: 0.2,
    depth,
    depthError: 0.01,
    fwhm: 5,
    centroid: 4340,
    continuum: { blue: 1, red: 1 },
    snr: 80,
  })

  it('sees emission in Hγ of an A star', () => {
    expect(hasBalmerEmission([line('h-gamma', -3, -0.3)], 22)).toBe(true)
  })

  it('does not read the negative side-band Hγ width of a K giant as emission', () => {
    // Lick-style Hγ widths of K giants are about −6 Å without any emission (common practice).
    expect(hasBalmerEmission([line('h-gamma', -6.5, -0.1)], 51)).toBe(false)
  })

  it('still sees Hα emission in an M dwarf', () => {
    expect(hasBalmerEmission([line('h-alpha', -4, -0.6)], 64)).toBe(true)
  })

  it('ignores absorption and weak or noisy negatives', () => {
    expect(hasBalmerEmission([line('h-beta', 8, 0.5)], 20)).toBe(false)
    expect(hasBalmerEmission([line('h-beta', -0.5, -0.02)], 20)).toBe(false)
    expect(hasBalmerEmission(undefined, 20)).toBe(false)
  })
})

describe('matchSpectrum', () => {
  const standard = (id: number) => Float64Array.from(toyLibrary().find((s) => s.id === id)!.rectified)

  it('finds a standard of the library itself, with vote shares that sum to one and its parameters', () => {
    const r = matchSpectrum(toy, { rectified: standard(6), snr: 100, fwhm: 1.5 })
    expect(r.bestStandardId).toBe(6)
    expect(r.typeCode).toBe(20)
    expect(r.luminosityClass).toBe('V')
    expect(r.candidates).toHaveLength(5)
    expect(r.candidates[0]!.chi2).toBeCloseTo(0, 6)
    const total = r.probabilities.reduce((s, p) => s + p.p, 0)
    expect(total).toBeGreaterThan(0.999)
    expect(total).toBeLessThan(1.001)
    expect(r.libraryVersion).toEqual({ id: 7, name: 'toy' })
    expect(r.votes[0]!.criterion).toBe('neighbours')
    // An exact copy takes the whole vote, so the parameters are its own (toy values above).
    expect(r.parameters.teff!.value).toBe(20000 - 300 * 20)
    expect(r.parameters.logg!.value).toBeCloseTo(4.2, 6)
    expect(r.classNote).toBeNull()
  })

  it('leaves out the standards it is told to (leave one out)', () => {
    const r = matchSpectrum(toy, { rectified: standard(6), snr: 100, fwhm: 1.5 }, { exclude: new Set([6]) })
    expect(r.bestStandardId).not.toBe(6)
    expect(r.candidates.map((c) => c.standardId)).not.toContain(6)
  })

  it('puts a spectrum halfway between two types five subtypes apart between them (the grid is sparse there)', () => {
    const a = standard(6) // type 20, V
    const b = standard(8) // type 25, V
    const mid = a.map((v, i) => (v + b[i]!) / 2)
    const r = matchSpectrum(toy, { rectified: mid, snr: 200, fwhm: 1.5 })
    expect(r.typeCode).toBeGreaterThan(20)
    expect(r.typeCode).toBeLessThan(25)
    expect(r.luminosityClass).toBe('V')
  })

  it('flags low S/N, a minimum at the end of the grid, and a bad fit', () => {
    const hot = standard(2)
    const r = matchSpectrum(toy, { rectified: hot, snr: 8, fwhm: 1.5 })
    expect(r.flags).toContain('low-snr')
    expect(r.flags).toContain('outside-grid')
    const flat = new Float64Array(DEFAULT_GRID.length)
    const wl = gridWavelengths(DEFAULT_GRID)
    for (let i = 0; i < flat.length; i++) flat[i] = 1 - 0.6 * Math.exp(-0.5 * ((wl[i]! - 4200) / 30) ** 2)
    const odd = matchSpectrum(toy, { rectified: flat, snr: 300, fwhm: 1.5 })
    expect(odd.residual.rms, JSON.stringify(odd.residual)).toBeGreaterThan(odd.residual.typical!)
    expect(odd.flags).toContain('poor-fit')
  })

  it('flags Balmer emission and appends "e" to the type', () => {
    const r = matchSpectrum(toy, {
      rectified: standard(6),
      snr: 100,
      fwhm: 1.5,
      lines: [
        {
          id: 'h-beta',
          name: 'Hβ',
          wavelength: 4861.33,
          family: 'balmer',
          measured: true,
          equivalentWidth: -4,
          equivalentWidthError: 0.2,
          depth: -0.5,
          depthError: 0.01,
          fwhm: 5,
          centroid: 4861,
          continuum: { blue: 1, red: 1 },
          snr: 100,
        },
      ],
    })
    expect(r.flags).toContain('emission')
    expect(r.spectralType.endsWith('e')).toBe(true)
  })

  it('refuses a spectrum on another grid and one without usable pixels', () => {
    expect(() => matchSpectrum(toy, { rectified: new Float64Array(10), snr: 50 })).toThrow('spectrum has 10 pixels, the library grid 6376')
    const empty = new Float64Array(DEFAULT_GRID.length).fill(Number.NaN)
    expect(() => matchSpectrum(toy, { rectified: empty, snr: 50 })).toThrow('only 0 usable pixels in the classification region 3850–5000 Å')
  })

  it('refuses an empty library and a standard on another grid', () => {
    expect(() => prepareMatchLibrary([], { versionId: 1, versionName: 'x', grid: DEFAULT_GRID })).toThrow('a library needs at least one standard')
    const bad = { ...toyLibrary()[0]!, rectified: new Float32Array(5) }
    expect(() => prepareMatchLibrary([bad], { versionId: 1, versionName: 'x', grid: makeLogGrid(3700, 7000, 1e-4) })).toThrow('has 5 pixels, the grid 6376')
  })
})

describe('depthScaledChiSquareSelected', () => {
  // Five rows: one batch of four and one left over; row 2 has a gap (NaN).
  const pixels = 6
  const rows = new Float32Array([1, 0.5, 0.8, 1, 0.2, 0.9, 0.9, 0.6, 0.7, 1, 0.3, 1, 1, Number.NaN, 0.8, 1, 0.2, 0.9, 0.8, 0.8, 0.8, 0.9, 0.9, 0.9, 1, 0.4, 0.9, 0.95, 0.25, 0.85])
  const f = Float64Array.from([1, 0.5, 0.8, 1, 0.2, 0.9], (v) => 0.05 + 0.95 * v)
  const w = new Float64Array([1, 2, 1, 0, 1, 1])

  it('gives the same χ², scale and pixel count as every row computed one at a time', () => {
    const all = { chi2: new Float64Array(5), scale: new Float64Array(5), used: new Float64Array(5) }
    depthScaledChiSquareRows(f, w, rows, pixels, 0, pixels, all.chi2, all.scale, all.used)
    for (let r = 0; r < 5; r++) {
      const one = { chi2: new Float64Array(1), scale: new Float64Array(1), used: new Float64Array(1) }
      depthScaledChiSquareRows(f, w, rows.subarray(r * pixels, (r + 1) * pixels), pixels, 0, pixels, one.chi2, one.scale, one.used)
      expect(all.chi2[r]).toBe(one.chi2[0])
      expect(all.scale[r]).toBe(one.scale[0])
      expect(all.used[r]).toBe(one.used[0])
    }
    // Row 0 is the data's own template: level 0.05, depth scale 0.95, χ² 0 (worked by hand).
    expect(all.scale[0]).toBeCloseTo(0.95, 6)
    expect(all.chi2[0]).toBeCloseTo(0, 9)
    // The zero-weight pixel is left out, and the gap in row 2 as well.
    expect(all.used[0]).toBe(5)
    expect(all.used[2]).toBe(4)
  })

  it('writes only the listed rows', () => {
    const chi2 = new Float64Array(5).fill(-1)
    const scale = new Float64Array(5).fill(-1)
    const used = new Float64Array(5).fill(-1)
    depthScaledChiSquareSelected(f, w, rows, pixels, 0, pixels, new Int32Array([4, 1]), 2, chi2, scale, used)
    expect([chi2[0], chi2[2], chi2[3]]).toEqual([-1, -1, -1])
    expect(chi2[1]).toBeGreaterThan(0)
    expect(chi2[4]).toBeGreaterThan(0)
  })
})

describe('smallestFinite', () => {
  it('gives the head of a stable sort of the finite values, ties in index order', () => {
    // Reference: the built-in stable sort of every index (ECMAScript 2019 requires stability).
    let seed = 3
    const random = () => (seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648
    for (const n of [0, 1, 5, 40, 333]) {
      const values = Float64Array.from({ length: n }, () => {
        const r = random()
        return r < 0.1 ? Infinity : r < 0.15 ? Number.NaN : Math.round(r * 20) / 2
      })
      for (const count of [0, 1, 6, 48, 400]) {
        const expected = Array.from(values.keys())
          .filter((k) => Number.isFinite(values[k]!))
          .sort((a, b) => values[a]! - values[b]!)
          .slice(0, count)
        expect(Array.from(smallestFinite(values, count)), `n ${n}, count ${count}`).toEqual(expected)
      }
    }
  })
})

describe('matchSpectrum two-stage search', () => {
  it('gives the same result as the exhaustive search when only some standards are refined (ten standards, four refined)', () => {
    const inputs = toyLibrary()
    for (const id of [1, 4, 6, 9]) {
      const s = Float64Array.from(inputs.find((x) => x.id === id)!.rectified)
      const next = Float64Array.from(inputs.find((x) => x.id === Math.min(10, id + 2))!.rectified)
      const mixed = s.map((v, i) => 0.7 * v + 0.3 * next[i]!)
      const two = matchSpectrum(toy, { rectified: mixed, snr: 80, fwhm: 1.5 }, { neighbours: 2, refineCount: 4 })
      const all = matchSpectrum(toy, { rectified: mixed, snr: 80, fwhm: 1.5 }, { neighbours: 2, exhaustive: true })
      expect(two).toEqual(all)
    }
  })
})

describe('depthScaledPairChiSquare', () => {
  const t1 = new Float32Array([1, 0.5, 0.8, 1, 0.2, 0.9, 0.7, 1])
  const t2 = new Float32Array([0.9, 0.7, 0.6, 1, 0.4, 0.95, 0.5, 0.8])
  const rows = new Float32Array([...t1, ...t2])
  const w = new Float64Array(8).fill(1)

  it('recovers the mixing fraction, depth scale and level of an exact mix (worked by hand: f = 0.02 + 0.9(0.3t₁ + 0.7t₂))', () => {
    const f = Float64Array.from(t1, (v, i) => 0.02 + 0.9 * (0.3 * v + 0.7 * t2[i]!))
    const r = depthScaledPairChiSquare(f, w, rows, 8, 0, 1, 0, 8)
    expect(r.fraction).toBeCloseTo(0.7, 6)
    expect(r.scale).toBeCloseTo(0.9, 6)
    expect(r.chi2).toBeCloseTo(0, 9)
  })

  it('falls back to the nearer single template when the best mix lies outside 0 … 1', () => {
    // f = t₁ + 0.5(t₁ − t₂) is "beyond" t₁: the constrained best is x = 0.
    const f = Float64Array.from(t1, (v, i) => v + 0.5 * (v - t2[i]!))
    const r = depthScaledPairChiSquare(f, w, rows, 8, 0, 1, 0, 8)
    expect(r.fraction).toBe(0)
    expect(r.chi2).toBeGreaterThan(0)
  })

  it('reports an infinite χ² with fewer than four usable pixels', () => {
    expect(depthScaledPairChiSquare(new Float64Array(8), new Float64Array(8), rows, 8, 0, 1, 0, 8).chi2).toBe(Infinity)
  })
})

describe('smoothPairChiSquare', () => {
  it('recovers the mixing fraction of a mix with a level and depth scale that vary linearly across the range', () => {
    const n = 200
    const t1 = new Float32Array(n)
    const t2 = new Float32Array(n)
    // Lines of two kinds alternate across the range, so a depth scale linear in X cannot mimic a change of mix.
    const line = (i: number, c: number) => Math.exp(-0.5 * ((i - c) / 3) ** 2)
    for (let i = 0; i < n; i++) {
      const a = line(i, 25) + line(i, 105)
      const b = line(i, 65) + line(i, 145)
      const c = line(i, 180)
      t1[i] = 1 - 0.5 * a - 0.2 * b - 0.3 * c
      t2[i] = 1 - 0.2 * a - 0.6 * b - 0.3 * c
    }
    const rows = new Float32Array([...t1, ...t2])
    const f = new Float64Array(n)
    for (let i = 0; i < n; i++) {
      const X = (2 * i) / (n - 1) - 1
      f[i] = 0.05 + 0.02 * X + (0.9 + 0.05 * X) * (0.6 * t1[i]! + 0.4 * t2[i]!)
    }
    const r = smoothPairChiSquare(f, new Float64Array(n).fill(1), rows, n, 0, 1, 0, n)
    // The χ² is exactly quadratic in x only near the minimum, so the parabola refinement is good to ~1e-3.
    expect(r.fraction).toBeCloseTo(0.4, 2)
    expect(r.chi2).toBeLessThan(1e-6)
  })
})

describe('the MgH criterion', () => {
  it('is the mean depth of a flat-bottomed band 4750–4790 Å', () => {
    const wl = gridWavelengths(DEFAULT_GRID)
    const flux = Float64Array.from(wl, (l) => (l >= 4750 && l < 4790 ? 0.8 : 1))
    const c = CRITERIA.find((x) => x.id === 'mgh-4780')!
    expect(criterionValue(c, flux, wl)).toBeCloseTo(0.2, 12)
  })
})
