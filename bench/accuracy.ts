/**
 * `npm run bench:accuracy`: how often the suggestions agree with published classifications.
 *
 * 1. Real stars, leave one star out: every star of the shipped observed library is classified
 *    against the library without any spectrum of that star (bench/reference.ts), read from its
 *    source file through the readers when the reference folder is present. Conditions: native
 *    resolution and S/N (resolution given, and not given), degraded to 5 Å and 15 Å FWHM, and with
 *    noise added to S/N 50 and 20. Per type group × class group (score.ts).
 * 2. Self-consistency: spectra made from the library's own standards (bench/synthetic.ts) with
 *    unknown resolution, rotation, reddening, velocity and noise, and two-star composites: it
 *    measures robustness, not how well the product classifies a star.
 * 3. The instrument experiment (bench/instrument.ts): the MILES stars through a simulated
 *    instrument, with 0, 10, 25, 50 and 100 of them promoted as its own standards, leave one star
 *    out; accuracy against the number promoted. ACCURACY_SECTIONS=instrument runs this part alone
 *    (it writes bench/results/instrument.txt and instrument-gate.json only).
 *
 * The matcher's settings (neighbours, vote temperature, class balance in classify.ts) were chosen
 * on the odd-numbered MILES stars only; the table "tuning half" / "held-out half" shows both.
 * Writes bench/results/accuracy.txt and accuracy.json (the baseline of the accuracy gate in npm test).
 * ACCURACY_EVERY=k classifies every k-th star only (quick looks).
 */
import { mkdirSync, writeFileSync } from 'node:fs'
import type { Spectrum1D } from '../shared/spectrum'
import { fileURLToPath } from 'node:url'
import { defaultLibrary, DEFAULT_OBSERVED_DIR, observedLibraryAt } from '../server/spectra/match/load'
import { runPipeline } from '../server/spectra/pipeline'
import { referenceStars, REFERENCE_DATA_DIR, type ReferenceStar } from './reference'
import { classError, figures, groupTable, type Scored } from './score'
import { gateFigures } from './gate'
import { INSTRUMENT_GATE_EVERY, INSTRUMENT_GATE_PROMOTED, instrumentGateFigures, instrumentReport } from './instrument'
import { degradeSpectrum, selfConsistency } from './synthetic'

const EVERY = Number(process.env.ACCURACY_EVERY ?? 1)
const ONLY_INSTRUMENT = process.env.ACCURACY_SECTIONS === 'instrument'
const out: string[] = []
const log = (line = '') => {
  out.push(line)
  console.log(line)
}

export interface Condition {
  name: string
  /** Stars it applies to. */
  applies: (s: ReferenceStar) => boolean
  fwhm: (s: ReferenceStar) => number
  /** Noise added to reach this S/N (per pixel), or none. */
  snr?: number
  /** Whether the resolution is given to the pipeline. */
  given: boolean
  /** Only this part of the spectrum is kept, Å. */
  range?: readonly [number, number]
  /** A throughput the flux is multiplied by, as an unfluxed spectrum carries its instrument's. */
  response?: (lambda: number) => number
  /** One-pixel cosmic-ray hits added, evenly spaced, of 0.5–2.4 × the median flux. */
  cosmicRays?: number
}

/** The part of a spectrum between `range[0]` and `range[1]` Å. */
export function cutSpectrum(spectrum: Spectrum1D, range: readonly [number, number]): Spectrum1D {
  const w = spectrum.wavelength
  const keep = Array.from(w.keys()).filter((i) => w[i]! >= range[0] && w[i]! <= range[1])
  const take = (a: ArrayLike<number>) => Float64Array.from(keep, (i) => a[i]!)
  const { error, mask } = spectrum
  return { wavelength: take(w), flux: take(spectrum.flux), ...(error ? { error: take(error) } : {}), ...(mask ? { mask: Uint8Array.from(keep, (i) => mask[i]!) } : {}) }
}

/** The spectrum times a throughput; errors scale with the flux. */
export function throughResponse(spectrum: Spectrum1D, response: (lambda: number) => number): Spectrum1D {
  const r = spectrum.wavelength.map(response)
  return { ...spectrum, flux: spectrum.flux.map((f, i) => f * r[i]!), ...(spectrum.error ? { error: spectrum.error.map((e, i) => e * r[i]!) } : {}) }
}

/** The spectrum with `count` one-pixel hits of 0.5–2.4 × its median flux, evenly spaced. */
export function withCosmicRays(spectrum: Spectrum1D, count: number): Spectrum1D {
  const flux = Float64Array.from(spectrum.flux)
  const level = [...flux].filter(Number.isFinite).sort((a, b) => a - b)[flux.length >> 1]!
  const spacing = Math.floor(flux.length / (count + 1))
  for (let k = 0; k < count; k++) flux[(k + 1) * spacing] = flux[(k + 1) * spacing]! + level * (0.5 + (1.9 * k) / Math.max(1, count - 1))
  return { ...spectrum, flux }
}

export const CONDITIONS: Condition[] = [
  { name: 'native resolution and S/N, resolution given', applies: () => true, fwhm: (s) => s.fwhm, given: true },
  { name: 'native resolution and S/N, resolution not given', applies: () => true, fwhm: (s) => s.fwhm, given: false },
  { name: 'degraded to 5 Å FWHM (MILES stars)', applies: (s) => s.fwhm <= 5, fwhm: () => 5, given: true },
  { name: 'degraded to 15 Å FWHM', applies: () => true, fwhm: () => 15, given: true },
  { name: 'native resolution, noise to S/N 50', applies: () => true, fwhm: (s) => s.fwhm, snr: 50, given: true },
  { name: 'native resolution, noise to S/N 20', applies: () => true, fwhm: (s) => s.fwhm, snr: 20, given: true },
  // A blue classification spectrum: what the reader still admits (80 % of 3900–4900 Å).
  { name: 'native resolution and S/N, cut to 3900–4700 Å (MILES stars)', applies: (s) => s.source === 'miles', fwhm: (s) => s.fwhm, given: true, range: [3900, 4700] },
  // Unfluxed spectra: a throughput rising 20× to the red (a red-sensitive CCD and a red-blazed
  // grating), and one peaked at 5500 Å that falls to a quarter at 3700 and 7300 Å.
  {
    name: 'native resolution, times a throughput (λ / 5000 Å)⁴, resolution not given (MILES stars)',
    applies: (s) => s.source === 'miles',
    fwhm: (s) => s.fwhm,
    given: false,
    response: (lambda) => (lambda / 5000) ** 4,
  },
  {
    name: 'native resolution, times a throughput exp(−((λ − 5500 Å) / 1500 Å)²), resolution not given (MILES stars)',
    applies: (s) => s.source === 'miles',
    fwhm: (s) => s.fwhm,
    given: false,
    response: (lambda) => Math.exp(-(((lambda - 5500) / 1500) ** 2)),
  },
  // An exposure whose cosmic-ray hits were not cleaned.
  { name: 'native resolution, 20 one-pixel cosmic-ray hits, resolution not given (MILES stars)', applies: (s) => s.source === 'miles', fwhm: (s) => s.fwhm, given: false, cosmicRays: 20 },
]

export interface StarResult extends Scored {
  star: ReferenceStar
  spectralType: string
  candidates: string[]
  classNote: string | null
}

/** Classifies one reference star under a condition, leaving out every spectrum of it. */
export function classifyReference(library: ReturnType<typeof defaultLibrary>, star: ReferenceStar, condition: Condition, seed: number): StarResult {
  const fwhm = condition.fwhm(star)
  const degraded = degradeSpectrum(star.spectrum, { from: star.fwhm, to: fwhm, ...(condition.snr ? { snr: condition.snr } : {}), seed })
  const cut = condition.range ? cutSpectrum(degraded, condition.range) : degraded
  const responded = condition.response ? throughResponse(cut, condition.response) : cut
  const spectrum = condition.cosmicRays ? withCosmicRays(responded, condition.cosmicRays) : responded
  const output = runPipeline({ spectrum, ...(condition.given ? { inputFwhm: fwhm } : {}), exclude: star.exclude }, library)
  const s = output.suggestion!
  return {
    star,
    truthType: star.typeCode,
    truthClass: star.classCode,
    truthClassRange: star.classRange,
    type: s.typeCode,
    classCode: s.classCode,
    sigmaType: s.uncertainty.subtypes,
    sigmaClass: s.uncertainty.classes,
    flags: s.flags,
    spectralType: s.spectralType,
    candidates: s.candidates.slice(0, 3).map((c) => `${c.star ?? ''} ${c.spectralType}`.trim()),
    classNote: s.classNote,
  }
}

/** The instrument experiment and its gate; returns the lines it printed. */
function instrumentSection(stars: ReturnType<typeof referenceStars>): string[] {
  const from = out.length
  log('')
  log('## The instrument experiment: accuracy against the number of promoted instrument standards')
  instrumentReport(stars, { log })
  const gate = instrumentGateFigures(referenceStars(undefined, { fromFiles: false }))
  log(
    `## The npm test instrument gate (every ${INSTRUMENT_GATE_EVERY}th instrument star, the library's copies, 0 and ${INSTRUMENT_GATE_PROMOTED} promoted): n ${gate.n}, ±1 sub ${gate.none.within1} → ${gate.promoted.within1} %, exact class ${gate.none.exactClass} → ${gate.promoted.exactClass} %`,
  )
  if (EVERY === 1) {
    const dir = fileURLToPath(new URL('./results/', import.meta.url))
    mkdirSync(dir, { recursive: true })
    writeFileSync(`${dir}instrument.txt`, `Lineweight instrument experiment — ${new Date().toISOString().slice(0, 10)}\n${out.slice(from).join('\n')}\n`)
    writeFileSync(`${dir}instrument-gate.json`, `${JSON.stringify(gate, null, 1)}\n`)
  }
  return out.slice(from)
}

function main() {
  const started = performance.now()
  const library = defaultLibrary()
  const stars = referenceStars().filter((_, i) => i % EVERY === 0)
  if (ONLY_INSTRUMENT) {
    instrumentSection(stars)
    log(`total ${((performance.now() - started) / 1000).toFixed(0)} s`)
    return
  }
  const fromFiles = stars.filter((s) => s.readFrom === 'file').length
  log(`Lineweight accuracy benchmark — ${new Date().toISOString().slice(0, 10)}`)
  log(`library ${library.versionName}: ${library.standards.length} standards; levels ${library.resolutions.join(', ')} Å`)
  log(
    `reference stars: ${stars.length} (${stars.filter((s) => s.source === 'miles').length} MILES, ${stars.filter((s) => s.source === 'jhc').length} JHC), ${fromFiles} read from their source files in ${REFERENCE_DATA_DIR}, ${stars.length - fromFiles} from the library's copy`,
  )
  log('Leave one star out: no star is matched against any spectrum of itself. Within ±1/±2 subtypes: |Δ type code| ≤ 1/2 (K7 → M0 is 3).')
  log('Exact class: the suggested class, or an end of a suggested intermediate class, is the published one (or an end of it).')
  log('mean Δcl: suggested − published class, classes (negative = more luminous). in ±1σ: published type inside the quoted uncertainty.')
  const summary: Record<string, ReturnType<typeof figures>> = {}
  let native: StarResult[] = []
  for (const condition of CONDITIONS) {
    const t0 = performance.now()
    const rows = stars.filter(condition.applies).map((s, k) => classifyReference(library, s, condition, 1000 + k))
    if (condition === CONDITIONS[0]) native = rows
    log('')
    log(`## ${condition.name} (${rows.length} stars, ${((performance.now() - t0) / 1000).toFixed(0)} s)`)
    log(groupTable(rows))
    for (const source of ['miles', 'jhc'] as const) {
      const f = figures(rows.filter((r) => r.star.source === source))
      if (f.n > 0) log(`  ${source === 'miles' ? 'MILES (2.5 Å)' : 'JHC (≈15 Å)'}: n ${f.n}, ±1 sub ${f.within1} %, ±2 sub ${f.within2} %, exact class ${f.exactClass} %, ±1 class ${f.within1Class} %`)
    }
    const flags = new Map<string, number>()
    for (const r of rows) for (const f of r.flags) flags.set(f, (flags.get(f) ?? 0) + 1)
    log(`  flags: ${[...flags].map(([f, n]) => `${f} ${n} (${((100 * n) / rows.length).toFixed(1)} %)`).join(', ') || 'none'}`)
    summary[condition.name] = figures(rows)
    for (const source of ['miles', 'jhc'] as const) summary[`${condition.name} [${source}]`] = figures(rows.filter((r) => r.star.source === source))
  }

  // Stars left out of the library for contradicting their own published parameters: still real stars, shown apart.
  const retired = referenceStars(undefined, { retired: true }).filter((_, i) => i % EVERY === 0)
  if (retired.length > 0) {
    const rows = retired.map((s, k) => classifyReference(library, s, CONDITIONS[0]!, 1000 + k))
    const f = figures(rows)
    log('')
    log(`## Stars left out of the library because their published parameters contradict their type (metal-poor, or class against log g), native, resolution given`)
    log(`  n ${f.n}, ±1 sub ${f.within1} %, ±2 sub ${f.within2} %, exact class ${f.exactClass} %, ±1 class ${f.within1Class} % (their published types are the doubtful part; not in the figures above)`)
    summary['left out for their parameters'] = f
  }

  // The settings were chosen on odd-numbered MILES stars: show the other half apart. Numbered in
  // the rows of flux.f32 (every MILES standard of observed-v1), so the halves do not move when a
  // later version leaves stars out.
  const miles = native.filter((r) => r.star.source === 'miles')
  const milesIds = observedLibraryAt(DEFAULT_OBSERVED_DIR)
    .library.manifest.entries.filter((e) => e.source === 'miles' && e.row !== undefined)
    .sort((a, b) => a.row! - b.row!)
    .map((e) => e.id)
  const half = (parity: number) => miles.filter((r) => milesIds.indexOf(r.star.id) % 2 === parity)
  log('')
  log('## MILES, native: tuning half (odd-numbered stars) and held-out half (even-numbered)')
  for (const [name, rows] of [
    ['tuning half', half(1)],
    ['held-out half', half(0)],
  ] as const) {
    const f = figures(rows)
    log(`  ${name.padEnd(14)} n ${f.n}, ±1 sub ${f.within1} %, exact class ${f.exactClass} %, ±1 class ${f.within1Class} %, mean Δcl ${f.meanClassError}`)
  }

  log('')
  log('## The worst misclassifications (native resolution, resolution given)')
  const worst = [...native].sort((a, b) => Math.abs(b.type - b.truthType) + 3 * Math.abs(classError(b)) - (Math.abs(a.type - a.truthType) + 3 * Math.abs(classError(a)))).slice(0, 8)
  for (const r of worst) {
    const s = r.star
    const params = [s.teff !== null ? `Teff ${s.teff} K` : null, s.logg !== null ? `log g ${s.logg}` : null, s.feh !== null ? `[Fe/H] ${s.feh}` : null].filter(Boolean).join(', ')
    log(`  ${s.star} (${s.source}) published ${s.publishedType}${params ? ` (${params})` : ''} → ${r.spectralType}; nearest: ${r.candidates.join('; ')}${r.classNote ? `. ${r.classNote}` : ''}`)
  }

  log('')
  log("## Self-consistency (made from the library's own standards; robustness, not accuracy)")
  const self = selfConsistency(library)
  for (const line of self.lines) log(line)
  summary['self-consistency'] = self.figures

  instrumentSection(stars)

  const gate = gateFigures(library)
  log('')
  log(`## The npm test gate (every 6th star, the library's copies, native, resolution given): n ${gate.n}, ±1 sub ${gate.within1} %, exact class ${gate.exactClass} %`)

  log('')
  log(`total ${((performance.now() - started) / 1000).toFixed(0)} s`)
  const dir = fileURLToPath(new URL('./results/', import.meta.url))
  mkdirSync(dir, { recursive: true })
  if (EVERY === 1) {
    writeFileSync(`${dir}accuracy.txt`, `${out.join('\n')}\n`)
    writeFileSync(`${dir}accuracy.json`, `${JSON.stringify({ date: new Date().toISOString().slice(0, 10), library: library.versionName, summary }, null, 1)}\n`)
    writeFileSync(`${dir}accuracy-gate.json`, `${JSON.stringify(gate, null, 1)}\n`)
  }
}

if (import.meta.url === `file://${process.argv[1]}`) main()
