import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { JobRunner } from '../../server/jobs/runner'
import { createLogger } from '../../server/lib/logger'
import { Campaign, CampaignMember, LibraryVersion, LibraryVersionStandard, Spectrum, Standard, Suggestion } from '../../server/models'
import { ensureDefaultLibrary } from '../../server/services/standards.service'
import { closeDatabase, createTestContext, makeUser, signedInAgent, type TestContext } from '../helpers/context'
import { realA0V } from '../helpers/spectra'

let t: TestContext
let runner: JobRunner
let lead: Awaited<ReturnType<typeof signedInAgent>>
let classifier: Awaited<ReturnType<typeof signedInAgent>>
let observer: Awaited<ReturnType<typeof signedInAgent>>
let campaign: Campaign
let spectrumId: number

beforeAll(async () => {
  t = await createTestContext()
  const base = await ensureDefaultLibrary(t.ctx.sequelize)
  // The dev database is shared between runs: start from the shipped version with no standards made from uploads.
  await Standard.update({ retiredAt: new Date() }, { where: { source: 'observed', templateId: null, retiredAt: null } })
  await LibraryVersion.update({ isActive: false }, { where: {} })
  // Through the table, not the instance: the instance may already think it is active and skip the write.
  await LibraryVersion.update({ isActive: true }, { where: { id: base.id } })
  runner = new JobRunner({ sequelize: t.ctx.sequelize, logger: createLogger('silent'), threads: 1, inline: true })
  t.ctx.jobs = runner
  await runner.start()
  campaign = await Campaign.create({ code: `S-${Date.now()}`, name: 'Standards', description: '' })
  for (const role of ['lead', 'classifier', 'observer'] as const) {
    const { user, password } = await makeUser(role)
    await CampaignMember.create({ campaignId: campaign.id, userId: user.id })
    const agent = await signedInAgent(t.app, user.email, password)
    if (role === 'lead') lead = agent
    else if (role === 'classifier') classifier = agent
    else observer = agent
  }
  // The real A0 V standard (HST CALSPEC spectrum; type A0 V is common practice), resolution ≈ 5.5 Å.
  const res = await lead.agent
    .post('/api/spectra')
    .set('x-csrf-token', lead.csrf)
    .field('campaignId', String(campaign.id))
    .field('resolutionFwhm', '5.5')
    .attach('files', realA0V(), `a0v-${Date.now()}.fits`)
    .expect(200)
  spectrumId = res.body.results[0].spectrumId
  await runner.idle()
  // A file seen before names the earlier copy: process it again so it is suggested against this version.
  await lead.agent.post(`/api/spectra/${spectrumId}/process`).set('x-csrf-token', lead.csrf)
  await runner.idle()
}, 120_000)
afterAll(async () => {
  await runner.stop()
  await t.close()
  await closeDatabase()
})

describe('processing with the standards library', () => {
  it('ends an upload with a current suggestion and the status suggested', async () => {
    const s = await Spectrum.findByPk(spectrumId)
    expect(s!.status).toBe('suggested')
    const current = await Suggestion.findAll({ where: { spectrumId, isCurrent: true } })
    expect(current).toHaveLength(1)
    expect(Math.abs(current[0]!.typeCode - 20)).toBeLessThanOrEqual(1)
    expect(current[0]!.classCode).toBeGreaterThanOrEqual(5.5)
    const active = await LibraryVersion.findOne({ where: { isActive: true } })
    expect(current[0]!.libraryVersionId).toBe(active!.id)
    expect(JSON.parse(current[0]!.candidates)).toHaveLength(5)
    // The resolution given on upload is the one it was matched at (its level), and the details say so.
    const details = JSON.parse(current[0]!.details!)
    expect(details.resolution).toMatchObject({ fwhm: 5.5, source: 'given' })
    expect(details.resolution.level).toBeGreaterThanOrEqual(5.5)
    // The spectroscopic Teff beside the calibration one: an A0 V star is near 9700 K (Pecaut & Mamajek
    // 2013 dwarf table, from memory; REFERENCE.md).
    const derived = await lead.agent.get(`/api/spectra/${spectrumId}/derived`).expect(200)
    const teff = derived.body.derived.spectroscopic.teff
    expect(Math.abs(teff.value - 9700)).toBeLessThan(1200)
  })
})

describe('GET /api/standards', () => {
  it('lists versions and standards for leads and classifiers, not observers', async () => {
    const res = await classifier.agent.get('/api/standards').expect(200)
    expect(res.body.activeVersionId).not.toBeNull()
    const shipped = res.body.versions.find((v: { name: string }) => v.name === 'observed-v2')
    expect(shipped.standardCount).toBeGreaterThanOrEqual(300)
    // Every shipped standard names its star and its library (templates/observed-v2/manifest.json).
    const templates = res.body.standards.filter((s: { templateId: string | null; retiredAt: string | null }) => s.templateId !== null && s.retiredAt === null)
    expect(templates.length).toBe(shipped.standardCount)
    const a0v = templates.find((s: { templateId: string }) => s.templateId === 'miles-m0166')
    expect(a0v).toMatchObject({ star: 'HD031295', spectralType: 'A0 V', origin: 'MILES stellar library v9.1', resolutionFwhm: 2.5 })
    await observer.agent.get('/api/standards').expect(403)
  })

  it('serves a shipped standard as float32 columns', async () => {
    const std = await Standard.findOne({ where: { templateId: 'miles-m0166' } })
    const res = await classifier.agent
      .get(`/api/standards/${std!.id}/data`)
      .buffer(true)
      .parse((r, cb) => {
        const chunks: Buffer[] = []
        r.on('data', (c: Buffer) => chunks.push(c))
        r.on('end', () => cb(null, Buffer.concat(chunks)))
      })
      .expect(200)
    const layout = JSON.parse(String(res.headers['x-series-layout']))
    expect(layout.columns).toEqual(['wavelength', 'rectified'])
    expect((res.body as Buffer).length).toBe(layout.points * 2 * 4)
  })
})

describe('POST /api/standards and /api/standards/versions', () => {
  it('refuses classifiers and bad MK notation', async () => {
    await classifier.agent.post('/api/standards').set('x-csrf-token', classifier.csrf).send({ spectrumId, spectralType: 'A0', luminosityClass: 'V', note: 'x' }).expect(403)
    const bad = await lead.agent.post('/api/standards').set('x-csrf-token', lead.csrf).send({ spectrumId, spectralType: 'A0', luminosityClass: 'XI', note: 'x' }).expect(422)
    expect(bad.body.error.code).toBe('invalid_classification')
    await lead.agent.post('/api/standards').set('x-csrf-token', lead.csrf).send({ spectrumId, spectralType: 'A0', luminosityClass: 'V' }).expect(422)
  })

  it('adds an observed standard to a new version, retires it, and re-suggests keeping history', async () => {
    const added = await lead.agent
      .post('/api/standards')
      .set('x-csrf-token', lead.csrf)
      .send({ spectrumId, spectralType: 'A0', luminosityClass: 'V', note: 'MK primary standard (common practice)' })
      .expect(201)
    expect(added.body.standard.spectralType).toBe('A0 V')
    expect(added.body.standard.source).toBe('observed')
    const row = await Standard.findByPk(added.body.standard.id)
    expect(row!.rectified!.length).toBe(6376 * 4)

    const name = `v-${Date.now()}`
    const pub = await lead.agent.post('/api/standards/versions').set('x-csrf-token', lead.csrf).send({ name, description: 'with an observed A0 V' }).expect(201)
    expect(pub.body.version.isActive).toBe(true)
    const members = (await LibraryVersionStandard.findAll({ where: { versionId: pub.body.version.id } })).map((l) => l.standardId)
    const shippedA0V = await Standard.findOne({ where: { templateId: 'miles-m0166' } })
    expect(members).toContain(added.body.standard.id)
    expect(members).toContain(shippedA0V!.id)
    expect(await LibraryVersion.count({ where: { isActive: true } })).toBe(1)

    const before = await Suggestion.count({ where: { spectrumId } })
    // The dev database may already hold this file, in which case the upload names the earlier copy.
    const own = await Spectrum.findByPk(spectrumId)
    const re = await lead.agent.post(`/api/campaigns/${own!.campaignId}/resuggest`).set('x-csrf-token', lead.csrf).expect(202)
    expect(re.body.queued).toBeGreaterThanOrEqual(1)
    await runner.idle()
    const all = await Suggestion.findAll({ where: { spectrumId }, order: [['id', 'ASC']] })
    expect(all.length).toBe(before + 1)
    expect(all.filter((s) => s.isCurrent)).toHaveLength(1)
    const latest = all[all.length - 1]!
    expect(latest.isCurrent).toBe(true)
    expect(latest.libraryVersionId).toBe(pub.body.version.id)
    // The spectrum is its own standard now: the observed A0 V is the nearest.
    expect(latest.bestStandardId).toBe(added.body.standard.id)

    const retired = await lead.agent.post(`/api/standards/${added.body.standard.id}/retire`).set('x-csrf-token', lead.csrf).expect(200)
    expect(retired.body.standard.retiredAt).not.toBeNull()
    await lead.agent.post(`/api/standards/${added.body.standard.id}/retire`).set('x-csrf-token', lead.csrf).expect(409)
    const next = await lead.agent
      .post('/api/standards/versions')
      .set('x-csrf-token', lead.csrf)
      .send({ name: `${name}-b`, description: '' })
      .expect(201)
    const nextMembers = (await LibraryVersionStandard.findAll({ where: { versionId: next.body.version.id } })).map((l) => l.standardId)
    expect(nextMembers).not.toContain(added.body.standard.id)
    expect(nextMembers).toContain(shippedA0V!.id)
    await classifier.agent.post(`/api/campaigns/${campaign.id}/resuggest`).set('x-csrf-token', classifier.csrf).expect(403)
  }, 120_000)
})
