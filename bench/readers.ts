/**
 * Reader throughput: files per second for 4000-pixel FITS files (a float32 image and a
 * one-row-per-pixel binary table) and the real 9192-row HST table.
 * Run directly (`npx tsx bench/readers.ts`) or through `npm run bench`.
 */
import { readFileSync } from 'node:fs'
import { fileURLToPath } from 'node:url'
import { dirname, join } from 'node:path'
import { readSpectrum } from '../server/spectra/io'

const ROOT = join(dirname(fileURLToPath(import.meta.url)), '..')
const FILES: Record<string, string> = {
  'fits-image-4000px': 'tests/fixtures/fits/image_awav_cdelt_f32.fits',
  'fits-table-4000px': 'tests/fixtures/fits/table_rows_nm_ivar.fits',
  'fits-table-real-9192px': 'tests/fixtures/real/alpha_lyr_stis_010.fits',
}

function filesPerSecond(bytes: Uint8Array, name: string, seconds: number): number {
  for (let i = 0; i < 50; i++) readSpectrum(bytes, name) // warm-up
  let count = 0
  const t0 = performance.now()
  let elapsed = 0
  while (elapsed < seconds * 1000) {
    const r = readSpectrum(bytes, name)
    if (!r.ok) throw new Error(`${name}: ${r.message}`)
    count++
    elapsed = performance.now() - t0
  }
  return (count * 1000) / elapsed
}

/** Files read per second for each benchmark file (about one second each). */
export async function runReaderBench(): Promise<Record<string, number>> {
  const out: Record<string, number> = {}
  for (const [label, path] of Object.entries(FILES)) {
    out[`readers.${label}.filesPerSecond`] = Math.round(filesPerSecond(new Uint8Array(readFileSync(join(ROOT, path))), path, 1))
  }
  return out
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  runReaderBench().then((r) => {
    for (const [k, v] of Object.entries(r)) console.log(`${k.padEnd(52)} ${v}`)
  })
}
