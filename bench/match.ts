/**
 * Matching throughput: spectra per second on one core against the full model library and against
 * it doubled (422 standards), for 4000-pixel input spectra prepared by analyseSpectrum; and the
 * whole pipeline (analyse, coarse match, analyse at rest, final match) per spectrum. Rates are per
 * second of CPU time, so they stay comparable when the machine is shared.
 * Run directly (`npx tsx bench/match.ts`) or through `npm run bench`.
 */
import { DEFAULT_GRID, gridWavelength } from '../shared/grid'
import { defaultLibrary, modelLibraryAt, DEFAULT_MODEL_DIR } from '../server/jobs/worker'
import { analyseSpectrum } from '../server/spectra/analyse'
import { matchSpectrum, modelMatchInputs, prepareMatchLibrary } from '../server/spectra/match'
import { runPipeline } from '../server/spectra/pipeline'
import { rng } from './synthetic'

/** A 4000-pixel linear-dispersion spectrum 3800–5600 Å from a model standard, S/N 80, sloped continuum. */
function benchSpectrum(row: number, seed: number) {
  const lib = modelLibraryAt(DEFAULT_MODEL_DIR)
  const s = lib.standards[row]!.rectified
  const random = rng(seed)
  const n = 4000
  const wavelength = new Float64Array(n)
  const flux = new Float64Array(n)
  for (let i = 0; i < n; i++) {
    const wl = 3800 + (1800 * i) / (n - 1)
    wavelength[i] = wl
    const x = Math.log(wl / DEFAULT_GRID.start) / DEFAULT_GRID.step
    const j = Math.min(DEFAULT_GRID.length - 2, Math.floor(x))
    const r = s[j]! + (s[j + 1]! - s[j]!) * (x - j)
    const gauss = Math.sqrt(-2 * Math.log(random() + 1e-12)) * Math.cos(2 * Math.PI * random())
    flux[i] = r * (1 + 0.0002 * (wl - 4500)) * (1 + gauss / 80)
  }
  return { wavelength, flux }
}

/**
 * Runs per second of CPU time of this process (user + system): on a machine shared with other
 * work, wall-clock rates fall with the load while CPU-time rates stay near the per-core figure.
 */
function perSecond(run: (k: number) => void, minMs = 1500): number {
  for (let k = 0; k < 5; k++) run(k)
  let count = 0
  const start = process.cpuUsage()
  const wallStart = performance.now()
  let cpuMs = 0
  while (cpuMs < minMs && performance.now() - wallStart < 20 * minMs) {
    run(count++)
    const used = process.cpuUsage(start)
    cpuMs = (used.user + used.system) / 1000
  }
  return (count * 1000) / cpuMs
}

/** Spectra per second per core for matching (211 and 422 standards) and for the whole pipeline. */
export async function runMatchBench(): Promise<Record<string, number>> {
  const t0 = performance.now()
  const library = defaultLibrary()
  const prepareSeconds = (performance.now() - t0) / 1000
  const models = modelLibraryAt(DEFAULT_MODEL_DIR)
  const once = modelMatchInputs(models)
  const doubled = prepareMatchLibrary([...once, ...once.map((s) => ({ ...s, id: s.id + once.length }))], { versionId: -1, versionName: 'doubled', grid: DEFAULT_GRID })
  const rows = [20, 60, 100, 140, 180, 200]
  const spectra = rows.map((row, k) => benchSpectrum(row, 1000 + k))
  const prepared = spectra.map((s) => {
    const a = analyseSpectrum(s, { inputFwhm: 2 })
    return { rectified: a.prepared.rectified, mask: a.prepared.mask, snr: a.snr, fwhm: 2, lines: a.lines }
  })
  const pick = <T>(list: T[], k: number) => list[k % list.length]!
  void gridWavelength
  return {
    [`match.prepareLibrary(${library.standards.length} standards × ${library.levels.length} levels, s)`]: Math.round(prepareSeconds * 100) / 100,
    [`match.spectraPerSecond(${library.standards.length} standards)`]: Math.round(perSecond((k) => matchSpectrum(library, pick(prepared, k)))),
    [`match.spectraPerSecond(${doubled.standards.length} standards)`]: Math.round(perSecond((k) => matchSpectrum(doubled, pick(prepared, k)))),
    [`match.spectraPerSecond(${doubled.standards.length} standards, resolution unknown: all levels)`]: Math.round(perSecond((k) => matchSpectrum(doubled, { ...pick(prepared, k), fwhm: undefined }))),
    'pipeline.spectraPerSecond(analyse + match + analyse at rest + match)': Math.round(10 * perSecond((k) => runPipeline({ spectrum: pick(spectra, k), inputFwhm: 2 }, library), 3000)) / 10,
  }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  for (const [k, v] of Object.entries(await runMatchBench())) console.log(`${k.padEnd(90)} ${v}`)
}
