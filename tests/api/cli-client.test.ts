import { spawn } from 'node:child_process'
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Spectrum, type Campaign } from '../../server/models'
import { createToken } from '../../server/services/tokens.service'
import { closeDatabase, createTestContext, makeUser, type TestContext } from '../helpers/context'
import { startServer, type RunningServer } from '../helpers/server'
import { syntheticTextSpectrum } from '../helpers/spectra'
import { makeCampaign } from '../helpers/world'

let t: TestContext
let server: RunningServer
let campaign: Campaign
let token: string
let dir: string
const GOOD = 6

beforeAll(async () => {
  t = await createTestContext()
  server = await startServer({ WORKERS: '1' })
  const { user } = await makeUser('observer', { name: 'Pipeline Observer' })
  campaign = await makeCampaign('cli', [{ user } as never])
  token = (await createToken(user, { name: 'test pipeline', expiresInDays: null })).secret
  dir = mkdtempSync(join(tmpdir(), 'lineweight-cli-'))
  // Large enough (about 1.2 MB each) that the batch is still going when it is interrupted.
  for (let i = 0; i < GOOD; i++) writeFileSync(join(dir, `star-${i}.txt`), syntheticTextSpectrum(1000 + i, { pixels: 40_000 }))
  writeFileSync(join(dir, 'notes.txt'), 'observing log: clouds after midnight\n')
}, 120_000)
afterAll(async () => {
  await server?.stop()
  rmSync(dir, { recursive: true, force: true })
  await t.close()
  await closeDatabase()
})

interface Run {
  code: number | null
  stdout: string
  stderr: string
}

/** Runs the client in its own process group; `stopWhen` kills the whole group once stdout matches. */
function lineweight(args: string[], stopWhen?: RegExp): Promise<Run> {
  const child = spawn('node_modules/.bin/tsx', ['cli/lineweight.ts', ...args], {
    env: { ...process.env, LINEWEIGHT_URL: server.url, LINEWEIGHT_TOKEN: token },
    detached: true,
    stdio: ['ignore', 'pipe', 'pipe'],
  })
  let stdout = ''
  let stderr = ''
  child.stdout.on('data', (d: Buffer) => {
    stdout += d.toString()
    if (stopWhen?.test(stdout) && child.pid) process.kill(-child.pid, 'SIGKILL')
  })
  child.stderr.on('data', (d: Buffer) => (stderr += d.toString()))
  return new Promise((resolve) =>
    child.on('close', (code) => {
      // Once seen in a full run and never alone: if the server is gone, say what it printed before it went.
      if (stderr.includes('Cannot reach')) console.error(`the server is unreachable (exit code ${server.process.exitCode}); its output:\n${server.output()}`)
      resolve({ code, stdout, stderr })
    }),
  )
}

const stored = () => Spectrum.count({ where: { campaignId: campaign.id } })

async function steadyCount(quietMs = 2000, timeoutMs = 30_000): Promise<number> {
  let count = await stored()
  let since = Date.now()
  for (const end = Date.now() + timeoutMs; Date.now() < end && Date.now() - since < quietMs;) {
    await new Promise((r) => setTimeout(r, 200))
    const now = await stored()
    if (now !== count) [count, since] = [now, Date.now()]
  }
  return count
}

describe('npm run lineweight', () => {
  it('submits a batch, is interrupted, and resumes it without sending a file twice', async () => {
    const first = await lineweight(['submit', '--campaign', String(campaign.id), '--parallel', '1', dir], /^accepted\t/m)
    expect(first.code).toBeNull() // killed
    // A file whose body was fully sent before the kill is still stored by the server: count once the count holds.
    const afterInterrupt = await steadyCount()
    expect(afterInterrupt).toBeGreaterThanOrEqual(1)
    expect(afterInterrupt).toBeLessThan(GOOD)

    const second = await lineweight(['submit', '--campaign', String(campaign.id), '--parallel', '3', dir])
    expect(second.code).toBe(1) // the observing log is refused
    const lines = second.stdout.trim().split('\n')
    expect(lines.filter((l) => l.startsWith('skipped\t'))).toHaveLength(afterInterrupt)
    expect(lines.filter((l) => l.startsWith('accepted\t'))).toHaveLength(GOOD - afterInterrupt)
    expect(lines.filter((l) => l.startsWith('refused\t'))).toEqual([expect.stringContaining('notes.txt')])
    expect(second.stderr).toContain(`${GOOD - afterInterrupt} accepted, ${afterInterrupt} already on the server, 0 duplicates, 1 refused, 0 not sent`)
    expect(second.stderr).toMatch(/refused: .*notes\.txt: /)
    expect(await stored()).toBe(GOOD)
    const shas = (await Spectrum.findAll({ where: { campaignId: campaign.id }, attributes: ['fileSha256'] })).map((s) => s.fileSha256)
    expect(new Set(shas).size).toBe(GOOD)
  }, 180_000)

  it('exits 0 when everything is already there', async () => {
    const again = await lineweight(['submit', '--campaign', String(campaign.id), join(dir, 'star-0.txt'), join(dir, 'star-1.txt')])
    expect(again.code).toBe(0)
    expect(again.stdout.split('\n').filter((l) => l.startsWith('skipped\t'))).toHaveLength(2)
  })

  it('reports the campaign and downloads its results as CSV and JSON', async () => {
    const status = await lineweight(['status', '--campaign', String(campaign.id)])
    expect(status.code).toBe(0)
    expect(status.stdout.split('\n')[1]).toMatch(new RegExp(`^${campaign.id}\\t${campaign.code}\\t${GOOD}\\t`))

    const csv = await lineweight(['results', '--campaign', String(campaign.id), '--format', 'csv'])
    expect(csv.code).toBe(0)
    const rows = csv.stdout.trim().split('\n')
    expect(rows[0]).toBe('id,file,object,status,statusReason,snr,spectralType,typeCode,luminosityClass,classCode,decision,decidedAt,submittedAt')
    expect(
      rows
        .slice(1)
        .map((r) => r.split(',')[1])
        .sort(),
    ).toEqual(Array.from({ length: GOOD }, (_, i) => `star-${i}.txt`))

    const json = await lineweight(['results', '--campaign', String(campaign.id), '--format', 'json'])
    expect((JSON.parse(json.stdout) as unknown[]).length).toBe(GOOD)
  })

  it('says what is wrong with the command line or the token, and exits 2', async () => {
    const usage = await lineweight(['results', '--format', 'xml', '--campaign', '1'])
    expect(usage.code).toBe(2)
    expect(usage.stderr).toContain('--format must be csv or json')
    const child = spawn('node_modules/.bin/tsx', ['cli/lineweight.ts', 'status'], {
      env: { ...process.env, LINEWEIGHT_URL: server.url, LINEWEIGHT_TOKEN: 'lw_not-a-token' },
      stdio: ['ignore', 'pipe', 'pipe'],
    })
    let stderr = ''
    child.stderr.on('data', (d: Buffer) => (stderr += d.toString()))
    const code = await new Promise((resolve) => child.on('close', resolve))
    expect(code).toBe(2)
    expect(stderr).toContain('invalid_token')
  })
})
