import { createHash } from 'node:crypto'
import supertest from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ApiToken, Campaign } from '../../server/models'
import { closeDatabase, createTestContext, sessionCookie, type TestContext } from '../helpers/context'
import { send, signedInPerson, type Person } from '../helpers/review'
import { makeCampaign } from '../helpers/world'

let t: TestContext
let observer: Person
let lead: Person
beforeAll(async () => {
  t = await createTestContext()
  observer = await signedInPerson(t.app, 'observer', 'Token Observer')
  lead = await signedInPerson(t.app, 'lead', 'Token Lead')
})
afterAll(async () => {
  await t.close()
  await closeDatabase()
})

async function newToken(p: Person, body: object = { name: 'reduction pipeline' }): Promise<{ id: number; secret: string }> {
  const res = await send(p.client, 'post', '/api/me/tokens', body).expect(201)
  return { id: res.body.token.id, secret: res.body.secret }
}
const bearer = (secret: string) => ({ authorization: `Bearer ${secret}` })

describe('personal API tokens', () => {
  it('shows the secret once and stores only its SHA-256', async () => {
    const res = await send(observer.client, 'post', '/api/me/tokens', { name: 'nightly reduction', expiresInDays: 30 }).expect(201)
    const { secret, token } = res.body
    expect(secret).toMatch(/^lw_[A-Za-z0-9_-]{43}$/)
    expect(token).toMatchObject({ name: 'nightly reduction', prefix: secret.slice(0, 10), state: 'active', uses: 0, lastUsedAt: null, owner: { id: observer.user.id } })
    expect(Date.parse(token.expiresAt) - Date.now()).toBeGreaterThan(29.9 * 86_400_000)
    const row = (await ApiToken.findByPk(token.id))!
    expect(row.tokenHash).toBe(createHash('sha256').update(secret).digest('hex'))
    expect(JSON.stringify(row.toJSON())).not.toContain(secret)
    const list = await observer.client.agent.get('/api/me/tokens').expect(200)
    expect(JSON.stringify(list.body)).not.toContain(secret)
    expect(list.body.tokens.map((x: { id: number }) => x.id)).toContain(token.id)
  })

  it('signs a request in without cookie or CSRF token, with the owner’s role, and records the use', async () => {
    const { id, secret } = await newToken(lead)
    const me = await supertest(t.app).get('/api/me').set(bearer(secret)).expect(200)
    expect(me.body.user).toMatchObject({ id: lead.user.id, role: 'lead' })
    expect(sessionCookie(me)).toBeNull()
    // A state-changing request: no x-csrf-token needed.
    const created = await supertest(t.app)
      .post('/api/campaigns')
      .set(bearer(secret))
      .send({ code: `TK${Date.now() % 100000}`, name: 'Token campaign' })
      .expect(201)
    expect(await Campaign.findByPk(created.body.campaign.id)).not.toBeNull()
    const row = (await ApiToken.findByPk(id))!
    expect(row.uses).toBe(2)
    expect(Date.now() - row.lastUsedAt!.getTime()).toBeLessThan(60_000)
  })

  it('has the role of its owner: an observer’s token cannot do what observers cannot', async () => {
    const { secret } = await newToken(observer)
    await supertest(t.app).post('/api/campaigns').set(bearer(secret)).send({ code: 'NOPE', name: 'Not allowed' }).expect(403)
    await supertest(t.app).get('/api/users').set(bearer(secret)).expect(403)
    await supertest(t.app).get('/api/spectra').set(bearer(secret)).expect(200)
  })

  it('refuses a revoked token from the next request on', async () => {
    const { id, secret } = await newToken(observer)
    await supertest(t.app).get('/api/me').set(bearer(secret)).expect(200)
    const revoked = await send(observer.client, 'delete', `/api/me/tokens/${id}`).expect(200)
    expect(revoked.body.token.state).toBe('revoked')
    const res = await supertest(t.app).get('/api/me').set(bearer(secret)).expect(401)
    expect(res.body.error.code).toBe('invalid_token')
  })

  it('refuses an expired token, an unknown one and a malformed header', async () => {
    const { id, secret } = await newToken(observer, { name: 'short lived', expiresInDays: 1 })
    await supertest(t.app).get('/api/me').set(bearer(secret)).expect(200)
    await ApiToken.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { id } })
    expect((await supertest(t.app).get('/api/me').set(bearer(secret)).expect(401)).body.error.code).toBe('invalid_token')
    await supertest(t.app)
      .get('/api/me')
      .set(bearer(`${secret.slice(0, -2)}xx`))
      .expect(401)
    await supertest(t.app)
      .get('/api/me')
      .set({ authorization: `Basic ${secret}` })
      .expect(401)
    await send(observer.client, 'post', '/api/me/tokens', { name: 'too long', expiresInDays: 400 }).expect(422)
    await send(observer.client, 'post', '/api/me/tokens', { name: '' }).expect(422)
  })

  it('lets a lead see and revoke anyone’s token, and nobody else', async () => {
    const { id, secret } = await newToken(observer, { name: 'telescope B' })
    const other = await signedInPerson(t.app, 'observer', 'Other Observer')
    await send(other.client, 'delete', `/api/me/tokens/${id}`).expect(404)
    await send(other.client, 'delete', `/api/tokens/${id}`).expect(403)
    await other.client.agent.get('/api/tokens').expect(403)
    const all = await lead.client.agent.get(`/api/tokens?user=${observer.user.id}`).expect(200)
    expect(all.body.tokens.find((x: { id: number }) => x.id === id)).toMatchObject({ name: 'telescope B', owner: { id: observer.user.id, name: 'Token Observer' } })
    await send(lead.client, 'delete', `/api/tokens/${id}`).expect(200)
    expect((await ApiToken.findByPk(id))!.revokedBy).toBe(lead.user.id)
    await supertest(t.app).get('/api/me').set(bearer(secret)).expect(401)
  })

  it('cannot make more tokens or change the password', async () => {
    const { secret } = await newToken(observer)
    expect((await supertest(t.app).post('/api/me/tokens').set(bearer(secret)).send({ name: 'child' }).expect(403)).body.error.code).toBe('session_required')
    await supertest(t.app).post('/api/me/password').set(bearer(secret)).send({ currentPassword: 'correct horse battery', newPassword: 'another long secret' }).expect(403)
  })

  it('stops working when its owner is deactivated', async () => {
    const person = await signedInPerson(t.app, 'observer', 'Leaving Observer')
    const { secret } = await newToken(person)
    await send(lead.client, 'patch', `/api/users/${person.user.id}`, { active: false }).expect(200)
    await supertest(t.app).get('/api/me').set(bearer(secret)).expect(403)
  })

  it('limits the requests of each token on its own', async () => {
    const limited = await createTestContext({ API_TOKEN_RATE_PER_MINUTE: 3 })
    try {
      const a = await newToken(observer)
      const b = await newToken(observer)
      for (let i = 0; i < 3; i++) await supertest(limited.app).get('/api/me').set(bearer(a.secret)).expect(200)
      const refused = await supertest(limited.app).get('/api/me').set(bearer(a.secret)).expect(429)
      expect(refused.body.error.code).toBe('rate_limited')
      await supertest(limited.app).get('/api/me').set(bearer(b.secret)).expect(200)
    } finally {
      await limited.close()
    }
  })

  it('tells a pipeline which files a campaign already holds', async () => {
    const { secret } = await newToken(observer)
    const campaign = await makeCampaign('known', [observer])
    const res = await supertest(t.app)
      .post('/api/spectra/known')
      .set(bearer(secret))
      .send({ campaignId: campaign.id, sha256: ['a'.repeat(64)] })
      .expect(200)
    expect(res.body).toEqual({ known: [] })
    await supertest(t.app)
      .post('/api/spectra/known')
      .set(bearer(secret))
      .send({ campaignId: campaign.id, sha256: ['not a hash'] })
      .expect(422)
  })
})
