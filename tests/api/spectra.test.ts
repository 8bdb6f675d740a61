import { createHash } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Campaign, CampaignMember, Spectrum, SpectrumBlob } from '../../server/models'
import { closeDatabase, createTestContext, makeUser, signedInAgent, type TestContext } from '../helpers/context'
import { realA0V, syntheticTextSpectrum, zipOf } from '../helpers/spectra'

let t: TestContext
let campaign: Campaign
let otherCampaign: Campaign
let observer: Awaited<ReturnType<typeof signedInAgent>>
let observerId: number
let seed = Math.floor(Math.random() * 1e6)

beforeAll(async () => {
  t = await createTestContext()
  campaign = await Campaign.create({ code: `T-${Date.now()}`, name: 'Test fields', description: '' })
  otherCampaign = await Campaign.create({ code: `O-${Date.now()}`, name: 'Elsewhere', description: '' })
  const { user, password } = await makeUser('observer')
  observerId = user.id
  await CampaignMember.create({ campaignId: campaign.id, userId: user.id })
  observer = await signedInAgent(t.app, user.email, password)
})
afterAll(async () => {
  await t.close()
  await closeDatabase()
})

const post = (client: typeof observer, campaignId = campaign.id) => client.agent.post('/api/spectra').set('x-csrf-token', client.csrf).field('campaignId', String(campaignId))

describe('POST /api/spectra', () => {
  it('takes the good files of a mixed batch, refuses the bad ones and says why', async () => {
    // Duplicates are judged per campaign; an earlier test may have put the real file into this one.
    const earlier = await Spectrum.findOne({ where: { campaignId: campaign.id, fileSha256: createHash('sha256').update(realA0V()).digest('hex') } })
    const before = await Spectrum.count()
    const res = await post(observer)
      .field('objectName', '')
      .attach('files', realA0V(), 'a0v.fits')
      .attach('files', syntheticTextSpectrum(seed++), 'field-star-017.txt')
      .attach('files', Buffer.from('this is not a spectrum at all\n'), 'notes.txt')
      .attach('files', syntheticTextSpectrum(seed++, { from: 5500, to: 6800 }), 'red-only.csv')
      .expect(200)
    const byFile = Object.fromEntries(res.body.results.map((r: { file: string }) => [r.file, r]))
    expect(byFile['a0v.fits'].outcome).toBe(earlier ? 'duplicate' : 'accepted')
    expect(byFile['field-star-017.txt']).toMatchObject({ outcome: 'accepted', pixels: 2000 })
    expect(byFile['field-star-017.txt'].wavelengthRange[0]).toBeCloseTo(3800, 6)
    expect(byFile['field-star-017.txt'].dispersion).toBeCloseTo(1400 / 1999, 3)
    expect(byFile['field-star-017.txt'].snr).toBeGreaterThan(10)
    expect(byFile['notes.txt'].outcome).toBe('refused')
    expect(byFile['red-only.csv']).toMatchObject({ outcome: 'refused', code: 'NO_COVERAGE' })
    expect(byFile['red-only.csv'].message).toContain('red-only.csv')
    // Refused files leave no trace.
    expect(await Spectrum.count()).toBe(before + (earlier ? 1 : 2))
    const stored = await Spectrum.findByPk(byFile['a0v.fits'].spectrumId ?? earlier?.id)
    expect(stored).toMatchObject({ format: 'fits-table', vacuumConverted: true })
    if (!earlier) expect(stored).toMatchObject({ status: 'received', submittedBy: observerId })
    const blob = await SpectrumBlob.findByPk(stored!.id)
    expect(blob!.raw).toBeNull()
    expect(Buffer.compare(await t.ctx.files.get(blob!.rawKey!), realA0V())).toBe(0)
  })

  it('reports a second upload of the same bytes as a duplicate and stores nothing', async () => {
    const bytes = syntheticTextSpectrum(seed++)
    const first = await post(observer).attach('files', bytes, 'twice.txt').expect(200)
    expect(first.body.results[0].outcome).toBe('accepted')
    const before = await Spectrum.count()
    const second = await post(observer).attach('files', bytes, 'twice-again.txt').expect(200)
    expect(second.body.results[0]).toMatchObject({ outcome: 'duplicate', spectrumId: first.body.results[0].spectrumId })
    expect(await Spectrum.count()).toBe(before)
  })

  it('reads a zip of spectra file by file', async () => {
    const zip = zipOf({ 'night1/a.txt': syntheticTextSpectrum(seed++), 'night1/b.txt': syntheticTextSpectrum(seed++), 'night1/junk.bin': new Uint8Array([1, 2, 3]) })
    const res = await post(observer).attach('files', zip, 'night1.zip').expect(200)
    const outcomes = res.body.results.map((r: { file: string; outcome: string }) => `${r.file}:${r.outcome}`).sort()
    expect(outcomes).toEqual(['night1.zip/night1/a.txt:accepted', 'night1.zip/night1/b.txt:accepted', 'night1.zip/night1/junk.bin:refused'])
  })

  it('uses the form values over the header and validates them', async () => {
    const bad = await post(observer).field('ra', '25:00:00').attach('files', syntheticTextSpectrum(seed++), 'x.txt').expect(422)
    expect(bad.body.error.details.fields.ra).toBeDefined()
    const ok = await post(observer)
      .field('objectName', 'KRF 2231')
      .field('ra', '14:03:12.6')
      .field('dec', '-12:30:36')
      .field('vMag', '9.4')
      .attach('files', syntheticTextSpectrum(seed++), 'y.txt')
      .expect(200)
    const s = await Spectrum.findByPk(ok.body.results[0].spectrumId)
    expect(s).toMatchObject({ objectName: 'KRF 2231', vMag: 9.4 })
    expect(s!.raDeg).toBeCloseTo(210.8025, 6)
    expect(s!.decDeg).toBeCloseTo(-12.51, 6)
  })

  it('refuses a campaign the observer does not belong to', async () => {
    const res = await post(observer, otherCampaign.id).attach('files', syntheticTextSpectrum(seed++), 'z.txt').expect(403)
    expect(res.body.error.code).toBe('forbidden')
  })

  it('refuses a request without files', async () => {
    const res = await post(observer).expect(422)
    expect(res.body.error.code).toBe('no_files')
  })

  it('refuses a request over the per-request limit before reading it', async () => {
    const small = await createTestContext({ UPLOAD_MAX_REQUEST_BYTES: 8192 })
    try {
      const { user, password } = await makeUser('lead')
      const lead = await signedInAgent(small.app, user.email, password)
      const before = await Spectrum.count()
      const res = await lead.agent
        .post('/api/spectra')
        .set('x-csrf-token', lead.csrf)
        .field('campaignId', String(campaign.id))
        .attach('files', syntheticTextSpectrum(seed++), 'one.txt')
        .attach('files', syntheticTextSpectrum(seed++), 'two.txt')
      expect(res.status).toBe(413)
      expect(res.body.error.code).toBe('upload_too_large')
      expect(await Spectrum.count()).toBe(before)
    } finally {
      await small.close()
    }
  })

  it('refuses a file over the size limit with 413 and stores nothing', async () => {
    const small = await createTestContext({ UPLOAD_MAX_BYTES: 4096 })
    try {
      const { user, password } = await makeUser('lead')
      const lead = await signedInAgent(small.app, user.email, password)
      const before = await Spectrum.count()
      const res = await lead.agent.post('/api/spectra').set('x-csrf-token', lead.csrf).field('campaignId', String(campaign.id)).attach('files', syntheticTextSpectrum(seed++), 'big.txt').expect(413)
      expect(res.body.error.code).toBe('upload_limit_file_size')
      expect(await Spectrum.count()).toBe(before)
    } finally {
      await small.close()
    }
  })
})

describe('GET /api/spectra', () => {
  it('shows observers only their own spectra', async () => {
    const other = await makeUser('observer')
    await CampaignMember.create({ campaignId: campaign.id, userId: other.user.id })
    const otherAgent = await signedInAgent(t.app, other.user.email, other.password)
    const mine = await post(observer).attach('files', syntheticTextSpectrum(seed++), 'private.txt').expect(200)
    const id = mine.body.results[0].spectrumId
    const list = await otherAgent.agent.get('/api/spectra').expect(200)
    expect(list.body.items.map((i: { id: number }) => i.id)).not.toContain(id)
    await otherAgent.agent.get(`/api/spectra/${id}`).expect(404)
    await otherAgent.agent.get(`/api/spectra/${id}/data`).expect(404)
  })

  it('pages, sorts and filters on the server', async () => {
    const tag = `KRF ${9000 + seed}`
    for (const name of [`${tag} b`, `${tag} a`, `${tag} c`]) await post(observer).field('objectName', name).attach('files', syntheticTextSpectrum(seed++), `${name}.txt`).expect(200)
    const res = await observer.agent.get(`/api/spectra?pageSize=2&sort=objectName&status=received&q=${encodeURIComponent(tag)}`).expect(200)
    expect(res.body.total).toBe(3)
    expect(res.body.items.map((i: { objectName: string }) => i.objectName)).toEqual([`${tag} a`, `${tag} b`])
    const page2 = await observer.agent.get(`/api/spectra?pageSize=2&page=2&sort=-objectName&q=${encodeURIComponent(tag)}`).expect(200)
    expect(page2.body.items.map((i: { objectName: string }) => i.objectName)).toEqual([`${tag} a`])
    const q = await observer.agent.get(`/api/spectra?q=${encodeURIComponent(`${tag} c`)}`).expect(200)
    expect(q.body.items.map((i: { objectName: string }) => i.objectName)).toEqual([`${tag} c`])
    await observer.agent.get('/api/spectra?sort=password').expect(422)
  })

  it('lets a classifier of the campaign see every spectrum in it', async () => {
    const c = await makeUser('classifier')
    await CampaignMember.create({ campaignId: campaign.id, userId: c.user.id })
    const classifier = await signedInAgent(t.app, c.user.email, c.password)
    const res = await classifier.agent.get(`/api/spectra?campaign=${campaign.id}&pageSize=200`).expect(200)
    expect(res.body.total).toBe(await Spectrum.count({ where: { campaignId: campaign.id } }))
  })
})

describe('GET /api/spectra/:id/data', () => {
  it('sends float32 columns, decimated for an overview and whole when zoomed', async () => {
    const res = await post(observer).attach('files', syntheticTextSpectrum(seed++), 'plot.txt').expect(200)
    const id = res.body.results[0].spectrumId
    const overview = await observer.agent
      .get(`/api/spectra/${id}/data?maxPoints=500`)
      .buffer(true)
      .parse((r, cb) => {
        const chunks: Buffer[] = []
        r.on('data', (c: Buffer) => chunks.push(c))
        r.on('end', () => cb(null, Buffer.concat(chunks)))
      })
      .expect(200)
    const layout = JSON.parse(String(overview.headers['x-series-layout']))
    expect(layout).toMatchObject({ total: 2000, decimated: true, columns: ['wavelength', 'flux', 'error'] })
    expect(layout.points).toBeLessThanOrEqual(500)
    expect((overview.body as Buffer).length).toBe(layout.points * 3 * 4)
    const zoom = await observer.agent.get(`/api/spectra/${id}/data?from=4300&to=4400`).expect(200)
    const z = JSON.parse(String(zoom.headers['x-series-layout']))
    expect(z.decimated).toBe(false)
    expect(z.points).toBeGreaterThan(130)
  })
})

describe('PATCH /api/spectra/:id', () => {
  it('lets the observer correct metadata and keeps the arrays', async () => {
    const res = await post(observer).attach('files', syntheticTextSpectrum(seed++), 'fixme.txt').expect(200)
    const id = res.body.results[0].spectrumId
    const blobBefore = await SpectrumBlob.findByPk(id)
    const patched = await observer.agent.patch(`/api/spectra/${id}`).set('x-csrf-token', observer.csrf).send({ objectName: 'KRF 0042', parallaxMas: 4.2 }).expect(200)
    expect(patched.body.spectrum).toMatchObject({ objectName: 'KRF 0042', parallaxMas: 4.2 })
    const blobAfter = await SpectrumBlob.findByPk(id)
    expect(Buffer.compare(blobBefore!.flux, blobAfter!.flux)).toBe(0)
  })

  it('clears a number given as null and leaves one sent empty or not at all', async () => {
    const res = await post(observer).field('vMag', '8.3').field('ebv', '0.12').field('parallaxMas', '2.5').attach('files', syntheticTextSpectrum(seed++), 'clear.txt').expect(200)
    const id = res.body.results[0].spectrumId
    const before = await Spectrum.findByPk(id)
    expect(before).toMatchObject({ vMag: 8.3, parallaxMas: 2.5 })
    expect(before!.ebv).toBeCloseTo(0.12, 6)

    const patched = await observer.agent.patch(`/api/spectra/${id}`).set('x-csrf-token', observer.csrf).send({ vMag: null, ebv: '', notes: 'cloud at the end' }).expect(200)
    expect(patched.body.spectrum.vMag).toBeNull()
    expect(patched.body.spectrum.ebv).toBeCloseTo(0.12, 6)
    expect(patched.body.spectrum.parallaxMas).toBe(2.5)

    const after = await Spectrum.findByPk(id)
    expect(after!.vMag).toBeNull()
    expect(after!.ebv).toBeCloseTo(0.12, 6)
    expect(after!.parallaxMas).toBe(2.5)
    expect(after!.notes).toBe('cloud at the end')
  })

  it('still refuses a number out of range rather than clearing it', async () => {
    const res = await post(observer).field('vMag', '9.1').attach('files', syntheticTextSpectrum(seed++), 'range.txt').expect(200)
    const id = res.body.results[0].spectrumId
    const refused = await observer.agent.patch(`/api/spectra/${id}`).set('x-csrf-token', observer.csrf).send({ vMag: 99 }).expect(422)
    expect(refused.body.error.details).toBeTruthy()
    expect((await Spectrum.findByPk(id))!.vMag).toBe(9.1)
  })
})
