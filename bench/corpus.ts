/**
 * `npm run bench:corpus`: reads every file of tests/fixtures/corpus/ (one known spectrum in the
 * layouts pipelines and archives write, built by tests/reference/make_reader_corpus.py) and counts
 * the files read right, silently miscalibrated, refused though readable, and refused as they should
 * be. `--rv` also runs the pipeline and checks the radial velocity (about 0 when the scale is right).
 * READER=path/to/io/index.ts scores another copy of the readers (to compare before and after).
 */
import { readFileSync } from 'node:fs'
import { fileURLToPath } from 'node:url'
import { join } from 'node:path'

export const CORPUS_DIR = fileURLToPath(new URL('../tests/fixtures/corpus', import.meta.url))

export interface CorpusEntry {
  file: string
  layout: string
  convention: string
  source: string
  expect: 'read' | 'refused'
  code?: string
  options?: { aperture?: number; hdu?: number }
  pixels?: number
  airRange?: [number, number]
  medium?: 'air' | 'vacuum'
  hdu?: number
  aperture?: number | 'merged'
  maskedPixels?: number
  error?: boolean
  warning?: string
  merged?: number
}

export interface Corpus {
  astropy: string
  numpy: string
  knownSpectrum: { model: string; library: string; manifestSha256: string }
  tolerances: { rangeAngstrom: number }
  files: CorpusEntry[]
}

export function loadCorpus(): Corpus {
  return JSON.parse(readFileSync(join(CORPUS_DIR, 'corpus.json'), 'utf8')) as Corpus
}

/** The shape of readSpectrum's answer that every version of the readers gives. */
export type AnyRead =
  | {
      ok: true
      spectrum: { wavelengthAir: Float64Array; flux: Float64Array; error?: Float64Array; mask?: Uint8Array }
      meta: {
        pixels: number
        vacuumConverted: boolean
        maskedPixels: number
        hdu?: number
        decisions?: { warnings: string[]; medium: { conflict?: string }; aperture?: { number: number | 'merged' } }
      }
    }
  | { ok: false; code: string; message: string }
export type Reader = (bytes: Uint8Array, name: string, options: Record<string, unknown>) => AnyRead

export type Outcome = 'right' | 'miscalibrated, flagged' | 'silently miscalibrated' | 'refused though readable' | 'refused as it should be' | 'read though it should be refused'

export interface Scored {
  entry: CorpusEntry
  outcome: Outcome
  /** What differs from the expectation. */
  problems: string[]
  read: AnyRead
}

/** Reads one corpus file and compares it with what corpus.json says a right read gives. */
export function scoreEntry(read: Reader, entry: CorpusEntry, tolerance: number): Scored {
  const r = read(new Uint8Array(readFileSync(join(CORPUS_DIR, entry.file))), entry.file, entry.options ?? {})
  if (entry.expect === 'refused') return { entry, read: r, problems: r.ok ? ['read'] : [], outcome: r.ok ? 'read though it should be refused' : 'refused as it should be' }
  if (!r.ok) return { entry, read: r, problems: [`${r.code}: ${r.message}`], outcome: 'refused though readable' }
  const w = r.spectrum.wavelengthAir
  const problems: string[] = []
  const [lo, hi] = entry.airRange!
  if (Math.abs(w[0]! - lo) > tolerance || Math.abs(w[w.length - 1]! - hi) > tolerance) {
    problems.push(`range ${w[0]!.toFixed(2)}–${w[w.length - 1]!.toFixed(2)} Å, expected ${lo.toFixed(2)}–${hi.toFixed(2)} Å`)
  }
  if (r.meta.pixels !== entry.pixels) problems.push(`${r.meta.pixels} pixels, expected ${entry.pixels}`)
  if (r.meta.vacuumConverted !== (entry.medium === 'vacuum')) problems.push(`taken as ${r.meta.vacuumConverted ? 'vacuum' : 'air'}, the file is ${entry.medium}`)
  const flagged = (r.meta.decisions?.warnings.length ?? 0) > 0
  return { entry, read: r, problems, outcome: problems.length === 0 ? 'right' : flagged ? 'miscalibrated, flagged' : 'silently miscalibrated' }
}

export function scoreCorpus(read: Reader): Scored[] {
  const corpus = loadCorpus()
  return corpus.files.map((e) => scoreEntry(read, e, corpus.tolerances.rangeAngstrom))
}

async function main(): Promise<void> {
  const path = process.env.READER ?? '../server/spectra/io/index.ts'
  const mod = (await import(path.startsWith('/') ? path : new URL(path, import.meta.url).href)) as { readSpectrum: Reader; toSpectrum1D?: (s: unknown) => unknown }
  const scored = scoreCorpus(mod.readSpectrum)
  const counts = new Map<Outcome, number>()
  for (const s of scored) counts.set(s.outcome, (counts.get(s.outcome) ?? 0) + 1)
  let rvLine = ''
  if (process.argv.includes('--rv')) {
    const { defaultLibrary } = await import('../server/jobs/worker')
    const { runPipeline } = await import('../server/spectra/pipeline')
    const { toSpectrum1D } = await import('../server/spectra/io/types')
    const library = defaultLibrary()
    const rvs: number[] = []
    for (const s of scored) {
      if (!s.read.ok) continue
      const out = runPipeline({ spectrum: toSpectrum1D(s.read.spectrum as never) }, library)
      const v = out.analysis.rv?.v ?? NaN
      rvs.push(v)
      if (!(Math.abs(v) < 5)) s.problems.push(`radial velocity ${v.toFixed(1)} km/s`)
    }
    const abs = rvs
      .filter(Number.isFinite)
      .map(Math.abs)
      .sort((a, b) => a - b)
    rvLine = `radial velocity of the files read: median |v| ${abs[abs.length >> 1]?.toFixed(2)} km/s, largest ${abs[abs.length - 1]?.toFixed(2)} km/s, ${rvs.length - abs.length} not measured`
  }
  for (const s of scored) {
    if (s.outcome === 'right' || s.outcome === 'refused as it should be') {
      if (s.problems.length === 0) continue
    }
    console.log(`${s.outcome.padEnd(32)} ${s.entry.file.padEnd(34)} ${s.problems.join('; ').slice(0, 220)}`)
  }
  console.log(`\n${scored.length} files (${scored.filter((s) => s.entry.expect === 'read').length} readable, ${scored.filter((s) => s.entry.expect === 'refused').length} to refuse), readers ${path}`)
  for (const o of ['right', 'silently miscalibrated', 'miscalibrated, flagged', 'refused though readable', 'refused as it should be', 'read though it should be refused'] as Outcome[]) {
    console.log(`  ${o.padEnd(34)} ${counts.get(o) ?? 0}`)
  }
  if (rvLine) console.log(`  ${rvLine}`)
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) await main()
