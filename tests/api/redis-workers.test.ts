import { spawn, type ChildProcess } from 'node:child_process'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { WORKER_NODE_FLAGS } from '../../scripts/lib/setup.mjs'
import { RedisPublisher } from '../../server/jobs/redis'
import { createLogger } from '../../server/lib/logger'
import { Campaign, CampaignMember, Measurement, ProcessingJob, Suggestion } from '../../server/models'
import { ensureDefaultLibrary } from '../../server/services/standards.service'
import { closeDatabase, createTestContext, makeUser, signedInAgent, type TestContext } from '../helpers/context'
import { syntheticTextSpectrum } from '../helpers/spectra'

// Runs in the Redis pass of `npm test` (QUEUE=redis, with redis-server and the S3 fake started by it).
if (process.env.QUEUE !== 'redis') throw new Error('redis-workers.test.ts needs QUEUE=redis and REDIS_URL; `npm test` runs it in its Redis pass')

interface WorkerProcess {
  child: ChildProcess
  output: () => string
}

function startWorker(): WorkerProcess {
  const child = spawn('node_modules/.bin/tsx', [...WORKER_NODE_FLAGS, 'server/worker.ts'], {
    env: { ...process.env, WORKERS: '1', LOG_LEVEL: 'info', JOB_POLL_SECONDS: '1' },
    detached: true,
    stdio: ['ignore', 'pipe', 'pipe'],
  })
  let out = ''
  child.stdout!.on('data', (d: Buffer) => (out += d.toString()))
  child.stderr!.on('data', (d: Buffer) => (out += d.toString()))
  return { child, output: () => out }
}

async function stopWorker(w: WorkerProcess): Promise<void> {
  if (w.child.pid && w.child.exitCode === null) {
    process.kill(-w.child.pid, 'SIGTERM')
    await new Promise((r) => w.child.once('exit', r))
  }
}

/** The jobs a worker's log says it finished. */
const jobsDoneBy = (w: WorkerProcess) =>
  w
    .output()
    .split('\n')
    .filter((l) => l.includes('"spectrum measured"'))
    .map((l) => Number((JSON.parse(l) as { jobId: number }).jobId))

let t: TestContext
let publisher: RedisPublisher
let workers: WorkerProcess[] = []

beforeAll(async () => {
  t = await createTestContext()
  await ensureDefaultLibrary(t.ctx.sequelize)
  // Nothing else may be left waiting: the count below is of this batch alone.
  await ProcessingJob.update({ status: 'failed', error: 'left over by an earlier test file' }, { where: { status: ['queued', 'running'] } })
  publisher = new RedisPublisher(t.ctx.config.REDIS_URL, createLogger('silent'))
  t.ctx.jobs = publisher
  workers = [startWorker(), startWorker()]
})
afterAll(async () => {
  await Promise.all(workers.map(stopWorker))
  await publisher.close()
  await t.close()
  await closeDatabase()
})

describe('two worker processes on Redis', () => {
  it('share a batch: every job done exactly once, by one of them, and both take part', async () => {
    const campaign = await Campaign.create({ code: `RW-${Date.now()}`, name: 'Redis workers', description: '' })
    const { user, password } = await makeUser('observer')
    await CampaignMember.create({ campaignId: campaign.id, userId: user.id })
    const client = await signedInAgent(t.app, user.email, password)
    const seed = 500_000 + Math.floor(Math.random() * 1e6)
    let req = client.agent.post('/api/spectra').set('x-csrf-token', client.csrf).field('campaignId', String(campaign.id)).field('resolutionFwhm', '3')
    for (let i = 0; i < 24; i++) req = req.attach('files', syntheticTextSpectrum(seed + i), `shared-${i}.txt`)
    const res = await req.expect(200)
    const ids: number[] = res.body.results.map((r: { outcome: string; spectrumId: number }) => {
      expect(r.outcome).toBe('accepted')
      return r.spectrumId
    })
    expect(ids).toHaveLength(24)

    const deadline = Date.now() + 120_000
    while ((await ProcessingJob.count({ where: { spectrumId: ids, status: 'done' } })) < ids.length) {
      if (Date.now() > deadline) throw new Error(`not every job was done within 120 s:\n${workers.map((w) => w.output()).join('\n---\n')}`)
      await new Promise((r) => setTimeout(r, 250))
    }
    const jobs = await ProcessingJob.findAll({ where: { spectrumId: ids } })
    expect(jobs).toHaveLength(ids.length)
    expect(jobs.every((j) => j.status === 'done' && j.attempts === 1)).toBe(true)
    for (const id of ids) {
      expect(await Measurement.count({ where: { spectrumId: id } })).toBe(1)
      expect(await Suggestion.count({ where: { spectrumId: id } })).toBe(1)
    }
    const [a, b] = workers.map(jobsDoneBy) as [number[], number[]]
    expect(a.length).toBeGreaterThan(0)
    expect(b.length).toBeGreaterThan(0)
    expect(a.filter((id) => b.includes(id))).toEqual([])
    expect([...a, ...b].sort((x, y) => x - y)).toEqual(jobs.map((j) => j.id).sort((x, y) => x - y))
  }, 180_000)
})
