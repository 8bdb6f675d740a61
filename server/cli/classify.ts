// npm run classify -- [options] FILE|DIRECTORY|GLOB ...: runs the pipeline on each file against the
// default model library and prints one JSON object per file per line (see USAGE in args.ts).
import { openSync, readSync, closeSync, statSync } from 'node:fs'
import { basename } from 'node:path'
import { defaultLibrary } from '../jobs/worker'
import { DEFAULT_READ_OPTIONS, readSpectrum, toSpectrum1D, unpackZip, type ReadResult } from '../spectra/io'
import type { PreparedMatchLibrary } from '../spectra/match'
import { runPipeline } from '../spectra/pipeline'
import { USAGE, expandInputs, parseCliArgs, type CliOptions } from './args'

/** More files than this get a progress line on stderr. */
const PROGRESS_FROM = 3
const ZIP_MAGIC = [0x50, 0x4b, 0x03, 0x04]

const r3 = (x: number | null | undefined) => (x === null || x === undefined || !Number.isFinite(x) ? null : Math.round(x * 1000) / 1000)

/** Median pixel step, Å (robust to gaps and to a varying dispersion). */
function medianStep(wl: Float64Array): number {
  const d = new Float64Array(Math.max(0, wl.length - 1))
  for (let i = 1; i < wl.length; i++) d[i - 1] = wl[i]! - wl[i - 1]!
  d.sort()
  return d.length > 0 ? d[d.length >> 1]! : Number.NaN
}

/** Reads a file with the readers' size limit checked before anything is loaded. */
function loadFile(path: string, maxBytes: number): { bytes: Uint8Array } | { code: string; message: string } {
  let size: number
  try {
    size = statSync(path).size
  } catch (e) {
    return { code: 'FILE_NOT_FOUND', message: `${path}: ${(e as Error).message}` }
  }
  if (size > maxBytes) return { code: 'FILE_TOO_LARGE', message: `${basename(path)} is ${size} bytes; the limit is ${maxBytes}` }
  const bytes = new Uint8Array(size)
  const fd = openSync(path, 'r')
  try {
    readSync(fd, bytes, 0, size, 0)
  } finally {
    closeSync(fd)
  }
  return { bytes }
}

let library: PreparedMatchLibrary | undefined

/** One JSON line for a read file: the reader's decisions, the measurements and the suggestion. */
function classified(file: string, read: Extract<ReadResult, { ok: true }>, options: CliOptions): Record<string, unknown> {
  library ??= defaultLibrary()
  const wl = read.spectrum.wavelengthAir
  const out = runPipeline({ spectrum: toSpectrum1D(read.spectrum), ...(options.fwhm !== undefined ? { inputFwhm: options.fwhm } : {}) }, library)
  const s = out.suggestion!
  return {
    file,
    ok: true,
    format: read.meta.format,
    read: read.meta.decisions,
    pixels: wl.length,
    maskedPixels: read.meta.maskedPixels,
    wavelengthRange: [r3(wl[0]), r3(wl[wl.length - 1])],
    dispersion: r3(medianStep(wl)),
    inputFwhm: options.fwhm ?? null,
    resolution: out.resolution,
    snr: r3(out.analysis.snr),
    snrMethod: out.analysis.snrMethod,
    rv: out.analysis.rv ? { v: r3(out.analysis.rv.v), error: r3(out.analysis.rv.error) } : null,
    lines: out.analysis.lines.map((l) =>
      l.measured
        ? {
            id: l.id,
            ew: r3(l.equivalentWidth),
            ewError: r3(l.equivalentWidthError),
            fwhm: r3(l.fwhm),
            depth: r3(l.depth),
            ...(l.family === 'balmer' ? { lorentzianWidth: r3(l.voigt?.lorentzianFwhm) } : {}),
          }
        : { id: l.id, ew: null, ewError: null, fwhm: null, depth: null, reason: l.reason },
    ),
    spectralType: s.spectralType,
    type: { letter: s.letter, subtype: s.subtype },
    luminosityClass: s.luminosityClass,
    uncertainty: s.uncertainty,
    classShares: s.classShares,
    classNote: s.classNote,
    parameters: s.parameters,
    candidates: s.candidates,
    flags: s.flags,
    notes: out.notes,
    libraryVersion: s.libraryVersion.name,
  }
}

function main(): number {
  let options: CliOptions
  try {
    options = parseCliArgs(process.argv.slice(2))
  } catch (e) {
    process.stderr.write(`${(e as Error).message}\n\n${USAGE}\n`)
    return 2
  }
  if (options.help) {
    process.stdout.write(`${USAGE}\n`)
    return 0
  }
  if (options.inputs.length === 0) {
    process.stderr.write(`no files given\n\n${USAGE}\n`)
    return 2
  }
  const { files, missing } = expandInputs(options.inputs)
  const started = performance.now()
  const failures = new Map<string, number>()
  let done = 0
  let ok = 0
  const total = files.length
  const tty = process.stderr.isTTY === true
  let lastProgress = 0
  const progress = (file: string) => {
    if (options.quiet || total <= PROGRESS_FROM) return
    const now = performance.now()
    const failed = [...failures.values()].reduce((a, b) => a + b, 0)
    const line = `classify: ${done}/${total} files, ${failed} failed — ${basename(file)}`
    if (tty) process.stderr.write(`\r${line.slice(0, 100).padEnd(100)}`)
    else if (done === total || now - lastProgress > 2000) {
      process.stderr.write(`${line}\n`)
      lastProgress = now
    }
  }
  const fail = (file: string, code: string, message: string) => {
    failures.set(code, (failures.get(code) ?? 0) + 1)
    console.log(JSON.stringify({ file, ok: false, code, error: message }))
  }
  for (const m of missing) fail(m.input, 'FILE_NOT_FOUND', m.message)
  const maxBytes = options.read.maxBytes ?? DEFAULT_READ_OPTIONS.maxBytes
  const handle = (file: string, bytes: Uint8Array) => {
    try {
      const read = readSpectrum(bytes, basename(file), options.read)
      if (!read.ok) return fail(file, read.code, read.message)
      console.log(JSON.stringify(classified(file, read, options)))
      ok++
    } catch (e) {
      fail(file, 'PIPELINE_FAILED', e instanceof Error ? e.message : String(e))
    }
  }
  for (const file of files) {
    const loaded = loadFile(file, maxBytes)
    if ('code' in loaded) fail(file, loaded.code, loaded.message)
    else if (ZIP_MAGIC.every((v, i) => loaded.bytes[i] === v)) {
      const zip = unpackZip(loaded.bytes, { maxEntryBytes: maxBytes })
      if (!zip.ok) fail(file, zip.code, zip.message)
      else for (const entry of zip.entries) handle(`${file}/${entry.name}`, entry.bytes)
    } else handle(file, loaded.bytes)
    done++
    progress(file)
  }
  if (tty && !options.quiet && total > PROGRESS_FROM) process.stderr.write('\n')
  const failed = [...failures.values()].reduce((a, b) => a + b, 0)
  const codes = [...failures.entries()]
    .sort((a, b) => b[1] - a[1])
    .map(([c, n]) => `${c} ${n}`)
    .join(', ')
  process.stderr.write(`classify: ${ok} classified, ${failed} failed${codes ? ` (${codes})` : ''} in ${((performance.now() - started) / 1000).toFixed(1)} s\n`)
  return failed > 0 ? 1 : ok > 0 ? 0 : 2
}

process.exitCode = main()
