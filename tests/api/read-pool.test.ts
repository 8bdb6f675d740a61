import { monitorEventLoopDelay, performance } from 'node:perf_hooks'
import { setTimeout as sleep } from 'node:timers/promises'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ReadPool, readUpload } from '../../server/jobs/reading'
import { Campaign, CampaignMember, Spectrum } from '../../server/models'
import { closeDatabase, createTestContext, makeUser, signedInAgent, type TestContext } from '../helpers/context'
import { syntheticTextSpectrum, zipOf } from '../helpers/spectra'

const MB = 1024 * 1024
let t: TestContext
let campaign: Campaign
let observer: Awaited<ReturnType<typeof signedInAgent>>

beforeAll(async () => {
  t = await createTestContext()
  campaign = await Campaign.create({ code: `RP-${Date.now()}`, name: 'Read pool', description: '' })
  const o = await makeUser('observer')
  await CampaignMember.create({ campaignId: campaign.id, userId: o.user.id })
  observer = await signedInAgent(t.app, o.user.email, o.password)
}, 60_000)
afterAll(async () => {
  await t.close()
  await closeDatabase()
})

describe('reading uploads in the read pool', () => {
  it('unpacks and reads a multi-MB zip in its threads while the request thread keeps answering', async () => {
    // Two text spectra of 400 000 pixels (about 10 MB each): seconds of parsing between them.
    const files = { 'blue.txt': syntheticTextSpectrum(Date.now(), { pixels: 400_000 }), 'red.txt': syntheticTextSpectrum(Date.now() + 1, { pixels: 400_000, from: 4000, to: 5400 }) }
    const zip = zipOf(files)
    expect(zip.length).toBeGreaterThan(4 * MB)
    // For scale: how long this thread would be held reading one of them itself.
    const start = performance.now()
    const here = await readUpload('blue.txt', { bytes: files['blue.txt'] }, { maxBytes: t.ctx.config.UPLOAD_MAX_BYTES, maxPixels: t.ctx.config.UPLOAD_MAX_PIXELS })
    const oneReadMs = performance.now() - start
    expect(here.read.ok).toBe(true)

    const pool = t.ctx.reading as ReadPool
    const tasksBefore = pool.completed
    const loop = monitorEventLoopDelay({ resolution: 10 })
    loop.enable()
    let finished = false
    const upload = observer.agent
      .post('/api/spectra')
      .set('x-csrf-token', observer.csrf)
      .field('campaignId', String(campaign.id))
      .attach('files', zip, 'night.zip')
      .then((res) => {
        finished = true
        return res
      })
    const health: number[] = []
    while (!finished) {
      const asked = performance.now()
      const res = await observer.agent.get('/api/health')
      expect(res.status).toBe(200)
      health.push(performance.now() - asked)
      await sleep(25)
    }
    const res = await upload
    loop.disable()
    const loopMaxMs = loop.max / 1e6
    console.log(
      `one read on the calling thread: ${oneReadMs.toFixed(0)} ms; during the upload: ${health.length} health answers, slowest ${Math.max(...health).toFixed(0)} ms, longest event-loop stall ${loopMaxMs.toFixed(0)} ms; pool tasks ${pool.completed - tasksBefore}`,
    )

    expect(res.status).toBe(200)
    const results = res.body.results as Array<{ file: string; outcome: string; spectrumId: number; pixels: number }>
    expect(results.map((r) => [r.file, r.outcome, r.pixels])).toEqual([
      ['night.zip/blue.txt', 'accepted', 400_000],
      ['night.zip/red.txt', 'accepted', 400_000],
    ])
    expect(await Spectrum.count({ where: { campaignId: campaign.id } })).toBe(2)
    // The archive and both files went through the pool's threads: one unzip and two reads.
    expect(pool.completed - tasksBefore).toBe(3)
    // The request thread answered throughout; a generous bound, well under what one read holds a thread.
    expect(health.length).toBeGreaterThan(2)
    expect(Math.max(...health)).toBeLessThan(Math.max(1000, oneReadMs))
  }, 120_000)

  it('gives the same answer as reading on the calling thread, refusals included', async () => {
    const pool = t.ctx.reading as ReadPool
    const options = { maxBytes: t.ctx.config.UPLOAD_MAX_BYTES, maxPixels: t.ctx.config.UPLOAD_MAX_PIXELS, minPixels: t.ctx.config.UPLOAD_MIN_PIXELS }
    for (const [name, bytes] of [
      ['fine.txt', syntheticTextSpectrum(7)],
      ['short.txt', syntheticTextSpectrum(8, { pixels: 20 })],
      ['noise.fits', Buffer.from('SIMPLE  = not really a FITS file')],
    ] as const) {
      const here = await readUpload(name, { bytes: Buffer.from(bytes) }, options)
      const there = await pool.read(name, { bytes: Buffer.from(bytes) }, options)
      expect(there.sha256).toBe(here.sha256)
      expect(there.size).toBe(bytes.length)
      expect(Buffer.from(there.bytes!).equals(bytes)).toBe(true)
      expect(there.read.ok).toBe(here.read.ok)
      if (here.read.ok && there.read.ok) {
        expect(there.read.row).toEqual(here.read.row)
        expect(there.read.blob.wavelength.equals(here.read.blob.wavelength)).toBe(true)
        expect(there.read.blob.flux.equals(here.read.blob.flux)).toBe(true)
      } else expect(there.read).toEqual(here.read)
    }
  }, 60_000)
})
