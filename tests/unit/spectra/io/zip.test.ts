import { describe, expect, it } from 'vitest'
import { gzipSync, zipSync } from 'fflate'
import { gunzipBounded, unpackZip } from '../../../../server/spectra/io/zip'
import { readSpectrum } from '../../../../server/spectra/io'

const enc = new TextEncoder()
const text = (s: string) => enc.encode(s)

/** Finds the central-directory entry of `name` and overwrites its declared uncompressed size. */
function lieAboutSize(zip: Uint8Array, size: number): Uint8Array {
  const out = zip.slice()
  for (let at = 0; at < out.length - 4; at++) {
    if (out[at] === 0x50 && out[at + 1] === 0x4b && out[at + 2] === 1 && out[at + 3] === 2) {
      new DataView(out.buffer).setUint32(at + 24, size, true)
    }
  }
  return out
}

describe('unpackZip', () => {
  it('returns the files and skips directories, __MACOSX and dotfiles', () => {
    const zip = zipSync({ 'a.txt': text('4000 1\n'), 'dir/': new Uint8Array(0), 'dir/b.fits': text('SIMPLE  ='), '__MACOSX/dir/._b.fits': text('x'), '.DS_Store': text('x') })
    const r = unpackZip(zip)
    if (!r.ok) throw new Error(r.message)
    expect(r.entries.map((e) => e.name)).toEqual(['a.txt', 'dir/b.fits'])
    expect(new TextDecoder().decode(r.entries[0]!.bytes)).toBe('4000 1\n')
    expect(r.skipped.sort()).toEqual(['.DS_Store', '__MACOSX/dir/._b.fits', 'dir/'])
  })
  it('refuses more files than maxEntries', () => {
    const files: Record<string, Uint8Array> = {}
    for (let i = 0; i < 6; i++) files[`s${i}.txt`] = text('1 2\n')
    expect(unpackZip(zipSync(files), { maxEntries: 5 })).toEqual({ ok: false, code: 'ZIP_TOO_MANY_ENTRIES', message: 'the archive holds more than 5 files' })
  })
  it('refuses on the declared sizes before inflating anything', () => {
    const zip = zipSync({ 'a.txt': new Uint8Array(5000), 'b.txt': new Uint8Array(5000) })
    expect(unpackZip(zip, { maxTotalBytes: 8000 })).toEqual({ ok: false, code: 'ZIP_TOO_LARGE', message: 'the files add up to more than 8000 bytes uncompressed' })
    expect(unpackZip(zip, { maxEntryBytes: 4000 }).ok).toBe(false)
  })
  it('stops inflating an entry that lies about its size (a zip bomb)', () => {
    const bomb = lieAboutSize(zipSync({ 'bomb.txt': new Uint8Array(20_000_000) }, { level: 9 }), 100)
    expect(bomb.length).toBeLessThan(100_000)
    const r = unpackZip(bomb, { maxEntryBytes: 1_000_000 })
    expect(r).toEqual({ ok: false, code: 'ZIP_TOO_LARGE', message: 'bomb.txt inflates past the size limit (1000000 bytes)' })
  })
  it('refuses bytes that are not a zip archive and a truncated archive', () => {
    expect(unpackZip(text('hello')).ok).toBe(false)
    const zip = zipSync({ 'a.txt': new Uint8Array(3000).fill(65) }, { level: 0 })
    const r = unpackZip(zip.slice(0, zip.length - 30))
    expect(r.ok ? 'ok' : r.code).toBe('ZIP_MALFORMED')
  })
})

describe('gunzipBounded', () => {
  it('decompresses within the limit and refuses past it', () => {
    const gz = gzipSync(new Uint8Array(100_000).fill(7))
    expect(gunzipBounded(gz, 200_000)!.length).toBe(100_000)
    expect(gunzipBounded(gz, 50_000)).toBeUndefined()
  })
  it('lets readSpectrum read a gzip-compressed spectrum within maxBytes', () => {
    const body = Array.from({ length: 600 }, (_, i) => `${3800 + 2 * i} 1`).join('\n')
    const r = readSpectrum(gzipSync(text(body)), 'spec.txt.gz')
    expect(r.ok).toBe(true)
    const small = readSpectrum(gzipSync(text(body)), 'spec.txt.gz', { maxBytes: 2000 })
    expect(small).toEqual({ ok: false, code: 'FILE_TOO_LARGE', message: 'spec.txt.gz decompresses to more than 2000 bytes, the limit' })
  })
})
