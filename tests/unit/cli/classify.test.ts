import { spawnSync } from 'node:child_process'
import { copyFileSync, mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, describe, expect, it } from 'vitest'
import { expandInputs, parseCliArgs } from '../../../server/cli/args'

/** The fields of the command's JSON lines that these tests read. */
interface CliLine {
  file: string
  ok: boolean
  code?: string
  error?: string
  read: { hdu: unknown; medium: { why: string } }
  rv: { v: number }
}

const ROOT = process.cwd()
const CORPUS = join(ROOT, 'tests', 'fixtures', 'corpus')
const tsx = join(ROOT, 'node_modules', '.bin', 'tsx')
const run = (...args: string[]) => {
  const r = spawnSync(tsx, ['server/cli/classify.ts', ...args], { cwd: ROOT, encoding: 'utf8', env: { ...process.env, FORCE_COLOR: '0' } })
  return {
    code: r.status,
    stdout: r.stdout,
    stderr: r.stderr,
    lines: r.stdout
      .split('\n')
      .filter((l) => l.startsWith('{'))
      .map((l) => JSON.parse(l) as CliLine),
  }
}
const dir = mkdtempSync(join(tmpdir(), 'classify-cli-'))
afterAll(() => rmSync(dir, { recursive: true, force: true }))

describe('parseCliArgs', () => {
  it('turns the options into reader options and the resolution', () => {
    expect(parseCliArgs(['--', '--fwhm', '2.5', '--medium', 'vacuum', '--unit', 'nm', '--hdu', '2', '--aperture', '3', 'a.fits'])).toEqual({
      read: { assumeVacuum: true, wavelengthUnit: 'nm', hdu: 2, aperture: 3 },
      fwhm: 2.5,
      quiet: false,
      help: false,
      inputs: ['a.fits'],
    })
  })
  it('refuses a wrong value with a message naming the option', () => {
    expect(() => parseCliArgs(['--medium', 'glass'])).toThrow("--medium must be air or vacuum, not 'glass'")
    expect(() => parseCliArgs(['--aperture', '0'])).toThrow("--aperture must be a whole number from 1, not '0'")
    expect(() => parseCliArgs(['--fwhm=-1'])).toThrow("--fwhm must be a resolution in Å between 0 and 100, not '-1'")
    expect(() => parseCliArgs(['--unit', 'furlong'])).toThrow("--unit must be Angstrom, nm, um or m, not 'furlong'")
    expect(() => parseCliArgs(['--frobnicate'])).toThrow(/Unknown option '--frobnicate'/)
  })
})

describe('expandInputs', () => {
  it('walks directories recursively, expands quoted globs, and reports what matches nothing', () => {
    mkdirSync(join(dir, 'expand', 'night2'), { recursive: true })
    for (const f of ['a.fits', 'night2/b.txt', '.hidden.txt']) writeFileSync(join(dir, 'expand', f), 'x')
    const r = expandInputs([join(dir, 'expand'), join(dir, 'expand', '**', '*.txt'), join(dir, 'nothing-*.fits'), join(dir, 'missing.fits')])
    expect(r.files).toEqual([join(dir, 'expand', 'a.fits'), join(dir, 'expand', 'night2', 'b.txt')])
    expect(r.missing.map((m) => m.message)).toEqual([`${join(dir, 'nothing-*.fits')}: no file matches this pattern`, `${join(dir, 'missing.fits')}: no such file or directory`])
  })
})

describe('npm run classify', () => {
  it('prints its usage with --help and exits 0', () => {
    const r = run('--help')
    expect(r.code).toBe(0)
    expect(r.stdout).toMatch(/^usage: npm run classify -- \[options\] FILE\|DIRECTORY\|GLOB/)
    for (const o of ['--fwhm', '--medium air|vacuum', '--hdu N', '--aperture N']) expect(r.stdout).toContain(o)
  })
  it('exits 2 on a wrong option or with no files, and says why on stderr', () => {
    const bad = run('--medium', 'glass', 'x.fits')
    expect(bad.code).toBe(2)
    expect(bad.stderr).toMatch(/^--medium must be air or vacuum, not 'glass'/)
    expect(run().code).toBe(2)
  })
  it('classifies a directory and a glob, one JSON line each with the decisions or the error code, progress and a summary on stderr, exit 1 on a failure', () => {
    mkdirSync(join(dir, 'night', 'blue'), { recursive: true })
    copyFileSync(join(CORPUS, 'two-arm-images.fits'), join(dir, 'night', 'two-arm.fits'))
    copyFileSync(join(CORPUS, 'txt-ipac.tbl'), join(dir, 'night', 'blue', 'ipac.tbl'))
    copyFileSync(join(CORPUS, 'refuse-2d-frame.fits'), join(dir, 'night', 'blue', 'frame.fits'))
    copyFileSync(join(CORPUS, 'txt-plain.txt'), join(dir, 'plain-1.txt'))
    copyFileSync(join(CORPUS, 'txt-csv-header.csv'), join(dir, 'plain-2.txt'))
    const r = run(join(dir, 'night'), join(dir, 'plain-*.txt'))
    expect(r.code).toBe(1)
    expect(r.lines.map((l) => [l.file.slice(dir.length + 1), l.ok, l.code ?? null])).toEqual([
      ['night/blue/frame.fits', false, 'NOT_A_SPECTRUM'],
      ['night/blue/ipac.tbl', true, null],
      ['night/two-arm.fits', true, null],
      ['plain-1.txt', true, null],
      ['plain-2.txt', true, null],
    ])
    const arm = r.lines[2]!
    expect(arm.read.hdu).toEqual({ index: 2, name: 'BLUE', why: 'the first HDU that covers the classification region (HDU 1 (RED) does not)' })
    expect(arm.read.medium.why).toBe("CTYPE1 = 'AWAV' (air, FITS WCS Paper III)")
    // Measured against real standards (each at rest to about ±10 km/s) for a model star: well under the 84 km/s of a medium mistake.
    expect(Math.abs(arm.rv.v)).toBeLessThan(25)
    expect(r.lines[0]!.error).toMatch(/extract a 1-D spectrum first/)
    expect(r.stderr).toMatch(/^classify: \d\/5 files, \d failed — /m)
    expect(r.stderr).toMatch(/^classify: 4 classified, 1 failed \(NOT_A_SPECTRUM 1\) in \d+\.\d s$/m)
  }, 60_000)
  it('applies --medium, --unit, --aperture and --hdu to every file and passes --fwhm to the pipeline', () => {
    const r = run('--medium', 'vacuum', '--fwhm', '2.5', '--aperture', '2', '--quiet', join(CORPUS, 'ms-2ap-default.fits'))
    expect(r.code).toBe(0)
    expect(r.lines[0]).toMatchObject({ ok: true, inputFwhm: 2.5, read: { aperture: { number: 2, of: 2 }, medium: { vacuum: true, why: 'your choice (vacuum)' } } })
    expect(r.stderr).toMatch(/^classify: 1 classified, 0 failed in \d+\.\d s\n$/)
    const hdu = run('--hdu', '1', '--unit', 'nm', join(CORPUS, 'two-arm-images.fits'))
    expect(hdu.code).toBe(1)
    expect(hdu.lines[0]).toMatchObject({ ok: false, code: 'NOT_OPTICAL' })
  }, 60_000)
})
