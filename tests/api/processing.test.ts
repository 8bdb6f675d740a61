import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { claimJobs, loadJob, storeOutput } from '../../server/jobs/process'
import { withRetry } from '../../server/lib/db-errors'
import runTask from '../../server/jobs/worker'
import { Campaign, CampaignMember, LineMeasurementRow, Measurement, ProcessingJob, Spectrum } from '../../server/models'
import { closeDatabase, createTestContext, makeUser, signedInAgent, type TestContext } from '../helpers/context'
import { startProcessing, type TestProcessing } from '../helpers/processing'
import { syntheticTextSpectrum } from '../helpers/spectra'
import { DEMO_ENTRIES, demoFits, demoObservation } from '../../server/db/demo-spectra'
import { ensureDefaultLibrary } from '../../server/services/standards.service'

let t: TestContext
let runner: TestProcessing
let client: Awaited<ReturnType<typeof signedInAgent>>
let campaign: Campaign
let seed = 10_000 + Math.floor(Math.random() * 1e6)

beforeAll(async () => {
  t = await createTestContext()
  runner = await startProcessing(t.ctx)
  campaign = await Campaign.create({ code: `P-${Date.now()}`, name: 'Processing', description: '' })
  const { user, password } = await makeUser('observer')
  await CampaignMember.create({ campaignId: campaign.id, userId: user.id })
  client = await signedInAgent(t.app, user.email, password)
})
afterAll(async () => {
  await runner.stop()
  await t.close()
  await closeDatabase()
})

async function submit(bytes: Buffer, name: string): Promise<number> {
  const res = await client.agent.post('/api/spectra').set('x-csrf-token', client.csrf).field('campaignId', String(campaign.id)).field('resolutionFwhm', '3').attach('files', bytes, name).expect(200)
  expect(res.body.results[0].outcome).toBe('accepted')
  return res.body.results[0].spectrumId
}

describe(`processing off the request path (${process.env.QUEUE ?? 'database'} queue, ${process.env.STORAGE_DRIVER ?? 'local'} files)`, () => {
  it('measures an accepted upload and moves it from received to measured', async () => {
    const id = await submit(syntheticTextSpectrum(seed++), 'measure-me.txt')
    await runner.idle()
    const s = await Spectrum.findByPk(id)
    expect(s!.status).not.toBe('received')
    const m = await Measurement.findOne({ where: { spectrumId: id, isCurrent: true } })
    expect(m).not.toBeNull()
    expect(await LineMeasurementRow.count({ where: { measurementId: m!.id } })).toBeGreaterThan(10)
    const detail = await client.agent.get(`/api/spectra/${id}`).expect(200)
    expect(detail.body.measurements.current.lines.find((l: { id: string }) => l.id.startsWith('h'))).toBeDefined()
    const prepared = await client.agent.get(`/api/spectra/${id}/prepared?maxPoints=1000`).expect(200)
    expect(JSON.parse(String(prepared.headers['x-series-layout'])).columns).toEqual(['wavelength', 'flux', 'continuum', 'rectified'])
  })

  it("shows the pipeline's S/N everywhere once measured: a FITS file without errors, at a known S/N", async () => {
    // Noise added at S/N 60 per 1.1 Å pixel over 4000–5000 Å (demoObservation); the file carries no errors,
    // so the S/N comes from the residual of the best standard.
    await ensureDefaultLibrary(t.ctx.sequelize)
    const target = { ...DEMO_ENTRIES.find((e) => e.mkType === 'G5 III')!, snr: 60 }
    const bytes = demoFits(target, demoObservation(target, seed++), '2026-03-01T02:00:00')
    const id = await submit(bytes, 'known-snr.fits')
    await runner.idle()
    const m = await Measurement.findOne({ where: { spectrumId: id, isCurrent: true } })
    const s = await Spectrum.findByPk(id)
    expect(s!.snr).toBeCloseTo(m!.snr!, 6)
    expect(Math.abs(m!.snr! / 60 - 1)).toBeLessThan(0.25)
    const list = await client.agent.get(`/api/spectra?q=${encodeURIComponent(target.objectName)}`).expect(200)
    expect(list.body.items.find((i: { id: number }) => i.id === id).snr).toBeCloseTo(m!.snr!, 6)
  })

  it('keeps the old measurement in history when a spectrum is measured again', async () => {
    const id = await submit(syntheticTextSpectrum(seed++), 'again.txt')
    await runner.idle()
    await client.agent.post(`/api/spectra/${id}/process`).set('x-csrf-token', client.csrf).expect(202)
    await runner.idle()
    const all = await Measurement.findAll({ where: { spectrumId: id } })
    expect(all).toHaveLength(2)
    expect(all.filter((m) => m.isCurrent)).toHaveLength(1)
  })

  it('picks up a job whose runner died (its lease lapsed) and leaves a job with a live lease alone', async () => {
    const id = await submit(syntheticTextSpectrum(seed++), 'interrupted.txt')
    await runner.idle()
    await runner.stop()
    const past = new Date(Date.now() - 1000)
    const live = new Date(Date.now() + 60_000)
    const lapsed = await ProcessingJob.create({ spectrumId: id, status: 'running', error: null, requestedBy: null, startedAt: past, finishedAt: null, leaseExpiresAt: past })
    const held = await ProcessingJob.create({ spectrumId: id, status: 'running', error: null, requestedBy: null, startedAt: past, finishedAt: null, leaseExpiresAt: live })
    runner = await startProcessing(t.ctx)
    // The held job belongs to a runner that is still alive somewhere: only its lease may return it.
    for (let i = 0; i < 100 && (await lapsed.reload()).status !== 'done'; i++) await new Promise((r) => setTimeout(r, 100))
    expect(lapsed.status).toBe('done')
    expect((await held.reload()).status).toBe('running')
    await held.update({ leaseExpiresAt: past })
    await runner.idle()
    expect((await held.reload()).status).toBe('done')
    expect(await Measurement.count({ where: { spectrumId: id } })).toBe(3)
    expect(await Measurement.count({ where: { spectrumId: id, isCurrent: true } })).toBe(1)
  })

  it('stores a batch processed by several writers at once with no deadlock and no job twice', async () => {
    // Worker threads would make the timing depend on the machine; concurrent writers are what deadlocked.
    await runner.stop()
    const ids: number[] = []
    const files = Array.from({ length: 12 }, (_, i) => ({ name: `batch-${i}.txt`, bytes: syntheticTextSpectrum(seed++) }))
    let req = client.agent.post('/api/spectra').set('x-csrf-token', client.csrf).field('campaignId', String(campaign.id)).field('resolutionFwhm', '3')
    for (const f of files) req = req.attach('files', f.bytes, f.name)
    const res = await req.expect(200)
    for (const r of res.body.results) ids.push(r.spectrumId)
    // Six claimers at once, as six runners would: each job is claimed once.
    const claims = await Promise.all(Array.from({ length: 6 }, () => claimJobs(t.ctx.sequelize, 2, 60_000)))
    const claimed = claims.flat()
    expect(claimed.map((j) => j.spectrumId).sort((a, b) => a - b)).toEqual([...ids].sort((a, b) => a - b))
    const outputs = await Promise.all(claimed.map(async (j) => ({ job: j, output: runTask((await loadJob(j.spectrumId)).input) })))
    await Promise.all(outputs.map(({ job, output }) => storeOutput(t.ctx.sequelize, job, output, undefined)))
    const jobs = await ProcessingJob.findAll({ where: { spectrumId: ids } })
    expect(jobs.map((j) => j.status)).toEqual(ids.map(() => 'done'))
    expect(jobs.every((j) => j.attempts === 1)).toBe(true)
    for (const id of ids) expect(await Measurement.count({ where: { spectrumId: id, isCurrent: true } })).toBe(1)
    runner = await startProcessing(t.ctx)
  })

  it('gives every job back when it stops in the middle of its work, so none waits for a lease to lapse', async () => {
    await runner.stop()
    const ids: number[] = []
    for (let i = 0; i < 3; i++) ids.push(await submit(syntheticTextSpectrum(seed++), `stopped-${i}.txt`))
    // Started and stopped at once: its first claim is still in flight when it is told to stop.
    runner = await startProcessing(t.ctx)
    await runner.stop()
    const statuses = async () => (await ProcessingJob.findAll({ where: { spectrumId: ids }, order: [['id', 'ASC']] })).map((j) => j.status)
    const atStop = await statuses()
    expect(atStop).not.toContain('running')
    // A stopped runner does nothing more: a process that exits now leaves no job held for a lease's length.
    await new Promise((r) => setTimeout(r, 1500))
    expect(await statuses()).toEqual(atStop)
    runner = await startProcessing(t.ctx)
    await runner.idle()
    expect((await ProcessingJob.findAll({ where: { spectrumId: ids } })).map((j) => j.status)).toEqual(['done', 'done', 'done'])
  })
})

describe('withRetry', () => {
  const deadlock = () => Object.assign(new Error('Deadlock found when trying to get lock; try restarting transaction'), { errno: 1213 })

  it('tries again after a deadlock and returns the result', async () => {
    let calls = 0
    const out = await withRetry(
      async () => {
        if (++calls < 3) throw deadlock()
        return 'stored'
      },
      { baseMs: 1 },
    )
    expect(out).toBe('stored')
    expect(calls).toBe(3)
  })

  it('gives up after the last try, and at once on an error that is not transient', async () => {
    let calls = 0
    await expect(
      withRetry(
        async () => {
          calls++
          throw deadlock()
        },
        { tries: 3, baseMs: 1 },
      ),
    ).rejects.toThrow('Deadlock')
    expect(calls).toBe(3)
    calls = 0
    await expect(
      withRetry(
        async () => {
          calls++
          throw new Error('bad row')
        },
        { baseMs: 1 },
      ),
    ).rejects.toThrow('bad row')
    expect(calls).toBe(1)
  })
})
