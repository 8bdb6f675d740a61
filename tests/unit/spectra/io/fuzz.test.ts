import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { REFUSAL_CODES, readSpectrum, type ReadResult } from '../../../../server/spectra/io'
import { unpackZip } from '../../../../server/spectra/io/zip'
import { zipSync } from 'fflate'
import { seededRandom as prng } from '../../../../shared/random'

const FIX = join(__dirname, '../../../fixtures')
const SEEDS = [
  'fits/image_awav_cdelt_f32.fits',
  'fits/image_int16_bscale_blank.fits',
  'fits/image_multispec_3d.fits',
  'fits/table_rows_nm_ivar.fits',
  'fits/table_array_row_vacuum.fits',
  'fits/mef_frame_table_sky.fits',
  'fits/image_coeff_log10_vacuum.fits',
  'text/header_nm_error.csv',
  'text/tab_ivar_vacuum.tsv',
].map((p) => ({ name: p, bytes: new Uint8Array(readFileSync(join(FIX, p))) }))
const LIMITS = { maxPixels: 20_000, maxBytes: 200_000 }
const codes = new Set<string>(REFUSAL_CODES)

/** Every result must be a well-formed spectrum or a known refusal; never an exception. */
function check(r: ReadResult): void {
  if (!r.ok) {
    expect(codes.has(r.code)).toBe(true)
    expect(r.message).not.toMatch(/unexpected error/)
    return
  }
  const { wavelengthAir: w, flux, error, mask } = r.spectrum
  expect(w.length).toBeLessThanOrEqual(LIMITS.maxPixels)
  expect(flux.length).toBe(w.length)
  if (error) expect(error.length).toBe(w.length)
  if (mask) expect(mask.length).toBe(w.length)
  for (let i = 1; i < w.length; i++) if (!(w[i]! > w[i - 1]!)) throw new Error(`not ascending at ${i}`)
}

function timed(bytes: Uint8Array, name: string): ReadResult {
  const t0 = performance.now()
  const r = readSpectrum(bytes, name, LIMITS)
  const ms = performance.now() - t0
  if (ms > 250) throw new Error(`${name} took ${ms.toFixed(0)} ms`)
  return r
}

describe('readSpectrum under fuzzing', () => {
  it('refuses or reads 900 truncated files without throwing', () => {
    const rnd = prng(1)
    for (let k = 0; k < 900; k++) {
      const seed = SEEDS[k % SEEDS.length]!
      check(timed(seed.bytes.subarray(0, Math.floor(rnd() * seed.bytes.length)), seed.name))
    }
  })
  it('refuses or reads 1500 bit-flipped files without throwing', () => {
    const rnd = prng(2)
    for (let k = 0; k < 1500; k++) {
      const seed = SEEDS[k % SEEDS.length]!
      const bytes = seed.bytes.slice()
      // Half the flips land in the first header block, where they do the most damage.
      const flips = 1 + Math.floor(rnd() * 8)
      for (let f = 0; f < flips; f++) {
        const at = Math.floor(rnd() * (rnd() < 0.5 ? Math.min(2880, bytes.length) : bytes.length))
        bytes[at] = bytes[at]! ^ (1 << Math.floor(rnd() * 8))
      }
      check(timed(bytes, seed.name))
    }
  })
  it('refuses 300 random byte strings, with and without a FITS first card', () => {
    const rnd = prng(3)
    for (let k = 0; k < 300; k++) {
      const bytes = new Uint8Array(Math.floor(rnd() * 12_000))
      for (let i = 0; i < bytes.length; i++) bytes[i] = Math.floor(rnd() * 256)
      if (k % 2 && bytes.length > 30) bytes.set(new TextEncoder().encode('SIMPLE  =                    T'), 0)
      check(timed(bytes, 'random.bin'))
    }
  })
  it('refuses 400 headers with absurd sizes quickly', () => {
    const rnd = prng(4)
    const image = SEEDS[0]!.bytes
    const keys = ['NAXIS1  =', 'NAXIS   =', 'BITPIX  =', 'CDELT1  =', 'CRVAL1  =']
    const values = ['999999999999999999', '-1', '0', '1E308', '2147483648', '7', 'NaN', "'abc'", '3.5']
    const text = new TextDecoder('latin1').decode(image.subarray(0, 2880))
    for (let k = 0; k < 400; k++) {
      const key = keys[Math.floor(rnd() * keys.length)]!
      const at = text.indexOf(key)
      const bytes = image.slice()
      const value = values[Math.floor(rnd() * values.length)]!.padStart(20) + ' '.repeat(51)
      bytes.set(new TextEncoder().encode(value.slice(0, 71)), at + 9)
      check(timed(bytes, 'absurd.fits'))
    }
  })
  it('refuses or reads 400 text files salted with junk', () => {
    const rnd = prng(5)
    const junk = ['abc', ',,,', '\t', '1e', '--', '#', '1.0D+', ';', '\u0000', 'NaN', '1,5', '"', '']
    for (let k = 0; k < 400; k++) {
      const lines = Array.from({ length: 150 + Math.floor(rnd() * 300) }, (_, i) => `${3800 + 3 * i} ${1 + rnd()} 0.01`)
      const salt = Math.floor(rnd() * 5)
      for (let s = 0; s < salt; s++) {
        const li = Math.floor(rnd() * lines.length)
        const line = lines[li]!
        const pos = Math.floor(rnd() * line.length)
        lines[li] = line.slice(0, pos) + junk[Math.floor(rnd() * junk.length)]! + line.slice(pos)
      }
      check(timed(new TextEncoder().encode(lines.join(rnd() < 0.5 ? '\n' : '\r\n')), 'junk.txt'))
    }
  })
})

describe('unpackZip under fuzzing', () => {
  it('refuses or unpacks 300 damaged archives without throwing', () => {
    const rnd = prng(6)
    const zip = zipSync({ 'a.txt': new Uint8Array(4000).fill(48), 'b/c.fits': SEEDS[0]!.bytes })
    for (let k = 0; k < 300; k++) {
      const bytes = rnd() < 0.3 ? zip.slice(0, Math.floor(rnd() * zip.length)) : zip.slice()
      for (let f = 0; f < 4; f++) {
        const at = Math.floor(rnd() * bytes.length)
        bytes[at] = bytes[at]! ^ (1 << Math.floor(rnd() * 8))
      }
      const r = unpackZip(bytes, { maxTotalBytes: 1_000_000, maxEntryBytes: 500_000 })
      if (r.ok) for (const e of r.entries) expect(e.bytes.length).toBeLessThanOrEqual(500_000)
    }
  })
})
