import { createHash } from 'node:crypto'
import { readFileSync, readdirSync } from 'node:fs'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { sampleFiles } from './make-samples'

const DIR = join(process.cwd(), 'tests', 'fixtures', 'exports')

describe('the committed export samples', () => {
  it('are what the writers produce now (re-run tests/unit/exports/make-samples.ts after a change)', () => {
    for (const [name, bytes] of Object.entries(sampleFiles())) {
      expect(Buffer.compare(readFileSync(join(DIR, name)), bytes), name).toBe(0)
    }
  })
})

describe('the astropy read-back of the samples (tests/reference/check_exports.py, astropy 5.2.1)', () => {
  const report = JSON.parse(readFileSync(join(process.cwd(), 'tests', 'reference', 'out', 'exports_check.json'), 'utf8')) as {
    astropy: string
    samplesSha256: string
    ok: boolean
    checks: Array<{ file: string; ok: boolean; valuesCompared: number; problems: string[] }>
  }

  it('was made from the committed samples', () => {
    const h = createHash('sha256')
    for (const name of readdirSync(DIR).sort()) {
      if (name.endsWith('.ts') || name.endsWith('.md')) continue
      h.update(Buffer.concat([Buffer.from(name + '\0'), readFileSync(join(DIR, name))]))
    }
    expect(report.samplesSha256).toBe(h.digest('hex'))
  })

  it('found every column, unit, UCD and value of every format as written', () => {
    expect(report.astropy).toMatch(/^\d+\.\d+/)
    const files = report.checks.map((c) => c.file)
    for (const stem of ['catalogue', 'types']) {
      for (const f of [`${stem}.vot`, `${stem}.fits`, `${stem}.csv`, `${stem}.ecsv`, `${stem}.mrt.txt`, `${stem}.dat + ${stem}.ReadMe`]) expect(files).toContain(f)
    }
    for (const c of report.checks) {
      expect(c.problems, c.file).toEqual([])
      expect(c.valuesCompared, c.file).toBeGreaterThan(10)
    }
    expect(report.ok).toBe(true)
  })
})
