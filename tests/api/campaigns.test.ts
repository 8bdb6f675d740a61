import { randomBytes } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Campaign, CampaignMember, type User } from '../../server/models'
import { OPTICAL_LIMITS } from '../../server/spectra/io/finalize'
import { CAMPAIGN_REGION_LIMITS } from '../../shared/grid'
import { closeDatabase, createTestContext, makeUser, signedInAgent, type TestContext } from '../helpers/context'

type Client = Awaited<ReturnType<typeof signedInAgent>>
let t: TestContext
let lead: Client
let classifier: { user: User; client: Client }
let observer: { user: User; client: Client }

async function person(role: 'observer' | 'classifier' | 'lead', name: string) {
  const { user, password } = await makeUser(role, { name })
  return { user, client: await signedInAgent(t.app, user.email, password) }
}
const code = () => `C-${randomBytes(4).toString('hex')}`
const send = (c: Client, method: 'post' | 'patch' | 'put' | 'delete', path: string, body: object = {}) => c.agent[method](path).set('x-csrf-token', c.csrf).send(body)

beforeAll(async () => {
  t = await createTestContext()
  lead = (await person('lead', 'Lena Lead')).client
  classifier = await person('classifier', 'Cleo Classifier')
  observer = await person('observer', 'Olive Observer')
})
afterAll(async () => {
  await t.close()
  await closeDatabase()
})

describe('POST /api/campaigns', () => {
  it('lets a lead create a campaign with its review rules', async () => {
    const c = code()
    const res = await send(lead, 'post', '/api/campaigns', {
      code: c,
      name: 'Open cluster survey',
      observatory: 'Hill station 1.2 m',
      regionMin: 3800,
      regionMax: 5200,
      callsRequired: 2,
      blindReview: true,
      typeTolerance: 1,
      classTolerance: 0.5,
    }).expect(201)
    expect(res.body.campaign).toMatchObject({
      code: c,
      name: 'Open cluster survey',
      observatory: 'Hill station 1.2 m',
      regionMin: 3800,
      regionMax: 5200,
      callsRequired: 2,
      blindReview: true,
      typeTolerance: 1,
      classTolerance: 0.5,
      members: [],
    })
    const row = await Campaign.findByPk(res.body.campaign.id)
    expect(row).toMatchObject({ code: c, callsRequired: 2, blindReview: true })
  })

  it('fills the defaults: one call, not blind, one subtype and one class', async () => {
    const res = await send(lead, 'post', '/api/campaigns', { code: code(), name: 'Defaults' }).expect(201)
    expect(res.body.campaign).toMatchObject({ callsRequired: 1, blindReview: false, typeTolerance: 1, classTolerance: 1, regionMin: 3850, regionMax: 5000 })
  })

  it('accepts the full range the readers accept, a deadline, and shows the progress', async () => {
    expect(CAMPAIGN_REGION_LIMITS).toEqual(OPTICAL_LIMITS)
    const res = await send(lead, 'post', '/api/campaigns', { code: code(), name: 'Wide', regionMin: 3000, regionMax: 11000, deadline: '2026-09-30' }).expect(201)
    expect(res.body.campaign).toMatchObject({ regionMin: 3000, regionMax: 11000, deadline: '2026-09-30', progress: { total: 0, waiting: 0, agreed: 0 } })
    const cleared = await send(lead, 'patch', `/api/campaigns/${res.body.campaign.id}`, { deadline: null }).expect(200)
    expect(cleared.body.campaign.deadline).toBeNull()
  })

  it('refuses rules outside their ranges and names the fields', async () => {
    const cases: Array<[object, string]> = [
      // The readers accept 3000–11000 Å (OPTICAL_LIMITS); a region beyond it could never be covered.
      [{ regionMin: 2900 }, 'regionMin'],
      [{ regionMax: 11500 }, 'regionMax'],
      [{ deadline: '2026-02-30' }, 'deadline'],
      [{ deadline: 'soon' }, 'deadline'],
      [{ regionMin: 5000, regionMax: 4000 }, 'regionMax'],
      [{ callsRequired: 4 }, 'callsRequired'],
      [{ callsRequired: 0 }, 'callsRequired'],
      [{ typeTolerance: -1 }, 'typeTolerance'],
      [{ name: '' }, 'name'],
      [{ code: 'has spaces' }, 'code'],
    ]
    for (const [change, field] of cases) {
      const res = await send(lead, 'post', '/api/campaigns', { code: code(), name: 'Bad', ...change }).expect(422)
      expect(Object.keys(res.body.error.details.fields), JSON.stringify(change)).toContain(field)
    }
  })

  it('refuses a second campaign with the same code', async () => {
    const c = code()
    await send(lead, 'post', '/api/campaigns', { code: c, name: 'First' }).expect(201)
    const res = await send(lead, 'post', '/api/campaigns', { code: c, name: 'Second' }).expect(409)
    expect(res.body.error.details.fields.code).toBeDefined()
  })

  it('refuses classifiers and observers', async () => {
    await send(classifier.client, 'post', '/api/campaigns', { code: code(), name: 'Nope' }).expect(403)
    await send(observer.client, 'post', '/api/campaigns', { code: code(), name: 'Nope' }).expect(403)
  })
})

describe('PATCH /api/campaigns/:id', () => {
  it('changes the rules and keeps the region in order against the stored edges', async () => {
    const created = await send(lead, 'post', '/api/campaigns', { code: code(), name: 'To change', regionMin: 3900, regionMax: 4900 }).expect(201)
    const id = created.body.campaign.id
    const res = await send(lead, 'patch', `/api/campaigns/${id}`, { name: 'Changed', callsRequired: 3, blindReview: true, typeTolerance: 2, classTolerance: 1 }).expect(200)
    expect(res.body.campaign).toMatchObject({ name: 'Changed', callsRequired: 3, blindReview: true, typeTolerance: 2 })
    const bad = await send(lead, 'patch', `/api/campaigns/${id}`, { regionMin: 4950 }).expect(422)
    expect(bad.body.error.details.fields.regionMin).toBeDefined()
    expect((await Campaign.findByPk(id))!.regionMin).toBe(3900)
    await send(lead, 'patch', `/api/campaigns/${id}`, { code: 'NEW' }).expect(422)
    await send(lead, 'patch', `/api/campaigns/${id}`, {}).expect(422)
    await send(classifier.client, 'patch', `/api/campaigns/${id}`, { name: 'Mine now' }).expect(403)
    await send(lead, 'patch', '/api/campaigns/999999999', { name: 'Ghost' }).expect(404)
  })
})

describe('campaign members', () => {
  it('lets a lead assign and remove classifiers and observers, and members see the campaign', async () => {
    const created = await send(lead, 'post', '/api/campaigns', { code: code(), name: 'Staffed' }).expect(201)
    const id = created.body.campaign.id
    await classifier.client.agent.get(`/api/campaigns/${id}`).expect(404)

    const set = await send(lead, 'put', `/api/campaigns/${id}/members`, { userIds: [classifier.user.id, observer.user.id] }).expect(200)
    expect(set.body.campaign.members.map((m: { id: number }) => m.id).sort()).toEqual([classifier.user.id, observer.user.id].sort())
    expect(set.body.campaign.members.find((m: { id: number }) => m.id === classifier.user.id)).toMatchObject({ name: 'Cleo Classifier', role: 'classifier', email: classifier.user.email })

    const seen = await classifier.client.agent.get(`/api/campaigns/${id}`).expect(200)
    expect(seen.body.campaign.members).toHaveLength(2)
    expect(seen.body.campaign.members[0].email).toBeUndefined()
    const listed = await observer.client.agent.get('/api/campaigns').expect(200)
    expect(listed.body.campaigns.map((c: { id: number }) => c.id)).toContain(id)

    const removed = await send(lead, 'delete', `/api/campaigns/${id}/members/${observer.user.id}`).expect(200)
    expect(removed.body.campaign.members.map((m: { id: number }) => m.id)).toEqual([classifier.user.id])
    await observer.client.agent.get(`/api/campaigns/${id}`).expect(404)

    const added = await send(lead, 'post', `/api/campaigns/${id}/members`, { userId: observer.user.id }).expect(200)
    expect(added.body.campaign.members).toHaveLength(2)
    await send(lead, 'post', `/api/campaigns/${id}/members`, { userId: observer.user.id }).expect(200)
    expect(await CampaignMember.count({ where: { campaignId: id } })).toBe(2)

    const emptied = await send(lead, 'put', `/api/campaigns/${id}/members`, { userIds: [] }).expect(200)
    expect(emptied.body.campaign.members).toEqual([])
    expect(await CampaignMember.count({ where: { campaignId: id } })).toBe(0)
  })

  it('refuses unknown users and leaves the members as they were', async () => {
    const created = await send(lead, 'post', '/api/campaigns', { code: code(), name: 'Careful' }).expect(201)
    const id = created.body.campaign.id
    await send(lead, 'put', `/api/campaigns/${id}/members`, { userIds: [classifier.user.id] }).expect(200)
    const res = await send(lead, 'put', `/api/campaigns/${id}/members`, { userIds: [observer.user.id, 999_999_999] }).expect(422)
    expect(res.body.error.code).toBe('unknown_users')
    const rows = await CampaignMember.findAll({ where: { campaignId: id } })
    expect(rows.map((r) => r.userId)).toEqual([classifier.user.id])
  })

  it('refuses member changes by anyone but a lead', async () => {
    const created = await send(lead, 'post', '/api/campaigns', { code: code(), name: 'Guarded' }).expect(201)
    const id = created.body.campaign.id
    await send(classifier.client, 'put', `/api/campaigns/${id}/members`, { userIds: [classifier.user.id] }).expect(403)
    await send(observer.client, 'post', `/api/campaigns/${id}/members`, { userId: observer.user.id }).expect(403)
    await send(classifier.client, 'delete', `/api/campaigns/${id}/members/${classifier.user.id}`).expect(403)
    expect(await CampaignMember.count({ where: { campaignId: id } })).toBe(0)
  })
})
