/**
 * The command line of `npm run classify`: options, and the files that directories, globs and
 * zip archives stand for.
 */
import { readdirSync, statSync } from 'node:fs'
import { isAbsolute, join } from 'node:path'
import { parseArgs } from 'node:util'
import { globSync } from 'tinyglobby'
import type { ReadOptions } from '../spectra/io'
import { angstromsPerUnit } from '../spectra/io/units'

export const USAGE = `usage: npm run classify -- [options] FILE|DIRECTORY|GLOB ...

Reads each spectrum file (FITS, text, gzip or zip), runs the pipeline against the default model
library and prints one JSON object per file on stdout: the reader's decisions (HDU, aperture, unit,
air or vacuum and why, masks, parts ignored) and the measurements and suggested type; or, for a file
that cannot be read, ok: false with its error code and message. Directories are searched
recursively; quote a glob ('spectra/**/*.fits') to have it expanded here rather than by the shell.

options
  --fwhm Å           instrumental resolution (FWHM, Å) of every file; used to match the standards
  --medium air|vacuum  the wavelengths are in air or in vacuum, whatever the files say
  --unit UNIT        wavelength unit of every file: Angstrom, nm, um or m, whatever the files say
  --hdu N            read FITS HDU N (0 = primary) instead of the first that covers 3900–4900 Å
  --aperture N       read aperture, order or row N (from 1) of files that hold several
  --quiet            no progress line on stderr
  -h, --help         this text

Progress (more than 3 files) and a summary line go to stderr. The exit code is 0 when every file
was classified, 1 when any file failed, 2 for a wrong option or nothing to read.`

export interface CliOptions {
  read: ReadOptions
  fwhm?: number
  quiet: boolean
  help: boolean
  inputs: string[]
}

/** Parses the arguments; throws an Error with the message to show for a wrong option. */
export function parseCliArgs(argv: string[]): CliOptions {
  const { values, positionals } = parseArgs({
    args: argv.filter((a) => a !== '--'),
    allowPositionals: true,
    strict: true,
    options: {
      fwhm: { type: 'string' },
      medium: { type: 'string' },
      unit: { type: 'string' },
      hdu: { type: 'string' },
      aperture: { type: 'string' },
      quiet: { type: 'boolean', default: false },
      help: { type: 'boolean', short: 'h', default: false },
    },
  })
  const out: CliOptions = { read: {}, quiet: values.quiet === true, help: values.help === true, inputs: positionals }
  if (values.fwhm !== undefined) {
    const v = Number(values.fwhm)
    if (!(v > 0 && v <= 100)) throw new Error(`--fwhm must be a resolution in Å between 0 and 100, not '${values.fwhm}'`)
    out.fwhm = v
  }
  if (values.medium !== undefined) {
    if (values.medium !== 'air' && values.medium !== 'vacuum') throw new Error(`--medium must be air or vacuum, not '${values.medium}'`)
    out.read.assumeVacuum = values.medium === 'vacuum'
  }
  if (values.unit !== undefined) {
    if (angstromsPerUnit(values.unit) === undefined) throw new Error(`--unit must be Angstrom, nm, um or m, not '${values.unit}'`)
    out.read.wavelengthUnit = values.unit
  }
  if (values.hdu !== undefined) {
    const v = Number(values.hdu)
    if (!Number.isInteger(v) || v < 0 || v > 999) throw new Error(`--hdu must be a whole number from 0 to 999, not '${values.hdu}'`)
    out.read.hdu = v
  }
  if (values.aperture !== undefined) {
    const v = Number(values.aperture)
    if (!Number.isInteger(v) || v < 1 || v > 1000) throw new Error(`--aperture must be a whole number from 1, not '${values.aperture}'`)
    out.read.aperture = v
  }
  return out
}

const GLOB_CHARS = /[*?[\]{}]/

function walk(dir: string, out: string[]): void {
  for (const entry of readdirSync(dir, { withFileTypes: true }).sort((a, b) => a.name.localeCompare(b.name))) {
    if (entry.name.startsWith('.')) continue
    const path = join(dir, entry.name)
    if (entry.isDirectory()) walk(path, out)
    else if (entry.isFile()) out.push(path)
  }
}

/** One input that matched nothing. */
export interface MissingInput {
  input: string
  message: string
}

/**
 * The files the inputs stand for, in order and without repeats: a file as given, a directory's
 * files recursively (hidden ones skipped), a glob expanded. Inputs that match nothing are returned
 * apart so each can be reported.
 */
export function expandInputs(inputs: string[]): { files: string[]; missing: MissingInput[] } {
  const files: string[] = []
  const missing: MissingInput[] = []
  const seen = new Set<string>()
  const add = (f: string) => {
    if (!seen.has(f)) {
      seen.add(f)
      files.push(f)
    }
  }
  for (const input of inputs) {
    let stat: ReturnType<typeof statSync> | undefined
    try {
      stat = statSync(input)
    } catch {
      stat = undefined
    }
    if (stat?.isDirectory()) {
      const found: string[] = []
      walk(input, found)
      if (found.length === 0) missing.push({ input, message: `${input}: the directory holds no files` })
      found.forEach(add)
    } else if (stat?.isFile()) add(input)
    else if (GLOB_CHARS.test(input)) {
      const found = globSync(input, { onlyFiles: true, dot: false, expandDirectories: false, absolute: isAbsolute(input) }).sort()
      if (found.length === 0) missing.push({ input, message: `${input}: no file matches this pattern` })
      found.forEach(add)
    } else missing.push({ input, message: `${input}: no such file or directory` })
  }
  return { files, missing }
}
