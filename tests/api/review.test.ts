import { randomBytes } from 'node:crypto'
import { Op } from 'sequelize'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Campaign, CampaignMember, Classification, Dispute, LibraryVersion, MailMessage, ReviewCall, ReviewClaim, Spectrum } from '../../server/models'
import { CLAIM_MINUTES, queuePlans } from '../../server/services/queue.service'
import { judgeCalls, medianOf } from '../../server/review/consensus'
import { finalClassificationsFor, recordCall } from '../../server/services/review.service'
import { closeDatabase, createTestContext, type TestContext } from '../helpers/context'
import { createSuggestedSpectrum, send, signedInPerson, type Client, type Person } from '../helpers/review'

let t: TestContext
let library: LibraryVersion
let observer: Person
let otherObserver: Person
let alice: Person
let bob: Person
let carol: Person
let outsider: Person
let lead: Person

const person = (role: 'observer' | 'classifier' | 'lead', name: string) => signedInPerson(t.app, role, name)

async function makeCampaign(rules: Partial<Pick<Campaign, 'callsRequired' | 'blindReview' | 'typeTolerance' | 'classTolerance'>>, members: Person[]) {
  const campaign = await Campaign.create({ code: `R-${randomBytes(4).toString('hex')}`, name: 'Review fields', description: '', ...rules })
  for (const m of members) await CampaignMember.create({ campaignId: campaign.id, userId: m.user.id })
  return campaign
}

/** A stored, measured spectrum with a current suggestion, as the pipeline would leave it. */
async function suggestedSpectrum(campaign: Campaign, submitter: Person, options: { objectName?: string; snr?: number; type?: [string, string, number, number, number]; flags?: string[] } = {}) {
  const type = options.type ?? ['B', 'III', 8, 18, 4]
  const [letter, cls, subtype] = type
  return createSuggestedSpectrum({
    campaignId: campaign.id,
    submittedBy: submitter.user.id,
    libraryVersionId: library.id,
    objectName: options.objectName ?? `Field star ${randomBytes(2).toString('hex')}`,
    snr: options.snr ?? 50,
    instrument: 'test spectrograph',
    type,
    candidates: JSON.stringify([{ spectralType: `${letter}${subtype} ${cls}`, chi2: 1.1 }]),
    votes: JSON.stringify([{ criterion: 'He I 4471 / Mg II 4481', vote: `${letter}${subtype}` }]),
    flags: JSON.stringify(options.flags ?? []),
  })
}

const call = (c: Client, id: number, body: object) => send(c, 'post', `/api/spectra/${id}/calls`, { confidence: 2, ...body })

beforeAll(async () => {
  t = await createTestContext()
  library = await LibraryVersion.create({ name: `review-test-${randomBytes(4).toString('hex')}`, description: 'for review tests', publishedAt: null, publishedBy: null })
  observer = await person('observer', 'Olive Observer')
  otherObserver = await person('observer', 'Otto Observer')
  alice = await person('classifier', 'Alice Classifier')
  bob = await person('classifier', 'Bob Classifier')
  carol = await person('classifier', 'Carol Classifier')
  outsider = await person('classifier', 'Oscar Outsider')
  lead = await person('lead', 'Lena Lead')
})
afterAll(async () => {
  await t.close()
  await closeDatabase()
})

describe('the consensus rules', () => {
  it('takes the middle value of an odd number of calls', () => {
    expect(medianOf([18, 20, 19])).toBe(19)
  })

  it('breaks a tie between two calls in favour of the suggestion, else the first call', () => {
    expect(medianOf([18, 19], 19)).toBe(19)
    expect(medianOf([19, 18], 17)).toBe(19)
  })

  it('agrees within tolerance and disputes beyond it', () => {
    const rules = { typeTolerance: 1, classTolerance: 1 }
    const c = (id: number, spectralType: string, typeCode: number, luminosityClass: string, classCode: number) => ({
      id,
      spectralType,
      typeCode,
      luminosityClass,
      classCode,
      acceptedSuggestion: false,
    })
    const agreed = judgeCalls([c(1, 'B8 III', 18, 'III', 4), c(2, 'B9 IV', 19, 'IV', 5)], rules, { typeCode: 19, classCode: 4 })
    expect(agreed).toMatchObject({ outcome: 'agreed', typeSpread: 1, classSpread: 1, agreement: 'within', source: 'consensus' })
    if (agreed.outcome === 'agreed') expect(agreed.consensus.spectralType).toBe('B9 III')
    expect(judgeCalls([c(1, 'B8 III', 18, 'III', 4), c(2, 'A0 III', 20, 'III', 4)], rules)).toMatchObject({ outcome: 'disputed', typeSpread: 2, classSpread: 0 })
    expect(judgeCalls([c(1, 'B8 III', 18, 'III', 4), c(2, 'B8 V', 18, 'V', 6)], rules)).toMatchObject({ outcome: 'disputed', classSpread: 2 })
  })
})

describe('claims', () => {
  it('places a ten-minute claim that hides the item from others, extends on re-claim and lapses by itself', async () => {
    const campaign = await makeCampaign({ callsRequired: 1 }, [observer, alice, bob])
    const { spectrum } = await suggestedSpectrum(campaign, observer)
    const before = Date.now()
    const first = await send(alice.client, 'post', `/api/queue/${spectrum.id}/claim`).expect(200)
    expect(first.body.claim).toMatchObject({ spectrumId: spectrum.id, mine: true, live: true })
    const expires = Date.parse(first.body.claim.expiresAt)
    expect(expires - before).toBeGreaterThanOrEqual(CLAIM_MINUTES * 60_000 - 1000)
    expect(expires - before).toBeLessThanOrEqual(CLAIM_MINUTES * 60_000 + 5000)

    const taken = await send(bob.client, 'post', `/api/queue/${spectrum.id}/claim`).expect(409)
    expect(taken.body.error.code).toBe('claimed')
    expect(taken.body.error.details.by.name).toBe('Alice Classifier')
    const bobQueue = await bob.client.agent.get(`/api/queue?campaign=${campaign.id}`).expect(200)
    expect(bobQueue.body.items.map((i: { spectrumId: number }) => i.spectrumId)).not.toContain(spectrum.id)
    const aliceQueue = await alice.client.agent.get(`/api/queue?campaign=${campaign.id}`).expect(200)
    expect(aliceQueue.body.items.find((i: { spectrumId: number }) => i.spectrumId === spectrum.id).claim.state).toBe('mine')

    await new Promise((r) => setTimeout(r, 20))
    const again = await send(alice.client, 'post', `/api/queue/${spectrum.id}/claim`).expect(200)
    expect(Date.parse(again.body.claim.expiresAt)).toBeGreaterThan(expires)
    expect(again.body.claim.claimedAt).toBe(first.body.claim.claimedAt)

    await ReviewClaim.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { spectrumId: spectrum.id } })
    const lapsed = await bob.client.agent.get(`/api/queue?campaign=${campaign.id}`).expect(200)
    expect(lapsed.body.items.map((i: { spectrumId: number }) => i.spectrumId)).toContain(spectrum.id)
    const bobs = await send(bob.client, 'post', `/api/queue/${spectrum.id}/claim`).expect(200)
    expect(bobs.body.claim.by.id).toBe(bob.user.id)
    expect((await ReviewClaim.findByPk(spectrum.id))!.userId).toBe(bob.user.id)
  })

  it('releases a claim so the item is free again', async () => {
    const campaign = await makeCampaign({ callsRequired: 1 }, [observer, alice, bob])
    const { spectrum } = await suggestedSpectrum(campaign, observer)
    await send(alice.client, 'post', `/api/queue/${spectrum.id}/claim`).expect(200)
    await send(alice.client, 'delete', `/api/queue/${spectrum.id}/claim`).expect(204)
    expect(await ReviewClaim.findByPk(spectrum.id)).toBeNull()
    await send(bob.client, 'post', `/api/queue/${spectrum.id}/claim`).expect(200)
  })

  it('shows another person’s live claim as read-only and refuses their call until it lapses', async () => {
    const campaign = await makeCampaign({ callsRequired: 2 }, [observer, alice, bob])
    const { spectrum } = await suggestedSpectrum(campaign, observer)
    await send(alice.client, 'post', `/api/queue/${spectrum.id}/claim`).expect(200)
    const view = await bob.client.agent.get(`/api/spectra/${spectrum.id}/review`).expect(200)
    expect(view.body.claim).toMatchObject({ mine: false, live: true, by: { name: 'Alice Classifier' } })
    expect(view.body.canCall).toMatchObject({ allowed: false, code: 'claimed' })
    expect(view.body.canCall.reason).toContain('Alice Classifier is working on this spectrum until')
    const refused = await call(bob.client, spectrum.id, { spectralType: 'B8', luminosityClass: 'III' }).expect(409)
    expect(refused.body.error.code).toBe('claimed')
    expect(await ReviewCall.count({ where: { spectrumId: spectrum.id } })).toBe(0)
    await ReviewClaim.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { spectrumId: spectrum.id } })
    await call(bob.client, spectrum.id, { spectralType: 'B8', luminosityClass: 'III' }).expect(201)
  })

  it('measures the seconds spent from the claim when the call does not say', async () => {
    const campaign = await makeCampaign({ callsRequired: 2 }, [observer, alice, bob])
    const { spectrum } = await suggestedSpectrum(campaign, observer)
    await send(alice.client, 'post', `/api/queue/${spectrum.id}/claim`).expect(200)
    await ReviewClaim.update({ claimedAt: new Date(Date.now() - 95_000) }, { where: { spectrumId: spectrum.id } })
    const res = await call(alice.client, spectrum.id, { spectralType: 'B8', luminosityClass: 'III' }).expect(201)
    expect(res.body.call.secondsSpent).toBeGreaterThanOrEqual(95)
    expect(res.body.call.secondsSpent).toBeLessThan(110)
    expect(await ReviewClaim.findByPk(spectrum.id)).toBeNull()
    const given = await call(bob.client, spectrum.id, { spectralType: 'B8', luminosityClass: 'III', secondsSpent: 42 }).expect(201)
    expect(given.body.call.secondsSpent).toBe(42)
  })
})

describe('GET /api/queue', () => {
  it('lists the caller’s campaigns’ suggested spectra, never their own, with calls so far and needed', async () => {
    const campaign = await makeCampaign({ callsRequired: 2 }, [observer, alice, bob])
    const elsewhere = await makeCampaign({ callsRequired: 1 }, [otherObserver])
    const a = await suggestedSpectrum(campaign, observer, { snr: 20, flags: ['low_snr'] })
    const b = await suggestedSpectrum(campaign, observer, { snr: 80, flags: ['emission', 'low_snr'] })
    const own = await suggestedSpectrum(campaign, alice)
    const foreign = await suggestedSpectrum(elsewhere, otherObserver)
    await call(bob.client, a.spectrum.id, { spectralType: 'B8', luminosityClass: 'III' }).expect(201)

    const res = await alice.client.agent.get('/api/queue').expect(200)
    const ids = res.body.items.map((i: { spectrumId: number }) => i.spectrumId)
    expect(ids).toEqual(expect.arrayContaining([a.spectrum.id, b.spectrum.id]))
    expect(ids).not.toContain(own.spectrum.id)
    expect(ids).not.toContain(foreign.spectrum.id)
    const itemA = res.body.items.find((i: { spectrumId: number }) => i.spectrumId === a.spectrum.id)
    expect(itemA).toMatchObject({ objectName: a.spectrum.objectName, snr: 20, flags: ['low_snr'], status: 'under_review', calls: { count: 1, needed: 2 }, claim: { state: 'free' }, hidden: false })
    expect(itemA.campaign).toMatchObject({ id: campaign.id, code: campaign.code })
    expect(itemA.suggestion).toMatchObject({ spectralType: 'B8 III', typeCode: 18, classCode: 4 })

    // Bob has called on a, so it is no longer his to do.
    const bobs = await bob.client.agent.get(`/api/queue?campaign=${campaign.id}`).expect(200)
    expect(bobs.body.items.map((i: { spectrumId: number }) => i.spectrumId)).toEqual([b.spectrum.id, own.spectrum.id])

    const flagged = await alice.client.agent.get(`/api/queue?campaign=${campaign.id}&flags=emission`).expect(200)
    expect(flagged.body.items.map((i: { spectrumId: number }) => i.spectrumId)).toEqual([b.spectrum.id])
    // Common flags are looked up row by row along the order instead: the same answer either way.
    const threshold = queuePlans.commonFlagRows
    queuePlans.commonFlagRows = 1
    try {
      for (const [flags, expected] of [
        ['emission', [b.spectrum.id]],
        ['low_snr', [a.spectrum.id, b.spectrum.id]],
        ['emission,low_snr', [b.spectrum.id]],
      ] as const) {
        const walked = await alice.client.agent.get(`/api/queue?campaign=${campaign.id}&flags=${flags}`).expect(200)
        expect(walked.body.items.map((i: { spectrumId: number }) => i.spectrumId)).toEqual(expected)
        expect(walked.body.waiting).toEqual({ count: expected.length, atLeast: false })
      }
    } finally {
      queuePlans.commonFlagRows = threshold
    }
    const bySnr = await alice.client.agent.get(`/api/queue?campaign=${campaign.id}&order=snr`).expect(200)
    expect(bySnr.body.items.map((i: { spectrumId: number }) => i.spectrumId)).toEqual([b.spectrum.id, a.spectrum.id])
    const snrCut = await alice.client.agent.get(`/api/queue?campaign=${campaign.id}&snrMin=50`).expect(200)
    expect(snrCut.body.items.map((i: { spectrumId: number }) => i.spectrumId)).toEqual([b.spectrum.id])
    const byType = await alice.client.agent.get(`/api/queue?campaign=${campaign.id}&typeFrom=B5&typeTo=B9`).expect(200)
    expect(byType.body.items).toHaveLength(2)
    const noneInRange = await alice.client.agent.get(`/api/queue?campaign=${campaign.id}&typeFrom=A0`).expect(200)
    expect(noneInRange.body.items).toHaveLength(0)
    await alice.client.agent.get('/api/queue?typeFrom=Q7').expect(422)

    const next = await alice.client.agent.get(`/api/queue/next?campaign=${campaign.id}&after=${a.spectrum.id}`).expect(200)
    expect(next.body.item.spectrumId).toBe(b.spectrum.id)
    const last = await alice.client.agent.get(`/api/queue/next?campaign=${campaign.id}&after=${b.spectrum.id}`).expect(200)
    expect(last.body.item).toBeNull()
    const first = await alice.client.agent.get(`/api/queue/next?campaign=${campaign.id}`).expect(200)
    expect(first.body.item.spectrumId).toBe(a.spectrum.id)
  })

  it('pages through every order with `after`, says how many wait, and does not shift when the caller calls meanwhile', async () => {
    const campaign = await makeCampaign({ callsRequired: 2 }, [observer, alice, bob])
    const made = []
    for (const [snr, flags] of [
      [40, []],
      [90, ['emission']],
      [40, ['emission', 'low_snr']],
      [10, []],
      [90, []],
      [60, ['low_snr']],
      [25, []],
    ] as const) {
      made.push((await suggestedSpectrum(campaign, observer, { snr, flags: [...flags] })).spectrum)
    }
    // Equal times and a missing S/N, so the ties and NULLS LAST are exercised.
    await Spectrum.update({ createdAt: made[0]!.createdAt }, { where: { id: made[2]!.id } })
    await Spectrum.update({ snr: null }, { where: { id: made[3]!.id } })
    const rows = await Spectrum.findAll({ where: { id: made.map((m) => m.id) }, attributes: ['id', 'createdAt', 'snr', 'flagCount'] })
    const byTime = (a: Spectrum, b: Spectrum) => a.createdAt.getTime() - b.createdAt.getTime() || a.id - b.id
    // The orders as the queue screen describes them (oldest first; S/N high to low, none last; most flags first).
    const expected = {
      oldest: [...rows].sort(byTime),
      snr: [...rows].sort((a, b) => (a.snr === null ? 1 : 0) - (b.snr === null ? 1 : 0) || (b.snr ?? 0) - (a.snr ?? 0) || a.id - b.id),
      flagged: [...rows].sort((a, b) => b.flagCount - a.flagCount || byTime(a, b)),
    }
    for (const [order, sorted] of Object.entries(expected)) {
      const seen: number[] = []
      let after: number | undefined
      for (let page = 0; page < 10; page++) {
        const res = await alice.client.agent.get(`/api/queue?campaign=${campaign.id}&order=${order}&limit=3${after ? `&after=${after}` : ''}`).expect(200)
        const ids = res.body.items.map((i: { spectrumId: number }) => i.spectrumId)
        expect(res.body.waiting).toEqual(after ? null : { count: 7, atLeast: false })
        seen.push(...ids)
        expect(res.body.more).toBe(seen.length < 7)
        if (!res.body.more) break
        after = ids.at(-1)
      }
      expect(seen, order).toEqual(sorted.map((r) => r.id))
    }

    // Alice calls on the first two of the oldest order: the page after the second still starts at the third.
    const first = await alice.client.agent.get(`/api/queue?campaign=${campaign.id}&limit=2`).expect(200)
    const [one, two] = first.body.items.map((i: { spectrumId: number }) => i.spectrumId)
    for (const id of [one, two]) await call(alice.client, id, { spectralType: 'B8', luminosityClass: 'III' }).expect(201)
    const second = await alice.client.agent.get(`/api/queue?campaign=${campaign.id}&limit=2&after=${two}`).expect(200)
    expect(second.body.items.map((i: { spectrumId: number }) => i.spectrumId)).toEqual(expected.oldest.slice(2, 4).map((r) => r.id))
    const fresh = await alice.client.agent.get(`/api/queue?campaign=${campaign.id}&limit=2`).expect(200)
    expect(fresh.body.waiting).toEqual({ count: 5, atLeast: false })
    // A spectrum the caller cannot see is no place to continue from: the queue starts at the top.
    const foreign = await suggestedSpectrum(await makeCampaign({ callsRequired: 1 }, [otherObserver]), otherObserver)
    const fromForeign = await alice.client.agent.get(`/api/queue?campaign=${campaign.id}&limit=2&after=${foreign.spectrum.id}`).expect(200)
    expect(fromForeign.body.items.map((i: { spectrumId: number }) => i.spectrumId)).toEqual(fresh.body.items.map((i: { spectrumId: number }) => i.spectrumId))
  })

  it('refuses observers', async () => {
    await observer.client.agent.get('/api/queue').expect(403)
  })
})

describe('blind review', () => {
  it('hides the suggestion in the queue and the review view until the caller has called', async () => {
    const campaign = await makeCampaign({ callsRequired: 2, blindReview: true }, [observer, alice, bob])
    const { spectrum, suggestion } = await suggestedSpectrum(campaign, observer, { flags: ['possible_composite'] })

    const queue = await alice.client.agent.get(`/api/queue?campaign=${campaign.id}`).expect(200)
    const item = queue.body.items.find((i: { spectrumId: number }) => i.spectrumId === spectrum.id)
    expect(item).toMatchObject({ suggestion: null, hidden: true, flags: ['possible_composite'] })
    expect(JSON.stringify(queue.body)).not.toContain('B8 III')
    const typed = await alice.client.agent.get(`/api/queue?campaign=${campaign.id}&typeFrom=B0&typeTo=B9`).expect(200)
    expect(typed.body.items).toHaveLength(0)

    const view = await alice.client.agent.get(`/api/spectra/${spectrum.id}/review`).expect(200)
    expect(view.body).toMatchObject({ suggestion: null, hidden: true, othersHidden: true, calls: [], callsSoFar: 0, callsRequired: 2 })
    expect(view.body.campaign).toMatchObject({ blindReview: true, callsRequired: 2, typeTolerance: 1, classTolerance: 1 })
    expect(JSON.stringify(view.body)).not.toContain(suggestion.spectralType)
    const history = await alice.client.agent.get(`/api/spectra/${spectrum.id}/history`).expect(200)
    expect(history.body.hidden).toBe(true)
    expect(history.body.events.map((e: { kind: string }) => e.kind)).toEqual(['upload', 'measurement'])

    // Accepting a suggestion one has not seen is refused.
    const blindAccept = await call(alice.client, spectrum.id, { acceptedSuggestion: true }).expect(422)
    expect(blindAccept.body.error.code).toBe('suggestion_not_shown')
    const res = await call(alice.client, spectrum.id, { spectralType: 'B7', luminosityClass: 'III', notes: 'He I weak' }).expect(201)
    expect(res.body.call).toMatchObject({ suggestionShown: false, spectralType: 'B7 III' })

    const after = await alice.client.agent.get(`/api/spectra/${spectrum.id}/review`).expect(200)
    expect(after.body.hidden).toBe(false)
    expect(after.body.suggestion).toMatchObject({ spectralType: 'B8 III', candidates: [{ spectralType: 'B8 III', chi2: 1.1 }], flags: ['possible_composite'] })
    expect(after.body.suggestion.votes).toHaveLength(1)
    expect(after.body.myCall.spectralType).toBe('B7 III')

    // Bob still works blind: neither the suggestion nor Alice's call.
    const bobView = await bob.client.agent.get(`/api/spectra/${spectrum.id}/review`).expect(200)
    expect(bobView.body).toMatchObject({ suggestion: null, hidden: true, calls: [], othersHidden: true, callsSoFar: 1 })
    expect(JSON.stringify(bobView.body)).not.toContain('B7')
    const row = await ReviewCall.findOne({ where: { spectrumId: spectrum.id, userId: alice.user.id } })
    expect(row!.suggestionShown).toBe(false)
  })

  it('shows the suggestion and others’ calls at once where the campaign is not blind', async () => {
    const campaign = await makeCampaign({ callsRequired: 2 }, [observer, alice, bob])
    const { spectrum } = await suggestedSpectrum(campaign, observer)
    await call(alice.client, spectrum.id, { acceptedSuggestion: true, confidence: 3 }).expect(201)
    const view = await bob.client.agent.get(`/api/spectra/${spectrum.id}/review`).expect(200)
    expect(view.body).toMatchObject({ hidden: false, othersHidden: false, callsSoFar: 1, canCall: { allowed: true } })
    expect(view.body.suggestion.spectralType).toBe('B8 III')
    expect(view.body.calls).toHaveLength(1)
    expect(view.body.calls[0]).toMatchObject({ by: { name: 'Alice Classifier' }, spectralType: 'B8 III', acceptedSuggestion: true, suggestionShown: true })
  })
})

describe('POST /api/spectra/:id/calls', () => {
  it('decides a single-call campaign at once and mails the observer', async () => {
    const campaign = await makeCampaign({ callsRequired: 1 }, [observer, alice])
    const { spectrum } = await suggestedSpectrum(campaign, observer, { objectName: 'Survey field 12 star 4' })
    const res = await call(alice.client, spectrum.id, { acceptedSuggestion: true }).expect(201)
    expect(res.body).toMatchObject({ outcome: 'agreed', spectrum: { status: 'agreed' }, classification: { source: 'accepted-suggestion', spectralType: 'B8 III', nCalls: 1, agreement: 'exact' } })
    const mail = await MailMessage.findOne({ where: { toAddresses: { [Op.like]: `%${observer.user.email}%` }, subject: { [Op.like]: '%Survey field 12 star 4%' } }, order: [['id', 'DESC']] })
    expect(mail).not.toBeNull()
    expect(mail!.subject).toBe('Survey field 12 star 4 is classified B8 III')
    expect(mail!.text).toContain('Spectral type and luminosity class: B8 III')
    expect(mail!.text).toContain(`${t.ctx.config.publicUrl}/spectra/${spectrum.id}`)
  })

  it('agrees after two calls within one subtype and one class, with the consensus stored', async () => {
    const campaign = await makeCampaign({ callsRequired: 2, typeTolerance: 1, classTolerance: 1 }, [observer, alice, bob])
    const { spectrum } = await suggestedSpectrum(campaign, observer, { objectName: 'Survey field 7 star 2' })
    const first = await call(alice.client, spectrum.id, { spectralType: 'B9', luminosityClass: 'IV', peculiarities: 'n', confidence: 2 }).expect(201)
    expect(first.body).toMatchObject({ outcome: 'waiting', spectrum: { status: 'under_review' }, callsSoFar: 1, callsRequired: 2, classification: null })
    expect(first.body.call).toMatchObject({ kind: 'call', spectralType: 'B9 IV n', typeCode: 19, classCode: 5, peculiarities: ['n'], suggestionShown: true })
    expect((await Spectrum.findByPk(spectrum.id))!.status).toBe('under_review')

    const second = await call(bob.client, spectrum.id, { spectralType: 'B8', luminosityClass: 'III', confidence: 3 }).expect(201)
    // Two calls tie on both axes; the suggestion (B8 III) breaks the tie.
    expect(second.body).toMatchObject({ outcome: 'agreed', spectrum: { status: 'agreed' }, callsSoFar: 2 })
    expect(second.body.classification).toMatchObject({ source: 'consensus', spectralType: 'B8 III', typeCode: 18, classCode: 4, nCalls: 2, agreement: 'within', typeSpread: 1, classSpread: 1 })
    const stored = await Classification.findAll({ where: { spectrumId: spectrum.id } })
    expect(stored).toHaveLength(1)
    expect(JSON.parse(stored[0]!.callIds)).toEqual([first.body.call.id, second.body.call.id])
    const finals = await finalClassificationsFor([spectrum.id, 999_999_999])
    expect(finals.get(spectrum.id)).toMatchObject({ spectralType: 'B8 III', source: 'consensus' })
    expect(finals.has(999_999_999)).toBe(false)
    const mail = await MailMessage.findOne({ where: { subject: 'Survey field 7 star 2 is classified B8 III', toAddresses: { [Op.like]: `%${observer.user.email}%` } } })
    expect(mail).not.toBeNull()
    expect(mail?.text).toContain('2 classifiers agreed on it')

    const late = await call(carol.client, spectrum.id, { spectralType: 'B8', luminosityClass: 'III' })
    expect(late.status).toBe(404)
  })

  it('disputes two calls that differ by more than the tolerance', async () => {
    const campaign = await makeCampaign({ callsRequired: 2, typeTolerance: 1, classTolerance: 1 }, [observer, alice, bob])
    const { spectrum } = await suggestedSpectrum(campaign, observer)
    await call(alice.client, spectrum.id, { spectralType: 'B8', luminosityClass: 'III' }).expect(201)
    const res = await call(bob.client, spectrum.id, { spectralType: 'A1', luminosityClass: 'III' }).expect(201)
    expect(res.body).toMatchObject({ outcome: 'disputed', spectrum: { status: 'disputed' }, classification: null })
    const dispute = await Dispute.findByPk(res.body.dispute.id)
    expect(dispute).toMatchObject({ spectrumId: spectrum.id, typeSpread: 3, classSpread: 0, typeTolerance: 1 })
    expect(await Classification.count({ where: { spectrumId: spectrum.id } })).toBe(0)
    const s = await Spectrum.findByPk(spectrum.id)
    expect(s!.status).toBe('disputed')
    const refused = await call(carol.client, spectrum.id, { spectralType: 'B8', luminosityClass: 'III' })
    expect(refused.status).toBe(404)
    const leadLate = await call(lead.client, spectrum.id, { spectralType: 'B8', luminosityClass: 'III' }).expect(409)
    expect(leadLate.body.error.code).toBe('not_open')
  })

  it('disputes calls whose classes differ by more than one class', async () => {
    const campaign = await makeCampaign({ callsRequired: 2, typeTolerance: 1, classTolerance: 1 }, [observer, alice, bob])
    const { spectrum } = await suggestedSpectrum(campaign, observer)
    await call(alice.client, spectrum.id, { spectralType: 'B8', luminosityClass: 'III' }).expect(201)
    const res = await call(bob.client, spectrum.id, { spectralType: 'B8', luminosityClass: 'V' }).expect(201)
    expect(res.body.outcome).toBe('disputed')
  })

  it('takes one call per person and a correction as a new row', async () => {
    const campaign = await makeCampaign({ callsRequired: 2 }, [observer, alice, bob])
    const { spectrum } = await suggestedSpectrum(campaign, observer)
    const first = await call(alice.client, spectrum.id, { spectralType: 'B8', luminosityClass: 'III' }).expect(201)
    const twice = await call(alice.client, spectrum.id, { spectralType: 'B9', luminosityClass: 'III' }).expect(409)
    expect(twice.body.error.code).toBe('already_called')
    const fixed = await call(alice.client, spectrum.id, { spectralType: 'A0', luminosityClass: 'III', correctsCallId: first.body.call.id }).expect(201)
    expect(fixed.body.call).toMatchObject({ kind: 'correction', correctsCallId: first.body.call.id, spectralType: 'A0 III' })
    expect(fixed.body.callsSoFar).toBe(1)
    const rows = await ReviewCall.findAll({ where: { spectrumId: spectrum.id }, order: [['id', 'ASC']] })
    expect(rows.map((r) => [r.kind, r.spectralType])).toEqual([
      ['call', 'B8 III'],
      ['correction', 'A0 III'],
    ])
    // The correction is Alice's standing call: Bob's A0 III agrees with it, not with her first B8.
    const res = await call(bob.client, spectrum.id, { spectralType: 'A0', luminosityClass: 'III' }).expect(201)
    expect(res.body.classification).toMatchObject({ spectralType: 'A0 III', agreement: 'exact' })
  })

  it('refuses a call on one’s own submission', async () => {
    const campaign = await makeCampaign({ callsRequired: 1 }, [alice, bob])
    const { spectrum } = await suggestedSpectrum(campaign, alice)
    const res = await call(alice.client, spectrum.id, { spectralType: 'B8', luminosityClass: 'III' }).expect(403)
    expect(res.body.error.code).toBe('own_submission')
    expect(await ReviewCall.count({ where: { spectrumId: spectrum.id } })).toBe(0)
    const view = await alice.client.agent.get(`/api/spectra/${spectrum.id}/review`).expect(200)
    expect(view.body.canCall).toMatchObject({ allowed: false, code: 'own_submission' })
    await send(alice.client, 'post', `/api/queue/${spectrum.id}/claim`).expect(403)
  })

  it('refuses a call outside the caller’s campaigns as if the spectrum did not exist', async () => {
    const campaign = await makeCampaign({ callsRequired: 1 }, [observer, alice])
    const { spectrum } = await suggestedSpectrum(campaign, observer)
    const res = await call(outsider.client, spectrum.id, { spectralType: 'B8', luminosityClass: 'III' }).expect(404)
    expect(res.body.error.code).toBe('not_found')
    await outsider.client.agent.get(`/api/spectra/${spectrum.id}/review`).expect(404)
    await send(outsider.client, 'post', `/api/queue/${spectrum.id}/claim`).expect(404)
    expect(await ReviewCall.count({ where: { spectrumId: spectrum.id } })).toBe(0)
  })

  it('refuses types that are not MK, and says which field is wrong', async () => {
    const campaign = await makeCampaign({ callsRequired: 1 }, [observer, alice])
    const { spectrum } = await suggestedSpectrum(campaign, observer)
    const cases: Array<[object, string]> = [
      [{ spectralType: 'Q5', luminosityClass: 'V' }, 'spectralType'],
      [{ spectralType: 'B', luminosityClass: 'V' }, 'spectralType'],
      [{ spectralType: 'B8 III', luminosityClass: 'III' }, 'spectralType'],
      [{ spectralType: 'B8', luminosityClass: 'XII' }, 'luminosityClass'],
      [{ spectralType: 'B8', luminosityClass: 'III', confidence: 4 }, 'confidence'],
      [{ luminosityClass: 'III' }, 'spectralType'],
    ]
    for (const [body, field] of cases) {
      const res = await call(alice.client, spectrum.id, body).expect(422)
      expect(Object.keys(res.body.error.details.fields), JSON.stringify(body)).toContain(field)
    }
    const wrongAccept = await call(alice.client, spectrum.id, { acceptedSuggestion: true, spectralType: 'A0', luminosityClass: 'V' }).expect(422)
    expect(wrongAccept.body.error.code).toBe('not_the_suggestion')
    expect(await ReviewCall.count({ where: { spectrumId: spectrum.id } })).toBe(0)
  })

  it('refuses observers', async () => {
    const campaign = await makeCampaign({ callsRequired: 1 }, [observer])
    const { spectrum } = await suggestedSpectrum(campaign, observer)
    await call(observer.client, spectrum.id, { spectralType: 'B8', luminosityClass: 'III' }).expect(403)
  })

  it('can be recorded without HTTP, as a seeder would', async () => {
    const campaign = await makeCampaign({ callsRequired: 1 }, [observer, alice])
    const { spectrum } = await suggestedSpectrum(campaign, observer)
    const result = await recordCall(t.ctx, alice.user, spectrum.id, { spectralType: 'B8', luminosityClass: 'III', confidence: 3, acceptedSuggestion: false, secondsSpent: 30 })
    expect(result).toMatchObject({ outcome: 'agreed', classification: { source: 'consensus', spectralType: 'B8 III', decidedBy: { id: alice.user.id } } })
  })
})

describe('calls and claims at the same moment', () => {
  it('judges the spectrum exactly once when the last two calls arrive together', async () => {
    const campaign = await makeCampaign({ callsRequired: 2 }, [observer, alice, bob, carol])
    const { spectrum } = await suggestedSpectrum(campaign, observer)
    const results = await Promise.all([
      call(alice.client, spectrum.id, { spectralType: 'B8', luminosityClass: 'III' }),
      call(bob.client, spectrum.id, { spectralType: 'B8', luminosityClass: 'III' }),
      call(carol.client, spectrum.id, { spectralType: 'B8', luminosityClass: 'III' }),
    ])
    const statuses = results.map((r) => r.status).sort()
    expect(statuses).toEqual([201, 201, 409])
    expect(results.map((r) => r.body.outcome).filter((o) => o === 'agreed')).toHaveLength(1)
    expect(await Classification.count({ where: { spectrumId: spectrum.id } })).toBe(1)
    expect(await ReviewCall.count({ where: { spectrumId: spectrum.id } })).toBe(2)
  })

  it('gives a contested item to exactly one of two people claiming at once', async () => {
    const campaign = await makeCampaign({ callsRequired: 1 }, [observer, alice, bob])
    const { spectrum } = await suggestedSpectrum(campaign, observer)
    const results = await Promise.all([send(alice.client, 'post', `/api/queue/${spectrum.id}/claim`), send(bob.client, 'post', `/api/queue/${spectrum.id}/claim`)])
    expect(results.map((r) => r.status).sort()).toEqual([200, 409])
    const winner = results.find((r) => r.status === 200)!.body.claim.by.id
    expect((await ReviewClaim.findByPk(spectrum.id))!.userId).toBe(winner)
  })
})

describe('calls are never changed or removed', () => {
  it('has no route that updates or deletes a call, and the rows stay as written', async () => {
    const campaign = await makeCampaign({ callsRequired: 2 }, [observer, alice])
    const { spectrum } = await suggestedSpectrum(campaign, observer)
    const res = await call(alice.client, spectrum.id, { spectralType: 'B8', luminosityClass: 'III', notes: 'as written' }).expect(201)
    const id = res.body.call.id as number
    const before = (await ReviewCall.findByPk(id))!.toJSON()
    for (const method of ['patch', 'delete', 'put'] as const) {
      for (const path of [`/api/spectra/${spectrum.id}/calls/${id}`, `/api/spectra/${spectrum.id}/calls`, `/api/calls/${id}`]) {
        const r = await send(lead.client, method, path, { spectralType: 'O5', luminosityClass: 'V' })
        expect([404, 405], `${method} ${path}`).toContain(r.status)
      }
    }
    expect((await ReviewCall.findByPk(id))!.toJSON()).toEqual(before)
    expect(await ReviewCall.count({ where: { spectrumId: spectrum.id } })).toBe(1)
    await expect(ReviewCall.update({ notes: 'changed' }, { where: { id } })).rejects.toThrow(/kept as written/)
    await expect(ReviewCall.destroy({ where: { id } })).rejects.toThrow(/kept as written/)
  })
})

describe('GET /api/spectra/:id/review', () => {
  it('gives the working screen the spectrum, the measurement, the claim and the campaign rules', async () => {
    const campaign = await makeCampaign({ callsRequired: 1 }, [observer, alice])
    const { spectrum } = await suggestedSpectrum(campaign, observer, { objectName: 'Cluster member 31' })
    await send(alice.client, 'post', `/api/queue/${spectrum.id}/claim`).expect(200)
    const res = await alice.client.agent.get(`/api/spectra/${spectrum.id}/review`).expect(200)
    expect(res.body.spectrum).toMatchObject({ id: spectrum.id, objectName: 'Cluster member 31', status: 'suggested', snr: 50, submittedBy: { name: 'Olive Observer' } })
    expect(res.body.measurement).toMatchObject({ pipelineVersion: 'test', isCurrent: true })
    expect(res.body.claim).toMatchObject({ mine: true, live: true })
    expect(res.body.canCall).toEqual({ allowed: true, reason: null, code: null })
    expect(res.body.campaign).toMatchObject({ id: campaign.id, callsRequired: 1, blindReview: false })
  })

  it('refuses observers, and tells an observer nothing of another observer’s spectrum', async () => {
    const campaign = await makeCampaign({ callsRequired: 1 }, [observer, otherObserver])
    const { spectrum } = await suggestedSpectrum(campaign, observer)
    await otherObserver.client.agent.get(`/api/spectra/${spectrum.id}/review`).expect(403)
    await otherObserver.client.agent.get(`/api/spectra/${spectrum.id}/history`).expect(404)
    await otherObserver.client.agent.get(`/api/spectra/${spectrum.id}`).expect(404)
    await observer.client.agent.get(`/api/spectra/${spectrum.id}/history`).expect(200)
  })
})

describe('GET /api/spectra/:id/history', () => {
  it('lists the upload, measurement, suggestion, calls and decision in time order with who and how long', async () => {
    const campaign = await makeCampaign({ callsRequired: 2 }, [observer, alice, bob])
    const { spectrum } = await suggestedSpectrum(campaign, observer)
    await call(alice.client, spectrum.id, { spectralType: 'B8', luminosityClass: 'III', secondsSpent: 61 }).expect(201)
    await call(bob.client, spectrum.id, { acceptedSuggestion: true, secondsSpent: 12 }).expect(201)
    const res = await observer.client.agent.get(`/api/spectra/${spectrum.id}/history`).expect(200)
    const events = res.body.events as Array<{ kind: string; at: string; who: { name: string } | null; suggestionShown?: boolean; secondsSpent?: number }>
    expect(events.map((e) => e.kind)).toEqual(['upload', 'measurement', 'suggestion', 'call', 'call', 'agreed'])
    expect(events.map((e) => e.at)).toEqual([...events.map((e) => e.at)].sort())
    expect(events[0]!.who!.name).toBe('Olive Observer')
    expect(events[3]).toMatchObject({ who: { name: 'Alice Classifier' }, suggestionShown: true, secondsSpent: 61 })
    expect(events[4]).toMatchObject({ who: { name: 'Bob Classifier' }, secondsSpent: 12 })
    expect(events[5]).toMatchObject({ who: { name: 'Bob Classifier' } })
    expect(res.body.hidden).toBe(false)
  })
})
