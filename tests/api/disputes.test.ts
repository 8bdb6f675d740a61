import { randomBytes } from 'node:crypto'
import { Op } from 'sequelize'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Campaign, CampaignMember, Classification, LibraryVersion, MailMessage, Spectrum } from '../../server/models'
import { finalClassificationsFor } from '../../server/services/review.service'
import { closeDatabase, createTestContext, type TestContext } from '../helpers/context'
import { createSuggestedSpectrum, send, signedInPerson, type Person } from '../helpers/review'

let t: TestContext
let library: LibraryVersion
let observer: Person
let alice: Person
let bob: Person
let lead: Person
let carol: Person

const person = (role: 'observer' | 'classifier' | 'lead', name: string) => signedInPerson(t.app, role, name)

/** A suggested spectrum (B8 III) that Alice and Bob called three subtypes apart, so it is disputed. */
async function disputedSpectrum(objectName: string) {
  const campaign = await Campaign.create({ code: `D-${randomBytes(4).toString('hex')}`, name: 'Disputed fields', description: '', callsRequired: 2, typeTolerance: 1, classTolerance: 1 })
  for (const p of [observer, alice, bob, carol]) await CampaignMember.create({ campaignId: campaign.id, userId: p.user.id })
  const { spectrum } = await createSuggestedSpectrum({
    campaignId: campaign.id,
    submittedBy: observer.user.id,
    libraryVersionId: library.id,
    objectName,
    snr: 40,
    instrument: '',
    type: ['B', 'III', 8, 18, 4],
    candidates: '[]',
    votes: '[]',
    flags: '[]',
  })
  await send(alice.client, 'post', `/api/spectra/${spectrum.id}/calls`, { spectralType: 'B8', luminosityClass: 'III', confidence: 2 }).expect(201)
  const res = await send(bob.client, 'post', `/api/spectra/${spectrum.id}/calls`, { spectralType: 'A1', luminosityClass: 'III', confidence: 1, notes: 'Ca II K strong' }).expect(201)
  expect(res.body.outcome).toBe('disputed')
  return { spectrum, disputeId: res.body.dispute.id as number }
}

beforeAll(async () => {
  t = await createTestContext()
  library = await LibraryVersion.create({ name: `dispute-test-${randomBytes(4).toString('hex')}`, description: 'for dispute tests', publishedAt: null, publishedBy: null })
  observer = await person('observer', 'Olive Observer')
  alice = await person('classifier', 'Alice Classifier')
  bob = await person('classifier', 'Bob Classifier')
  lead = await person('lead', 'Lena Lead')
  carol = await person('classifier', 'Carol Classifier')
})
afterAll(async () => {
  await t.close()
  await closeDatabase()
})

describe('GET /api/disputes', () => {
  it('shows an open dispute with the calls side by side', async () => {
    const { spectrum, disputeId } = await disputedSpectrum('Moving group star 3')
    const res = await lead.client.agent.get('/api/disputes?state=open').expect(200)
    const d = res.body.disputes.find((x: { id: number }) => x.id === disputeId)
    expect(d).toMatchObject({ state: 'open', spectrum: { id: spectrum.id, objectName: 'Moving group star 3', status: 'disputed' }, typeSpread: 3, classSpread: 0, typeTolerance: 1, settlement: null })
    expect(d.calls.map((c: { by: { name: string }; spectralType: string }) => [c.by.name, c.spectralType])).toEqual([
      ['Alice Classifier', 'B8 III'],
      ['Bob Classifier', 'A1 III'],
    ])
    expect(d.suggestion.spectralType).toBe('B8 III')
    const settled = await lead.client.agent.get('/api/disputes?state=settled').expect(200)
    expect(settled.body.disputes.map((x: { id: number }) => x.id)).not.toContain(disputeId)
  })

  it('is for leads only', async () => {
    await alice.client.agent.get('/api/disputes').expect(403)
    await observer.client.agent.get('/api/disputes').expect(403)
  })
})

describe('POST /api/disputes/:id/settle', () => {
  it('settles with the lead’s final call and note, mails the observer, and cannot be settled twice', async () => {
    const { spectrum, disputeId } = await disputedSpectrum('Moving group star 9')
    const noNote = await send(lead.client, 'post', `/api/disputes/${disputeId}/settle`, { spectralType: 'B9', luminosityClass: 'III' }).expect(422)
    expect(noNote.body.error.details.fields.note).toBeDefined()
    await send(alice.client, 'post', `/api/disputes/${disputeId}/settle`, { spectralType: 'B9', luminosityClass: 'III', note: 'mine' }).expect(403)
    const badType = await send(lead.client, 'post', `/api/disputes/${disputeId}/settle`, { spectralType: 'B9', luminosityClass: 'X', note: 'typo' }).expect(422)
    expect(badType.body.error.details.fields.luminosityClass).toBeDefined()
    expect((await Spectrum.findByPk(spectrum.id))!.status).toBe('disputed')

    const res = await send(lead.client, 'post', `/api/disputes/${disputeId}/settle`, {
      spectralType: 'B9.5',
      luminosityClass: 'III',
      peculiarities: 'n',
      note: 'He I 4471 and Mg II 4481 about equal; broad lines',
    }).expect(200)
    expect(res.body.dispute).toMatchObject({ state: 'settled', spectrum: { status: 'settled' } })
    expect(res.body.dispute.settlement).toMatchObject({
      source: 'settled',
      spectralType: 'B9.5 III n',
      typeCode: 19.5,
      classCode: 4,
      agreement: 'settled',
      nCalls: 2,
      decidedBy: { name: 'Lena Lead' },
      note: 'He I 4471 and Mg II 4481 about equal; broad lines',
      disputeId,
    })
    expect((await Spectrum.findByPk(spectrum.id))!.status).toBe('settled')
    expect((await finalClassificationsFor([spectrum.id])).get(spectrum.id)).toMatchObject({ source: 'settled', spectralType: 'B9.5 III n' })

    const mail = await MailMessage.findOne({ where: { toAddresses: { [Op.like]: `%${observer.user.email}%` }, subject: 'Moving group star 9 is classified B9.5 III n' } })
    expect(mail).not.toBeNull()
    expect(mail!.text).toContain('A lead settled it')
    expect(mail!.text).toContain(`${t.ctx.config.publicUrl}/spectra/${spectrum.id}`)

    const again = await send(lead.client, 'post', `/api/disputes/${disputeId}/settle`, { spectralType: 'A0', luminosityClass: 'V', note: 'second thoughts' }).expect(409)
    expect(again.body.error.code).toBe('already_settled')
    expect(await Classification.count({ where: { spectrumId: spectrum.id } })).toBe(1)

    const listed = await lead.client.agent.get('/api/disputes?state=settled').expect(200)
    expect(listed.body.disputes.map((x: { id: number }) => x.id)).toContain(disputeId)

    const history = await alice.client.agent.get(`/api/spectra/${spectrum.id}/history`).expect(200)
    expect(history.body.events.map((e: { kind: string }) => e.kind)).toEqual(['upload', 'measurement', 'suggestion', 'call', 'call', 'dispute', 'settled'])
    expect(history.body.events.at(-1)).toMatchObject({ who: { name: 'Lena Lead' } })
  })

  it('answers 404 for a dispute that does not exist', async () => {
    await send(lead.client, 'post', '/api/disputes/999999999/settle', { spectralType: 'A0', luminosityClass: 'V', note: 'none' }).expect(404)
  })
})

describe('POST /api/disputes/:id/answer', () => {
  it('asks a third classifier for a call, and a majority of calls that agree decides', async () => {
    const { spectrum, disputeId } = await disputedSpectrum('Moving group star 21')
    const res = await send(lead.client, 'post', `/api/disputes/${disputeId}/answer`, { action: 'another-call', note: 'A third pair of eyes on the Ca II K line.' }).expect(200)
    expect(res.body.dispute).toMatchObject({ state: 'another-call', action: { kind: 'another-call', by: { name: 'Lena Lead' } } })
    expect((await Spectrum.findByPk(spectrum.id))!.toJSON()).toMatchObject({ status: 'under_review', extraCalls: 1 })

    // Alice and Bob have called; Carol is the third classifier, and the spectrum is in her queue.
    const queue = await carol.client.agent.get('/api/queue').expect(200)
    const item = queue.body.items.find((i: { spectrumId: number }) => i.spectrumId === spectrum.id)
    expect(item.calls).toEqual({ count: 2, needed: 3 })
    const third = await send(carol.client, 'post', `/api/spectra/${spectrum.id}/calls`, { spectralType: 'B9', luminosityClass: 'III', confidence: 2 }).expect(201)
    // B9 agrees with B8 (within one subtype), not with A1: two of three agree.
    expect(third.body.outcome).toBe('agreed')
    expect(third.body.classification).toMatchObject({ nCalls: 3 })
    expect(['B8 III', 'B9 III']).toContain(third.body.classification.spectralType)
    expect((await Spectrum.findByPk(spectrum.id))!.status).toBe('agreed')
  })

  it('reopens the calls so a classifier can correct theirs, which judges them again', async () => {
    const { spectrum, disputeId } = await disputedSpectrum('Moving group star 22')
    await send(lead.client, 'post', `/api/disputes/${disputeId}/answer`, { action: 'reopened', note: 'Bob, look at Hδ again.' }).expect(200)
    expect((await Spectrum.findByPk(spectrum.id))!.status).toBe('under_review')
    const view = await bob.client.agent.get(`/api/spectra/${spectrum.id}/review`).expect(200)
    expect(view.body.canCorrect).toBe(true)
    const fixed = await send(bob.client, 'post', `/api/spectra/${spectrum.id}/calls`, { spectralType: 'B9', luminosityClass: 'III', confidence: 2, correctsCallId: view.body.myCall.id }).expect(201)
    expect(fixed.body.outcome).toBe('agreed')
    const list = await lead.client.agent.get('/api/disputes?state=reopened').expect(200)
    expect(list.body.disputes.map((d: { id: number }) => d.id)).toContain(disputeId)
  })

  it('refuses a second answer, a settlement after it, and answers from anyone but a lead', async () => {
    const { disputeId } = await disputedSpectrum('Moving group star 23')
    await send(alice.client, 'post', `/api/disputes/${disputeId}/answer`, { action: 'reopened', note: 'x' }).expect(403)
    await send(lead.client, 'post', `/api/disputes/${disputeId}/answer`, { action: 'reopened', note: '' }).expect(422)
    await send(lead.client, 'post', `/api/disputes/${disputeId}/answer`, { action: 'another-call', note: 'third call' }).expect(200)
    const again = await send(lead.client, 'post', `/api/disputes/${disputeId}/answer`, { action: 'reopened', note: 'no' }).expect(409)
    expect(['already_answered', 'not_disputed']).toContain(again.body.error.code)
    const settle = await send(lead.client, 'post', `/api/disputes/${disputeId}/settle`, { spectralType: 'B8', luminosityClass: 'III', note: 'x' }).expect(409)
    expect(['already_answered', 'not_disputed']).toContain(settle.body.error.code)
  })
})
