/**
 * `npm run bench:accuracy`: classification accuracy on a held-out set of made-up spectra and on
 * the real A0 V standard. The set uses its own seed and perturbations, never used while choosing
 * the matcher's settings: types drawn between grid points (linear mix of two neighbouring model
 * standards of one class), S/N 20/50/100, resolution 1.5–5 Å FWHM (the models are at 1.5 Å, so
 * nothing sharper can be made), radial velocity −300…+300 km/s, and reddening E(B−V) 0–1 with
 * CCM89 applied to the model continuum × rectified flux, so the continuum fit has to cope.
 */
import { readFileSync } from 'node:fs'
import { defaultLibrary } from '../server/jobs/worker'
import { readSpectrum } from '../server/spectra/io'
import { toSpectrum1D } from '../server/spectra/io/types'
import { runPipeline } from '../server/spectra/pipeline'
import { CLASSES, rng, syntheticSpectrum } from './synthetic'

const HELD_OUT_SEED = 0x5eed_2026
const PER_SNR = Number(process.env.ACCURACY_PER_SNR ?? 60)

const library = defaultLibrary()
const LETTERS = ['O', 'B', 'A', 'F', 'G', 'K', 'M']

interface Case { truthType: number; truthClass: string; snr: number; fwhm: number; rv: number; ebv: number }

// Observed: 4000 pixels, linear in λ, 3800–5500 Å; mixing fraction 0.15–0.85.
function makeCase(random: () => number, snr: number): { c: Case; spectrum: { wavelength: Float64Array; flux: Float64Array } } {
  const made = syntheticSpectrum(random, (r) => ({ t: 0.15 + 0.7 * r(), snr, fwhm: 1.5 + 3.5 * r(), rv: -300 + 600 * r(), ebv: r(), lo: 3800, hi: 5500, pixels: 4000 }))
  const { fwhm, rv, ebv } = made.perturbation
  return { c: { truthType: made.truthType, truthClass: made.truthClass, snr, fwhm, rv, ebv }, spectrum: made.spectrum }
}

const letterOf = (code: number) => LETTERS[Math.min(6, Math.floor(code / 10))]!
const classIndex = (code: number) => Math.round(code) - 1 // Ia=1 … V=6

function main() {
  const random = rng(HELD_OUT_SEED)
  const started = performance.now()
  const rows: { c: Case; type: number; classCode: number; cls: string; flags: string[] }[] = []
  for (const snr of [20, 50, 100]) {
    for (let k = 0; k < PER_SNR; k++) {
      const { c, spectrum } = makeCase(random, snr)
      const out = runPipeline({ spectrum, inputFwhm: c.fwhm }, library)
      const s = out.suggestion!
      rows.push({ c, type: s.typeCode, classCode: s.classCode, cls: s.luminosityClass, flags: s.flags })
    }
  }
  const classCodes: Record<string, number> = { Ia: 1, Ib: 2, II: 3, III: 4, IV: 5, V: 6 }
  console.log(`held-out set: ${rows.length} spectra (seed ${HELD_OUT_SEED.toString(16)}), ${((performance.now() - started) / 1000).toFixed(1)} s`)
  console.log('S/N    n   within ±1 subtype   exact class   within ±1 class   median |Δtype|')
  for (const snr of [20, 50, 100, 0]) {
    const sel = rows.filter((r) => (snr === 0 ? r.c.snr >= 50 : r.c.snr === snr))
    const within = sel.filter((r) => Math.abs(r.type - r.c.truthType) <= 1).length / sel.length
    const exact = sel.filter((r) => r.cls === r.c.truthClass).length / sel.length
    const within1 = sel.filter((r) => Math.abs(r.classCode - classCodes[r.c.truthClass]!) <= 1).length / sel.length
    const d = sel.map((r) => Math.abs(r.type - r.c.truthType)).sort((a, b) => a - b)
    const label = snr === 0 ? '≥50' : String(snr)
    console.log(`${label.padEnd(5)} ${String(sel.length).padStart(3)}   ${(100 * within).toFixed(1).padStart(10)} %   ${(100 * exact).toFixed(1).padStart(9)} %   ${(100 * within1).toFixed(1).padStart(11)} %   ${d[d.length >> 1]!.toFixed(2).padStart(8)}`)
  }
  console.log('\nletter confusion (rows: truth, columns: suggested)')
  console.log('     ' + LETTERS.map((l) => l.padStart(5)).join(''))
  for (const lt of LETTERS) console.log(lt.padEnd(5) + LETTERS.map((ls) => String(rows.filter((r) => letterOf(r.c.truthType) === lt && letterOf(r.type) === ls).length).padStart(5)).join(''))
  console.log('\nclass confusion (rows: truth, columns: suggested; intermediate classes counted at the brighter class)')
  console.log('     ' + CLASSES.map((l) => l.padStart(5)).join(''))
  for (const ct of CLASSES) console.log(ct.padEnd(5) + CLASSES.map((_, ci) => String(rows.filter((r) => r.c.truthClass === ct && classIndex(Math.floor(r.classCode)) === ci).length).padStart(5)).join(''))
  const flagged = new Map<string, number>()
  for (const r of rows) for (const f of r.flags) flagged.set(f, (flagged.get(f) ?? 0) + 1)
  console.log('\nflags raised: ' + ([...flagged].map(([f, n]) => `${f} ${n}`).join(', ') || 'none'))

  const read = readSpectrum(readFileSync(new URL('../tests/fixtures/real/alpha_lyr_stis_010.fits', import.meta.url)), 'alpha_lyr_stis_010.fits')
  if (!read.ok) throw new Error(read.message)
  const real = runPipeline({ spectrum: toSpectrum1D(read.spectrum), inputFwhm: 5.5 }, library).suggestion!
  console.log(`\nreal A0 V standard (HST CALSPEC): ${real.spectralType} ± ${real.uncertainty.subtypes} subtypes, ± ${real.uncertainty.classes} classes; flags [${real.flags.join(', ')}]; nearest ${real.candidates.map((c) => c.spectralType).join(', ')}`)
  console.log(`total ${((performance.now() - started) / 1000).toFixed(1)} s`)
}

main()
