import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join, resolve } from 'node:path'
import { afterAll, describe, expect, it } from 'vitest'
import { DEFAULT_GRID } from '../../../shared/grid'
import { ATOMIC_LINES } from '../../../templates/generator/atomic'
import { buildLibrary } from '../../../templates/generator/build'
import { loadModelLibrary, type ModelLibrary } from '../../../templates/generator/library'
import { plannedStandards } from '../../../templates/generator/standards'
import { windowEquivalentWidth } from './measure'

const COMMITTED = resolve(__dirname, '../../../templates/model-v1')
const library: ModelLibrary = loadModelLibrary(COMMITTED)

function spectrum(id: string): Float32Array {
  const s = library.standards.find((x) => x.entry.id === id)
  if (!s) throw new Error(`no standard ${id}`)
  return s.rectified
}
const ew = (id: string, lo: number, hi: number): number => windowEquivalentWidth(spectrum(id), library.grid, lo, hi)

describe('loadModelLibrary', () => {
  it('loads every planned standard on the default grid, checksums verified', () => {
    expect(library.standards.map((s) => s.entry.id)).toEqual(plannedStandards().map((s) => s.id))
    expect(library.grid).toEqual({ start: DEFAULT_GRID.start, step: DEFAULT_GRID.step, length: DEFAULT_GRID.length })
    expect(library.standards[0]!.continuum.length).toBe(DEFAULT_GRID.length)
  })
  it('holds rectified fluxes between 0 and 1 and positive continua', () => {
    for (const s of library.standards) {
      let lo = Infinity
      let hi = -Infinity
      for (const v of s.rectified) {
        lo = Math.min(lo, v)
        hi = Math.max(hi, v)
      }
      expect(lo).toBeGreaterThan(0)
      expect(hi).toBeLessThanOrEqual(1 + 1e-6)
      expect(s.continuum.every((v) => v > 0 && Number.isFinite(v))).toBe(true)
    }
  })
  it('keeps the committed output under 10 MB', () => {
    const bytes = ['rectified.f32', 'continuum.f32', 'manifest.json'].reduce((s, f) => s + readFileSync(join(COMMITTED, f)).length, 0)
    expect(bytes).toBeLessThan(10e6)
  })
  it('refuses a file whose bytes do not match the manifest digest', () => {
    const dir = mkdtempSync(join(tmpdir(), 'model-lib-'))
    try {
      buildLibrary(dir, { only: ['A0-V'] })
      const manifestPath = join(dir, 'manifest.json')
      const m = JSON.parse(readFileSync(manifestPath, 'utf8'))
      m.rectified.sha256 = '0'.repeat(64)
      writeFileSync(manifestPath, JSON.stringify(m))
      expect(() => loadModelLibrary(dir)).toThrow('rectified.f32 does not match its SHA-256 in the manifest')
    } finally {
      rmSync(dir, { recursive: true, force: true })
    }
  })
})

describe('buildLibrary', () => {
  const dirs: string[] = []
  afterAll(() => dirs.forEach((d) => rmSync(d, { recursive: true, force: true })))
  const only = ['O7-V', 'A0-Ia', 'G2-V', 'M3-III']
  it('writes identical bytes on two runs, matching the committed checksums', () => {
    const a = mkdtempSync(join(tmpdir(), 'model-lib-'))
    const b = mkdtempSync(join(tmpdir(), 'model-lib-'))
    dirs.push(a, b)
    const ma = buildLibrary(a, { only })
    buildLibrary(b, { only })
    for (const f of ['rectified.f32', 'continuum.f32', 'manifest.json']) {
      expect(readFileSync(join(a, f)).equals(readFileSync(join(b, f)))).toBe(true)
    }
    for (const s of ma.standards) {
      const committed = library.manifest.standards.find((c) => c.id === s.id)!
      expect(s.checksum).toBe(committed.checksum)
      expect(s.continuumChecksum).toBe(committed.continuumChecksum)
    }
  }, 30_000)
})

// Trends below are facts of the trade (common practice), measured with plain window integrals
// on the rectified models; each window is stated beside its line.
describe('the model library follows the MK trends', () => {
  it('shows He II 4686 in O stars, fading by B1 and gone from B2 on (window 4681–4691 Å; common practice)', () => {
    for (const id of ['O5-V', 'O7-V', 'O9-V', 'O5-Ia', 'O9-III']) expect(ew(id, 4681, 4691)).toBeGreaterThan(0.4)
    expect(ew('B1-V', 4681, 4691)).toBeLessThan(0.25 * ew('O9-V', 4681, 4691))
    for (const id of ['B2-V', 'B5-V', 'A0-V', 'B1-Ia', 'B2-Ia', 'F0-V', 'G2-V']) expect(ew(id, 4681, 4691)).toBeLessThan(0.05)
  })
  it('makes He I 4471 strongest near B2 among dwarfs (window 4466–4477 Å; common practice)', () => {
    const types = ['O5', 'O7', 'O9', 'B0', 'B1', 'B2', 'B3', 'B5', 'B7', 'B8', 'B9', 'A0']
    const widths = types.map((t) => ew(`${t}-V`, 4466, 4477))
    const best = types[widths.indexOf(Math.max(...widths))]!
    expect(['B1', 'B2', 'B3']).toContain(best)
  })
  it('makes hydrogen strongest near A0–A2 among dwarfs (Hγ + Hδ, windows ±30 Å; common practice)', () => {
    const types = ['B5', 'B7', 'B8', 'B9', 'A0', 'A1', 'A2', 'A3', 'A5', 'A7', 'F0', 'F5', 'G0']
    const widths = types.map((t) => ew(`${t}-V`, 4310, 4370) + ew(`${t}-V`, 4072, 4132))
    const best = types[widths.indexOf(Math.max(...widths))]!
    expect(['B9', 'A0', 'A1', 'A2', 'A3']).toContain(best)
  })
  it('strengthens Ca II K through F and G (window 3925–3942 Å; common practice)', () => {
    const seq = ['F0', 'F5', 'G0', 'G5', 'K0'].map((t) => ew(`${t}-V`, 3925, 3942))
    for (let i = 1; i < seq.length; i++) expect(seq[i]!).toBeGreaterThan(seq[i - 1]!)
  })
  it('brings in TiO in late K and strengthens it through M (band 6655–6700 Å; common practice)', () => {
    const tio = (id: string): number => ew(id, 6655, 6700)
    expect(tio('K0-V')).toBeLessThan(0.1)
    expect(tio('K5-V')).toBeGreaterThan(tio('K0-V'))
    const seq = ['K5', 'M0', 'M1', 'M2', 'M3', 'M4', 'M5'].map((t) => tio(`${t}-V`))
    for (let i = 1; i < seq.length; i++) expect(seq[i]!).toBeGreaterThan(seq[i - 1]!)
    expect(tio('M2-V')).toBeGreaterThan(5)
  })
  it('makes dwarf Balmer lines broader than supergiant ones at a fixed B or A type (Hβ, window 4781–4941 Å; common practice)', () => {
    for (const t of ['B2', 'B5', 'A0', 'A5']) expect(ew(`${t}-V`, 4781, 4941)).toBeGreaterThan(1.5 * ew(`${t}-Ia`, 4781, 4941))
  })
})

describe('ATOMIC_LINES', () => {
  it('names a source for every line and includes a few dozen Fe I lines 3850–5000 Å', () => {
    expect(ATOMIC_LINES.every((l) => l.source.length > 0)).toBe(true)
    const fe = ATOMIC_LINES.filter((l) => l.element === 'Fe' && l.stage === 0 && l.wavelength >= 3850 && l.wavelength <= 5000)
    expect(fe.length).toBeGreaterThanOrEqual(30)
  })
})
