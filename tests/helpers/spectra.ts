import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { zipSync } from 'fflate'

export const REAL_A0V = join(process.cwd(), 'tests', 'fixtures', 'real', 'alpha_lyr_stis_010.fits')
export const realA0V = () => readFileSync(REAL_A0V)

/** A made-up text spectrum (Å, flux, error) with a few Gaussian absorption lines; `seed` varies the bytes. */
export function syntheticTextSpectrum(seed: number, options: { from?: number; to?: number; pixels?: number } = {}): Buffer {
  const from = options.from ?? 3800
  const to = options.to ?? 5200
  const n = options.pixels ?? 2000
  const lines = [3933.66, 4101.74, 4340.47, 4861.33]
  const rows = ['# wavelength flux error', '# made up for tests']
  for (let i = 0; i < n; i++) {
    const wl = from + ((to - from) * i) / (n - 1)
    let f = 1 + 0.0001 * (wl - 4500)
    for (const c of lines) f -= 0.4 * Math.exp(-0.5 * ((wl - c) / 4) ** 2)
    f *= 1 + 0.01 * Math.sin(i * 12.9898 + seed * 78.233)
    rows.push(`${wl.toFixed(4)} ${f.toFixed(6)} 0.01`)
  }
  return Buffer.from(rows.join('\n') + '\n')
}

export function zipOf(files: Record<string, Uint8Array>): Buffer {
  return Buffer.from(zipSync(files))
}
