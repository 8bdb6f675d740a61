import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { JobRunner } from '../../server/jobs/runner'
import { createLogger } from '../../server/lib/logger'
import { Campaign, CampaignMember, LineMeasurementRow, Measurement, ProcessingJob, Spectrum } from '../../server/models'
import { closeDatabase, createTestContext, makeUser, signedInAgent, type TestContext } from '../helpers/context'
import { syntheticTextSpectrum } from '../helpers/spectra'

let t: TestContext
let runner: JobRunner
let client: Awaited<ReturnType<typeof signedInAgent>>
let campaign: Campaign
let seed = 10_000 + Math.floor(Math.random() * 1e6)

beforeAll(async () => {
  t = await createTestContext()
  runner = new JobRunner({ sequelize: t.ctx.sequelize, logger: createLogger('silent'), threads: 1, inline: true })
  t.ctx.jobs = runner
  await runner.start()
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

describe('processing off the request path', () => {
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

  it('keeps the old measurement in history when a spectrum is measured again', async () => {
    const id = await submit(syntheticTextSpectrum(seed++), 'again.txt')
    await runner.idle()
    await client.agent.post(`/api/spectra/${id}/process`).set('x-csrf-token', client.csrf).expect(202)
    await runner.idle()
    const all = await Measurement.findAll({ where: { spectrumId: id } })
    expect(all).toHaveLength(2)
    expect(all.filter((m) => m.isCurrent)).toHaveLength(1)
  })

  it('picks up jobs left running by a stopped server', async () => {
    const id = await submit(syntheticTextSpectrum(seed++), 'interrupted.txt')
    await runner.idle()
    await ProcessingJob.create({ spectrumId: id, status: 'running', error: null, requestedBy: null, startedAt: new Date(), finishedAt: null })
    const restarted = new JobRunner({ sequelize: t.ctx.sequelize, logger: createLogger('silent'), threads: 1, inline: true })
    await restarted.start()
    await restarted.idle()
    await restarted.stop()
    expect(await ProcessingJob.count({ where: { spectrumId: id, status: 'running' } })).toBe(0)
    expect(await Measurement.count({ where: { spectrumId: id } })).toBe(2)
  })
})
