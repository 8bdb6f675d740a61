import { spawn } from 'node:child_process'
import { createServer, type Server } from 'node:net'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Campaign, CampaignMember, ProcessingJob } from '../../server/models'
import { closeDatabase, createTestContext, makeUser, signedInAgent, type TestContext } from '../helpers/context'
import { freePort, startServer } from '../helpers/server'
import { syntheticTextSpectrum } from '../helpers/spectra'

let held: Server
let busyPort: number

beforeAll(async () => {
  busyPort = await freePort()
  held = createServer()
  await new Promise<void>((resolve) => held.listen(busyPort, '127.0.0.1', resolve))
})
afterAll(async () => {
  await new Promise((resolve) => held.close(resolve))
})

function runToEnd(command: string, args: string[], env: NodeJS.ProcessEnv, timeoutMs = 60_000) {
  return new Promise<{ code: number | null; output: string; ms: number }>((resolve, reject) => {
    const started = Date.now()
    const child = spawn(command, args, { env: { ...process.env, ...env }, stdio: ['ignore', 'pipe', 'pipe'] })
    let output = ''
    child.stdout.on('data', (d: Buffer) => (output += d.toString()))
    child.stderr.on('data', (d: Buffer) => (output += d.toString()))
    const timer = setTimeout(() => {
      child.kill('SIGKILL')
      reject(new Error(`still running after ${timeoutMs} ms:\n${output}`))
    }, timeoutMs)
    child.on('exit', (code) => {
      clearTimeout(timer)
      resolve({ code, output, ms: Date.now() - started })
    })
  })
}

describe('npm start', () => {
  it('refuses to start when its port is taken, naming it, before starting anything', async () => {
    const res = await runToEnd(process.execPath, ['scripts/start.mjs'], { PORT: String(busyPort), MANAGE_DB: '0' })
    expect(res.code).toBe(1)
    expect(res.output).toContain(`PORT=${busyPort}`)
    expect(res.output).toMatch(/already in use/)
    expect(res.output).not.toMatch(/is ready/)
    expect(res.output).not.toMatch(/MariaDB listening/)
  })

  it('names every port that is taken', async () => {
    const other = await freePort()
    const second = createServer()
    await new Promise<void>((resolve) => second.listen(other, '127.0.0.1', resolve))
    try {
      const res = await runToEnd(process.execPath, ['scripts/start.mjs'], { PORT: String(busyPort), MANAGE_DB: '0', MAIL_MODE: 'fake', SMTP_PORT: String(other) })
      expect(res.code).toBe(1)
      expect(res.output).toContain(`PORT=${busyPort}`)
      expect(res.output).toContain(`SMTP_PORT=${other}`)
    } finally {
      await new Promise((resolve) => second.close(resolve))
    }
  })
})

describe('the server', () => {
  it('says clearly, without a stack trace, that the mail catcher’s SMTP_PORT is taken', async () => {
    const res = await runToEnd('node_modules/.bin/tsx', ['server/index.ts'], { PORT: String(await freePort()), MAIL_MODE: 'fake', SMTP_PORT: String(busyPort), LOG_LEVEL: 'warn' })
    expect(res.code).toBe(78)
    expect(res.output).toContain(`SMTP_PORT ${busyPort}`)
    expect(res.output).toMatch(/already in use/)
    expect(res.output).not.toMatch(/^\s+at /m)
  })

  it('gives the mail catcher a free port when SMTP_PORT is not set', async () => {
    const { SMTP_PORT: _unset, ...env } = process.env
    const server = await startServer({ ...env, SMTP_PORT: undefined, LOG_LEVEL: 'info' })
    try {
      expect((await fetch(`${server.url}/api/health`)).status).toBe(200)
      expect(server.output()).toMatch(/mail catcher listening on 127\.0\.0\.1:\d+ \(a free port/)
    } finally {
      await server.stop()
    }
  }, 60_000)

  it('says clearly that its PORT is taken, and leaves queued jobs to a server that can start', async () => {
    // A job waiting in the queue (an upload with no runner in this process).
    const t: TestContext = await createTestContext()
    try {
      const campaign = await Campaign.create({ code: `S-${Date.now()}`, name: 'Start', description: '' })
      const { user, password } = await makeUser('observer')
      await CampaignMember.create({ campaignId: campaign.id, userId: user.id })
      const client = await signedInAgent(t.app, user.email, password)
      const upload = await client.agent
        .post('/api/spectra')
        .set('x-csrf-token', client.csrf)
        .field('campaignId', String(campaign.id))
        .attach('files', syntheticTextSpectrum(Date.now() % 1e6), 'waiting.txt')
        .expect(200)
      const spectrumId = upload.body.results[0].spectrumId as number

      const res = await runToEnd('node_modules/.bin/tsx', ['server/index.ts'], { PORT: String(busyPort), LOG_LEVEL: 'warn', SMTP_PORT: '0' })
      expect(res.code).toBe(78)
      expect(res.output).toContain(`PORT ${busyPort}`)
      expect(res.output).not.toMatch(/^\s+at /m)
      // Had it taken the job before finding its port taken, the job would sit "running" until its lease lapsed.
      const job = await ProcessingJob.findOne({ where: { spectrumId } })
      expect(job).toMatchObject({ status: 'queued', leaseExpiresAt: null })
    } finally {
      await t.close()
      await closeDatabase()
    }
  })
})
