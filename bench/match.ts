/**
 * Classification throughput on one core against the default library (the shipped observed
 * standards) and against it doubled, for 4000-pixel input spectra 3800–5600 Å: preparation
 * without line measurements plus matching ("classification"), matching alone, and the whole
 * pipeline (with the velocity, every line and the Voigt fits), with the resolution given and not.
 * Rates are per second of CPU time, so they stay comparable when the machine is shared.
 * Run directly (`npx tsx bench/match.ts`) or through `npm run bench`.
 */
import { DEFAULT_GRID, LATE_TYPE_REGION } from '../shared/grid'
import { defaultLibrary, observedLibraryAt, DEFAULT_OBSERVED_DIR } from '../server/spectra/match/load'
import { analyseSpectrum } from '../server/spectra/analyse'
import { matchSpectrum, prepareMatchLibrary } from '../server/spectra/match'
import { runPipeline } from '../server/spectra/pipeline'
import { rng } from './synthetic'

/** A 4000-pixel linear-dispersion spectrum 3800–5600 Å from a library star at 2.5 Å, S/N 80. */
function benchSpectrum(row: number, seed: number) {
  const s = observedLibraryAt(DEFAULT_OBSERVED_DIR).library.standards[row]!.flux
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
    flux[i] = r * (1 + gauss / 80)
  }
  return { wavelength, flux }
}

/** Library rows the benchmark spectra are made from; each runs once before any rate is timed. */
const BENCH_ROWS = [10, 60, 110, 160, 210, 260, 310]

/**
 * Runs per second of CPU time of this process (user + system): on a machine shared with other
 * work, wall-clock rates fall with the load while CPU-time rates stay near the per-core figure.
 */
function perSecond(run: (k: number) => void, minMs = 1500): number {
  for (let k = 0; k < BENCH_ROWS.length; k++) run(k)
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

/** Spectra per second per core for classification, matching alone and the whole pipeline. */
export async function runMatchBench(): Promise<Record<string, number>> {
  const t0 = performance.now()
  const library = defaultLibrary()
  library.level(2.5)
  const prepareSeconds = (performance.now() - t0) / 1000
  const { inputs } = observedLibraryAt(DEFAULT_OBSERVED_DIR)
  const doubled = prepareMatchLibrary([...inputs, ...inputs.map((s) => ({ ...s, id: s.id + inputs.length, star: `${s.star} (copy)` }))], { versionId: -1, versionName: 'doubled', grid: DEFAULT_GRID })
  const spectra = BENCH_ROWS.map((row, k) => benchSpectrum(row, 1000 + k))
  const prepared = spectra.map((s) => {
    const a = analyseSpectrum(s, { inputFwhm: 2.5, snrFloor: Infinity })
    return { rectified: a.prepared.rectified, mask: a.prepared.mask, snr: a.snr, fwhm: 2.5, lines: a.lines }
  })
  const pick = <T>(list: T[], k: number) => list[k % list.length]!
  const n = library.standards.length
  // Every level once, so that the resolution-unknown figure does not include preparing them.
  for (const l of library.resolutions) library.level(l)
  return {
    [`match.prepareLibrary(${n} standards, first level, s)`]: Math.round(prepareSeconds * 100) / 100,
    [`match.classifyPerSecond(${n} standards: prepare without lines + match)`]: Math.round(
      perSecond((k) => {
        const a = analyseSpectrum(pick(spectra, k), { inputFwhm: 2.5, snrFloor: Infinity })
        matchSpectrum(library, { rectified: a.prepared.rectified, mask: a.prepared.mask, snr: a.snr, fwhm: 2.5 })
      }),
    ),
    [`match.matchPerSecond(${n} standards)`]: Math.round(perSecond((k) => matchSpectrum(library, pick(prepared, k)))),
    // Cool stars that reach past Hα are matched over the wider region (these spectra end at 5600 Å, so it holds fewer of their pixels than a real one's).
    [`match.matchPerSecond(${n} standards, over ${LATE_TYPE_REGION[0]}–${LATE_TYPE_REGION[1]} Å)`]: Math.round(
      perSecond((k) => matchSpectrum(library, pick(prepared, k), { region: LATE_TYPE_REGION })),
    ),
    [`match.matchPerSecond(${doubled.standards.length} standards)`]: Math.round(perSecond((k) => matchSpectrum(doubled, pick(prepared, k)))),
    'pipeline.spectraPerSecond(resolution given: velocity, lines, Voigt fits, match)':
      Math.round(10 * perSecond((k) => runPipeline({ spectrum: pick(spectra, k), inputFwhm: 2.5 }, library), 3000)) / 10,
    // These spectra end at 5600 Å, so each is matched against a view of the library cut to its
    // range; a view's level is prepared the first time a spectrum needs it (then kept per thread).
    [`pipeline.firstPass(${BENCH_ROWS.length} spectra, resolution estimated, new range: its levels prepared, s)`]:
      Math.round(
        (() => {
          const t = performance.now()
          spectra.forEach((spectrum) => runPipeline({ spectrum }, library))
          return (performance.now() - t) / 1000
        })() * 10,
      ) / 10,
    'pipeline.spectraPerSecond(resolution estimated)': Math.round(10 * perSecond((k) => runPipeline({ spectrum: pick(spectra, k) }, library), 3000)) / 10,
  }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  for (const [k, v] of Object.entries(await runMatchBench())) console.log(`${k.padEnd(90)} ${v}`)
}
