/**
 * The instrument experiment: does promoting a team's agreed spectra as an instrument's own standards
 * make the suggestions for that instrument's spectra better, and by how much?
 *
 * The reference stars sharp enough for it (MILES, 2.5 Å) are passed through a simulated instrument
 * (SIMULATED_INSTRUMENT: coarser resolution, a smooth non-flat response, a small error in the
 * wavelength calibration, noise to S/N 50) and processed by the pipeline as uploads are. The first
 * N stars of a fixed order (promotionOrder) are promoted as the instrument's standards the way the
 * product promotes one (their current measurement: the rectified flux at the level they were matched
 * at, with the published type as the decided one). Every star is then classified as a spectrum of
 * that instrument, leave one star out: never against any spectrum of itself, shipped or promoted,
 * and always with exactly N promoted standards of other stars.
 */
import { DEFAULT_GRID } from '../shared/grid'
import type { Spectrum1D } from '../shared/spectrum'
import { DEFAULT_OBSERVED_DIR, observedLibraryAt } from '../server/spectra/match/load'
import { classText, prepareMatchLibrary, type MatchStandardInput, type PreparedMatchLibrary } from '../server/spectra/match'
import type { InstrumentMatchOptions } from '../server/spectra/match/instrument'
import { runPipeline } from '../server/spectra/pipeline'
import { seededRandom } from '../shared/random'
import { starKey, type ReferenceStar } from './reference'
import { figures, type Figures, type Scored } from './score'
import { degradeSpectrum } from './synthetic'

/** How a simulated instrument records a spectrum. */
export interface SimulatedInstrument {
  fwhm: number
  start: number
  end: number
  step: number
  snr: number
  response: (lambda: number) => number
  calibrationError: (lambda: number) => number
}

/** The simulated instrument (invented; plausible for a low-resolution long-slit spectrograph). */
export const SIMULATED_INSTRUMENT: SimulatedInstrument = {
  /** Resolution, FWHM Å: coarser than the MILES stars' 2.5 Å. */
  fwhm: 4,
  /** Linear pixels, Å: about four per resolution element. */
  start: 3800,
  end: 5600,
  step: 1,
  /** Noise per pixel at the median flux of 4000–5500 Å. */
  snr: 50,
  /** Throughput: peaks near 5600 Å and falls to about a third in the blue (a grating blazed in the red and a red-sensitive CCD). */
  response: (lambda: number) => 0.3 + 0.7 * Math.exp(-(((lambda - 5600) / 1100) ** 2)),
  /**
   * Error of the wavelength solution, Å (recorded − true): the curvature a low-order dispersion fit
   * leaves, +0.5 Å at the ends and −0.25 Å in the middle (about an eighth of a resolution element).
   */
  calibrationError: (lambda: number) => {
    const x = (lambda - 4700) / 900
    return 0.5 * ((3 * x * x - 1) / 2)
  },
}

/** The instrument id the promoted standards carry in the experiment. */
export const EXPERIMENT_INSTRUMENT_ID = 1
/** Numbers of promoted standards the experiment reports. */
export const PROMOTED_COUNTS = [0, 10, 25, 50, 100] as const
/**
 * Seeds of the promotion orders the table averages over: which stars happen to be promoted moves a
 * single order's figure by several points.
 */
export const PROMOTION_SHUFFLES = [0x1457, 11, 22, 33] as const
/** First database-like id of the promoted standards (the shipped ones are numbered from 1). */
const PROMOTED_ID_BASE = 100_000

/** A reference star as the simulated instrument records it (the noise drawn with `seed`). */
export function throughInstrument(star: ReferenceStar, seed: number, inst: SimulatedInstrument = SIMULATED_INSTRUMENT): Spectrum1D {
  const smooth = degradeSpectrum(star.spectrum, { from: star.fwhm, to: inst.fwhm, seed })
  const w = smooth.wavelength
  const f = smooth.flux
  const n = Math.round((inst.end - inst.start) / inst.step) + 1
  const wavelength = new Float64Array(n)
  const flux = new Float64Array(n)
  const mask = new Uint8Array(n)
  let j = 0
  for (let i = 0; i < n; i++) {
    const lambda = inst.start + i * inst.step
    wavelength[i] = lambda + inst.calibrationError(lambda)
    while (j < w.length - 2 && w[j + 1]! < lambda) j++
    const t = (lambda - w[j]!) / (w[j + 1]! - w[j]!)
    const v = f[j]! + t * (f[j + 1]! - f[j]!)
    const bad = !(t >= 0 && t <= 1) || !Number.isFinite(v) || smooth.mask?.[j] === 1 || smooth.mask?.[j + 1] === 1
    mask[i] = bad ? 1 : 0
    flux[i] = bad ? 0 : v * inst.response(lambda)
  }
  const band: number[] = []
  for (let i = 0; i < n; i++) if (!mask[i] && wavelength[i]! >= 4000 && wavelength[i]! <= 5500) band.push(flux[i]!)
  band.sort((a, b) => a - b)
  const sigma = (band[band.length >> 1] ?? 1) / inst.snr
  const random = seededRandom(seed)
  const error = new Float64Array(n).fill(sigma)
  for (let i = 0; i < n; i++) {
    if (mask[i]) continue
    const u = Math.sqrt(-2 * Math.log(random() + 1e-12)) * Math.cos(2 * Math.PI * random())
    flux[i] = flux[i]! + sigma * u
  }
  return { wavelength, flux, error, mask }
}

/** The stars the experiment uses: those at least as sharp as the instrument. */
export function instrumentStars(stars: readonly ReferenceStar[]): ReferenceStar[] {
  return stars.filter((s) => s.fwhm <= SIMULATED_INSTRUMENT.fwhm)
}

/**
 * The order in which stars are promoted: a fixed shuffle, taken first for stars that fill a type ×
 * class cell no earlier star fills (as the product proposes candidates that fill a gap), then the rest.
 */
export function promotionOrder(stars: readonly ReferenceStar[], seed = 0x1457): ReferenceStar[] {
  const random = seededRandom(seed)
  const shuffled = stars
    .map((s) => ({ s, r: random() }))
    .sort((a, b) => a.r - b.r)
    .map((x) => x.s)
  const cells = new Set<string>()
  const first: ReferenceStar[] = []
  const rest: ReferenceStar[] = []
  for (const s of shuffled) {
    const cell = `${Math.round(s.typeCode)}|${Math.round(s.classCode)}`
    if (cells.has(cell)) rest.push(s)
    else {
      cells.add(cell)
      first.push(s)
    }
  }
  return [...first, ...rest]
}

/** What one star's pass through the instrument gives: its spectrum, and what promoting it makes. */
export interface InstrumentObservation {
  star: ReferenceStar
  spectrum: Spectrum1D
  /** The star promoted as an instrument standard, as the product stores a promoted spectrum. */
  standard: MatchStandardInput
}

/**
 * Observes every star through the instrument and processes it against `library` (leaving out the
 * star itself) as an upload is processed: the promoted standard is that measurement's rectified
 * flux (masked pixels undefined) at the level it was matched at, with the published type. Star k
 * of the list is number `first` + k: its noise seed and its standard's id follow from that number.
 */
export function observeStars(stars: readonly ReferenceStar[], library: PreparedMatchLibrary, first = 0, inst: SimulatedInstrument = SIMULATED_INSTRUMENT): InstrumentObservation[] {
  return stars.map((star, j) => {
    const k = first + j
    const spectrum = throughInstrument(star, 7000 + k, inst)
    const out = runPipeline({ spectrum, inputFwhm: inst.fwhm, exclude: star.exclude }, library)
    const p = out.analysis.prepared
    const rectified = Float64Array.from(p.rectified, (v, i) => (p.mask[i] ? Number.NaN : v))
    return {
      star,
      spectrum,
      standard: {
        id: PROMOTED_ID_BASE + k,
        modelId: null,
        templateId: null,
        source: 'observed',
        star: star.star,
        origin: 'simulated instrument',
        spectralType: star.publishedType,
        typeCode: star.typeCode,
        luminosityClass: classText(star.classCode),
        classCode: star.classCode,
        teff: star.teff,
        logg: star.logg,
        feh: star.feh,
        rectified,
        resolutionFwhm: out.resolution.level!,
        instrumentId: EXPERIMENT_INSTRUMENT_ID,
        snr: out.analysis.snr,
      },
    }
  })
}

export interface ExperimentRow extends Scored {
  star: ReferenceStar
  /** Share of the type vote that came from the instrument's own standards. */
  instrumentShare: number
}

/** Figures for one number of promoted standards. */
export interface ExperimentFigures extends Figures {
  promoted: number
  /** Mean share of the type vote from the instrument's own standards, per cent. */
  instrumentShare: number
}

/**
 * Classifies every observed star as a spectrum of the instrument with `count` promoted standards:
 * the first stars of `order` that are not the star itself. A library is prepared with a few spare
 * promoted stars beyond `count`; for each star the spares it does not need, and every spectrum of
 * itself, are left out, so that exactly `count` promoted standards take part.
 */
export function runExperiment(
  observed: readonly InstrumentObservation[],
  order: readonly ReferenceStar[],
  shipped: readonly MatchStandardInput[],
  count: number,
  options: Omit<InstrumentMatchOptions, 'exclude'> = {},
  classify?: ReadonlySet<string>,
): { rows: ExperimentRow[]; figures: ExperimentFigures } {
  const byStar = new Map(observed.map((o) => [o.star.id, o]))
  const pool = order.slice(0, Math.min(order.length, count + 3)).map((s) => byStar.get(s.id))
  if (pool.some((o) => o === undefined)) throw new Error(`the first ${count + 3} stars of the promotion order must be observed`)
  const library = prepareMatchLibrary([...shipped, ...(count > 0 ? pool.map((o) => o!.standard) : [])], { versionId: 1000 + count, versionName: `instrument-${count}`, grid: DEFAULT_GRID })
  const rows = observed
    .filter((o) => !classify || classify.has(o.star.id))
    .map((o) => {
      const key = starKey(o.star.star)
      const exclude = new Set(o.star.exclude)
      let used = 0
      for (const p of pool) {
        if (starKey(p!.star.star) === key || used >= count) exclude.add(p!.standard.id)
        else used++
      }
      const out = runPipeline({ spectrum: o.spectrum, inputFwhm: SIMULATED_INSTRUMENT.fwhm, exclude, instrumentId: EXPERIMENT_INSTRUMENT_ID, instrumentOptions: options }, library)
      const s = out.suggestion!
      return {
        star: o.star,
        truthType: o.star.typeCode,
        truthClass: o.star.classCode,
        truthClassRange: o.star.classRange,
        type: s.typeCode,
        classCode: s.classCode,
        sigmaType: s.uncertainty.subtypes,
        sigmaClass: s.uncertainty.classes,
        flags: s.flags,
        instrumentShare: out.standards?.instrumentShare.type ?? 0,
      }
    })
  const share = rows.length ? rows.reduce((a, r) => a + r.instrumentShare, 0) / rows.length : 0
  return { rows, figures: { ...figures(rows), promoted: count, instrumentShare: Math.round(1000 * share) / 10 } }
}

/** The shipped standards as matcher inputs (ids = row + 1, as the reference stars' exclusions expect). */
export function shippedInputs(observedDir = DEFAULT_OBSERVED_DIR): MatchStandardInput[] {
  return observedLibraryAt(observedDir).inputs
}

/** Field-by-field mean of several runs' figures (two decimals), for numbers that are means or per cents. */
function meanFigures(runs: readonly ExperimentFigures[]): ExperimentFigures {
  const mean = { ...runs[0]! } as Record<string, unknown>
  for (const [k, v] of Object.entries(runs[0]!)) if (typeof v === 'number') mean[k] = Math.round((100 * runs.reduce((a, r) => a + (r as unknown as Record<string, number>)[k]!, 0)) / runs.length) / 100
  return mean as unknown as ExperimentFigures
}

/** One line of the accuracy-against-promoted table. */
export function experimentLine(f: ExperimentFigures, base: ExperimentFigures | null): string {
  const gain = (a: number, b: number | undefined) => (b === undefined ? '' : ` (${a - b >= 0 ? '+' : ''}${(a - b).toFixed(1)})`)
  return `${String(f.promoted).padStart(8)}${String(f.n).padStart(5)}${`${f.within1.toFixed(1)}${gain(f.within1, base?.within1)}`.padStart(16)}${f.within2.toFixed(1).padStart(9)}${`${f.exactClass.toFixed(1)}${gain(f.exactClass, base?.exactClass)}`.padStart(17)}${f.within1Class.toFixed(1).padStart(9)}${f.instrumentShare.toFixed(1).padStart(14)}`
}

export const EXPERIMENT_HEADER = 'promoted    n    ±1 sub (gain)   ±2 sub   exact cl (gain)    ±1 cl   own share %'

/** The experiment's report: the accuracy-against-promoted table, and variants of how the two sets are combined at `variantsAt` promoted. */
export function instrumentReport(
  stars: readonly ReferenceStar[],
  options: { counts?: readonly number[]; variantsAt?: number | null; log?: (line: string) => void } = {},
): { lines: string[]; table: ExperimentFigures[] } {
  const { counts = PROMOTED_COUNTS, variantsAt = 50 } = options
  const lines: string[] = []
  const say = (line = '') => {
    lines.push(line)
    options.log?.(line)
  }
  const shipped = shippedInputs()
  const base = prepareMatchLibrary(shipped, { versionId: 999, versionName: 'shipped', grid: DEFAULT_GRID })
  const used = instrumentStars(stars)
  const t0 = performance.now()
  const observed = observeStars(used, base)
  const order = promotionOrder(used)
  const orders = PROMOTION_SHUFFLES.map((seed) => promotionOrder(used, seed))
  const inst = SIMULATED_INSTRUMENT
  say(
    `${used.length} stars through a simulated instrument: ${inst.fwhm} Å FWHM, ${inst.step} Å pixels ${inst.start}–${inst.end} Å, response ${inst.response(3800).toFixed(2)} at 3800 Å to ${inst.response(5600).toFixed(2)} at 5600 Å, wavelength error ${inst.calibrationError(4700).toFixed(2)} to +${inst.calibrationError(3800).toFixed(2)} Å, S/N ${inst.snr}; observed in ${((performance.now() - t0) / 1000).toFixed(0)} s`,
  )
  say('Each star is classified as a spectrum of the instrument with N promoted standards of other stars (leave one star out).')
  say(`With standards promoted, each figure is the mean over ${orders.length} promotion orders; the range of ±1 subtype over them follows.`)
  say(EXPERIMENT_HEADER)
  const table: ExperimentFigures[] = []
  for (const count of counts) {
    const t = performance.now()
    const runs = (count === 0 ? [order] : orders).map((o) => runExperiment(observed, o, shipped, count).figures)
    const f = meanFigures(runs)
    table.push(f)
    const range = runs.length > 1 ? `   ±1 sub ${Math.min(...runs.map((r) => r.within1))}–${Math.max(...runs.map((r) => r.within1))}` : ''
    say(`${experimentLine(f, table[0] ?? null)}${range}   ${((performance.now() - t) / 1000).toFixed(0)} s`)
  }
  if (variantsAt !== null && counts.includes(variantsAt)) {
    say(`How the two sets are combined, at ${variantsAt} promoted:`)
    const variants: [string, Omit<InstrumentMatchOptions, 'exclude'>][] = [
      ['general standards left out in the cells an own standard fills (same subtype, ±½ class)', { cover: { types: 0, classes: 0.5 } }],
      ['general standards left out within ±1 subtype of an own standard', { cover: { types: 1, classes: 0.5 } }],
      ['with the smooth response correction on the general standards', { responseCorrection: true }],
    ]
    for (const [name, opts] of variants) {
      const { figures: f } = runExperiment(observed, order, shipped, variantsAt, opts)
      say(`  ${name}: ±1 sub ${f.within1} %, exact class ${f.exactClass} %, own share ${f.instrumentShare} %`)
    }
  }
  return { lines, table }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const { referenceStars } = await import('./reference')
  const every = Number(process.env.ACCURACY_EVERY ?? 1)
  instrumentReport(
    referenceStars().filter((_, i) => i % every === 0),
    { log: (l) => console.log(l) },
  )
}

/** The experiment's gate in `npm test`: every GATE_EVERY-th star, from the library's copies, with none and with GATE_PROMOTED promoted. */
export const INSTRUMENT_GATE_EVERY = 6
export const INSTRUMENT_GATE_PROMOTED = 50

export interface InstrumentGateFigures {
  n: number
  /** ±1 subtype and exact class, per cent, with none and with INSTRUMENT_GATE_PROMOTED promoted. */
  none: { within1: number; exactClass: number }
  promoted: { within1: number; exactClass: number }
}

/**
 * The gate's figures: every INSTRUMENT_GATE_EVERY-th instrument star (the library's own copies, so
 * that any machine gives the same) classified with no promoted standards and with
 * INSTRUMENT_GATE_PROMOTED; the promoted ones come from every star, in the fixed promotion order.
 */
export function instrumentGateFigures(stars: readonly ReferenceStar[]): InstrumentGateFigures {
  const shipped = shippedInputs()
  const base = prepareMatchLibrary(shipped, { versionId: 998, versionName: 'shipped', grid: DEFAULT_GRID })
  const all = instrumentStars(stars)
  const order = promotionOrder(all)
  const subset = all.filter((_, i) => i % INSTRUMENT_GATE_EVERY === 0)
  const pool = order.slice(0, INSTRUMENT_GATE_PROMOTED + 3)
  const needed = all.filter((s) => subset.includes(s) || pool.includes(s))
  // Numbered by the star's place among all instrument stars, as in the full experiment.
  const observed = needed.map((s) => observeStars([s], base, all.indexOf(s))[0]!)
  const only = new Set(subset.map((s) => s.id))
  const pick = (f: ExperimentFigures) => ({ within1: f.within1, exactClass: f.exactClass })
  const none = runExperiment(observed, order, shipped, 0, {}, only).figures
  const promoted = runExperiment(observed, order, shipped, INSTRUMENT_GATE_PROMOTED, {}, only).figures
  return { n: none.n, none: pick(none), promoted: pick(promoted) }
}
