/**
 * `npx tsx bench/tune.ts`: the tuning set for the matcher's class settings, kept apart from the
 * held-out set of bench/accuracy.ts (own seed, own perturbation draws: S/N log-uniform 35–160,
 * resolution 1.5–6 Å, radial velocity −250…+250 km/s, E(B−V) 0–0.8 with R_V 2.8–3.4, span and
 * pixel count drawn per spectrum, mixing fraction 0.1–0.9). Settings are chosen on this set
 * only; the held-out set is run once afterwards. Prints exact-class and ±1-subtype accuracy and
 * the class confusion, and the scatter of each line criterion about the standards at the true
 * type (the calibrated widths of criteria.ts come from that table).
 * `TUNE_COUNT` spectra (default 300); `TUNE_CHECK=1` also compares the two-stage search with the
 * exhaustive one on every spectrum.
 */
import { defaultLibrary } from '../server/jobs/worker'
import { CRITERIA, criterionValue, matchSpectrum, type MatchInput, type MatchOptions } from '../server/spectra/match'
import { criterionAtType } from '../server/spectra/match/classify'
import { runPipeline } from '../server/spectra/pipeline'
import { CLASSES, rng, syntheticSpectrum } from './synthetic'

const TUNING_SEED = 0x7a11_0b1e
const COUNT = Number(process.env.TUNE_COUNT ?? 300)
const CLASS_CODES: Record<string, number> = { Ia: 1, Ib: 2, II: 3, III: 4, IV: 5, V: 6 }

const library = defaultLibrary()

export interface TuningCase { truthType: number; truthClass: string; snr: number; fwhm: number; rv: number; ebv: number; input: MatchInput }

function makeCase(random: () => number): TuningCase {
  const made = syntheticSpectrum(random, (r) => ({
    t: 0.1 + 0.8 * r(),
    snr: 35 * (160 / 35) ** r(),
    fwhm: 1.5 + 4.5 * r(),
    rv: -250 + 500 * r(),
    ebv: 0.8 * r(),
    rV: 2.8 + 0.6 * r(),
    lo: 3760 + 60 * r(),
    hi: 5300 + 300 * r(),
    pixels: 3000 + Math.floor(2000 * r()),
  }))
  const { truthType, truthClass: cls, spectrum: { wavelength, flux } } = made
  const { snr, fwhm, rv, ebv } = made.perturbation
  const out = runPipeline({ spectrum: { wavelength, flux }, inputFwhm: fwhm }, library)
  const p = out.analysis.prepared
  const input: MatchInput = { rectified: p.rectified, mask: p.mask, snr: out.analysis.snr, fwhm: out.suggestion!.levelFwhm, lines: out.analysis.lines }
  return { truthType, truthClass: cls, snr, fwhm, rv, ebv, input }
}

/** The tuning set: spectra analysed at rest once, ready to be matched with any settings. */
export function tuningSet(count = COUNT): TuningCase[] {
  const random = rng(TUNING_SEED)
  return Array.from({ length: count }, () => makeCase(random))
}

/** Exact class, ±1 subtype and the class confusion of one set of match settings. */
export function evaluate(cases: readonly TuningCase[], options: MatchOptions = {}): { exact: number; within: number; confusion: number[][] } {
  const confusion = CLASSES.map(() => CLASSES.map(() => 0))
  let exact = 0
  let within = 0
  for (const c of cases) {
    const r = matchSpectrum(library, c.input, options)
    if (r.luminosityClass === c.truthClass) exact++
    if (Math.abs(r.typeCode - c.truthType) <= 1) within++
    confusion[CLASS_CODES[c.truthClass]! - 1]![Math.min(5, Math.floor(r.classCode) - 1)]!++
  }
  return { exact: exact / cases.length, within: within / cases.length, confusion }
}

function printConfusion(confusion: number[][]) {
  console.log('     ' + CLASSES.map((l) => l.padStart(5)).join(''))
  confusion.forEach((row, i) => console.log(CLASSES[i]!.padEnd(5) + row.map((v) => String(v).padStart(5)).join('')))
}

/** Robust scatter (1.4826 × median absolute deviation) of each criterion about the true class's standards at the true type. */
function criterionScatter(cases: readonly TuningCase[]) {
  for (const [ci, c] of CRITERIA.entries()) {
    const residuals: number[] = []
    for (const t of cases) {
      if (t.truthType < c.types[0] || t.truthType > c.types[1]) continue
      const level = library.levels.find((l) => l.fwhm === t.input.fwhm) ?? library.levels[0]!
      const span = Float64Array.from({ length: library.pixels }, (_, i) => {
        const g = i + library.offset
        return t.input.mask?.[g] ? Number.NaN : t.input.rectified[g]!
      })
      const v = criterionValue(c, span, library.wavelength)
      const ref = criterionAtType(library, level, ci, CLASS_CODES[t.truthClass]!, t.truthType)
      if (Number.isFinite(v) && ref !== null) residuals.push(v - ref)
    }
    residuals.sort((a, b) => a - b)
    const med = residuals[residuals.length >> 1] ?? Number.NaN
    const mad = residuals.map((r) => Math.abs(r - med)).sort((a, b) => a - b)[residuals.length >> 1] ?? Number.NaN
    console.log(`${c.id.padEnd(28)} n ${String(residuals.length).padStart(4)}  median ${med.toFixed(4)}  scatter ${(1.4826 * mad).toFixed(4)}`)
  }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const started = performance.now()
  const cases = tuningSet()
  console.log(`tuning set: ${cases.length} spectra (seed ${TUNING_SEED.toString(16)}), ${((performance.now() - started) / 1000).toFixed(1)} s`)
  const high = cases.filter((c) => c.snr >= 50)
  const variants: Record<string, MatchOptions> = JSON.parse(process.env.TUNE_VARIANTS ?? '{"default":{}}')
  for (const [label, options] of Object.entries(variants)) {
    for (const [name, set] of [['all', cases], ['S/N ≥ 50', high]] as const) {
      const r = evaluate(set, options)
      console.log(`${label} ${name}: n ${set.length}, exact class ${(100 * r.exact).toFixed(1)} %, within ±1 subtype ${(100 * r.within).toFixed(1)} %`)
      if (name !== 'all') printConfusion(r.confusion)
    }
  }
  criterionScatter(cases)
  if (process.env.TUNE_CHECK) {
    let differ = 0
    for (const c of cases) {
      const a = JSON.stringify(matchSpectrum(library, c.input))
      const b = JSON.stringify(matchSpectrum(library, c.input, { exhaustive: true }))
      if (a !== b) differ++
    }
    console.log(`two-stage search differs from the exhaustive one on ${differ} of ${cases.length} spectra`)
  }
}
