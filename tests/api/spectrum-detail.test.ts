import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Campaign, CampaignMember, Measurement, Spectrum, Suggestion } from '../../server/models'
import { ensureDefaultLibrary } from '../../server/services/standards.service'
import { closeDatabase, createTestContext, makeUser, signedInAgent, type TestContext } from '../helpers/context'
import { syntheticTextSpectrum } from '../helpers/spectra'

let t: TestContext
let spectrumId: number
let classifier: Awaited<ReturnType<typeof signedInAgent>>
let observer: Awaited<ReturnType<typeof signedInAgent>>

beforeAll(async () => {
  t = await createTestContext()
  const campaign = await Campaign.create({ code: `B-${Date.now()}`, name: 'Blind fields', description: '', blindReview: true, callsRequired: 1 })
  const o = await makeUser('observer')
  const c = await makeUser('classifier')
  for (const u of [o.user, c.user]) await CampaignMember.create({ campaignId: campaign.id, userId: u.id })
  observer = await signedInAgent(t.app, o.user.email, o.password)
  classifier = await signedInAgent(t.app, c.user.email, c.password)
  const res = await observer.agent
    .post('/api/spectra')
    .set('x-csrf-token', observer.csrf)
    .field('campaignId', String(campaign.id))
    .attach('files', syntheticTextSpectrum(Date.now() % 100000), 'blind.txt')
    .expect(200)
  spectrumId = res.body.results[0].spectrumId
  // A suggestion written directly, as the job runner would, so this file does not depend on the matcher.
  const version = await ensureDefaultLibrary(t.ctx.sequelize)
  const measurement = await Measurement.create({
    spectrumId,
    pipelineVersion: 'test',
    isCurrent: true,
    snr: 50,
    rv: 0,
    rvError: 1,
    pseudoContinuum: false,
    warnings: '[]',
    ratios: '[]',
    gridStart: 3700,
    gridStep: 1e-4,
    gridLength: 1,
    flux: Buffer.alloc(4),
    continuum: Buffer.alloc(4),
    rectified: Buffer.alloc(4),
    mask: Buffer.alloc(1),
    seconds: 0,
  })
  await Suggestion.create({
    spectrumId,
    measurementId: measurement.id,
    libraryVersionId: version.id,
    pipelineVersion: 'test',
    isCurrent: true,
    spectralType: 'A2 V',
    letter: 'A',
    subtype: 2,
    typeCode: 22,
    luminosityClass: 'V',
    classCode: 6,
    uncertaintySubtypes: 1,
    uncertaintyClasses: 0.5,
    bestStandardId: null,
    candidates: '[]',
    votes: '[]',
    flags: '[]',
    probabilities: '[]',
  })
  await Spectrum.update({ status: 'suggested' }, { where: { id: spectrumId } })
})
afterAll(async () => {
  await t.close()
  await closeDatabase()
})

describe('GET /api/spectra/:id under blind review', () => {
  it('withholds the suggestion from a classifier who has not called yet', async () => {
    const res = await classifier.agent.get(`/api/spectra/${spectrumId}`).expect(200)
    expect(res.body.suggestions).toEqual({ current: null, history: [], hidden: true })
    expect(JSON.stringify(res.body)).not.toContain('A2 V')
    const derived = await classifier.agent.get(`/api/spectra/${spectrumId}/derived`).expect(200)
    expect(derived.body.derived.basis).toBeNull()
  })

  it('derives parameters from the suggestion for the observer before any decision', async () => {
    // The observer is no classifier; blind review does not apply to them.
    const res = await observer.agent.get(`/api/spectra/${spectrumId}/derived`).expect(200)
    expect(res.body.derived.basis.source).toBe('suggestion')
  })

  it('shows the suggestion once the classifier has recorded a call', async () => {
    await classifier.agent
      .post(`/api/spectra/${spectrumId}/calls`)
      .set('x-csrf-token', classifier.csrf)
      .send({ spectralType: 'A3', luminosityClass: 'V', notes: '', confidence: 2, acceptedSuggestion: false })
      .expect(201)
    const res = await classifier.agent.get(`/api/spectra/${spectrumId}`).expect(200)
    expect(res.body.suggestions.hidden).toBe(false)
    expect(res.body.suggestions.current.spectralType).toBe('A2 V')
  })

  it('gives the observer the final classification in the list', async () => {
    const res = await observer.agent.get('/api/spectra?q=blind.txt').expect(200)
    const item = res.body.items.find((i: { id: number }) => i.id === spectrumId)
    expect(item.status).toBe('agreed')
    expect(item.classification).toMatchObject({ spectralType: 'A3 V', source: 'consensus' })
  })
})
