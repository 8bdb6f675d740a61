import { settleBackground } from '../../server/lib/background'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Op } from 'sequelize'
import { MailMessage, Session, User, UserToken } from '../../server/models'
import { agentFor, closeDatabase, createTestContext, makeUser, signedInAgent, uniqueEmail, type TestContext } from '../helpers/context'

let t: TestContext
let lead: Awaited<ReturnType<typeof signedInAgent>>
beforeAll(async () => {
  t = await createTestContext()
  const { user, password } = await makeUser('lead')
  lead = await signedInAgent(t.app, user.email, password)
})
afterAll(async () => {
  await t.close()
  await closeDatabase()
})

async function lastMailTo(address: string) {
  return MailMessage.findOne({ where: { toAddresses: { [Op.like]: `%${address}%` } }, order: [['id', 'DESC']] })
}
const tokenFrom = (text: string) => /set-password\?token=([A-Za-z0-9_-]+)/.exec(text)?.[1] ?? null

describe('invitations', () => {
  it('mails a single-use link that sets the password once, then refuses it', async () => {
    const email = uniqueEmail('invitee')
    const res = await lead.agent.post('/api/users').set('x-csrf-token', lead.csrf).send({ email, name: 'New Classifier', role: 'classifier' }).expect(201)
    expect(res.body.user).toMatchObject({ email, role: 'classifier', invited: true })
    const mail = await lastMailTo(email)
    expect(mail?.subject).toBe('You are invited to Lineweight')
    const token = tokenFrom(mail!.text)
    expect(token).not.toBeNull()

    const anon = await agentFor(t.app)
    const info = await anon.agent.get(`/api/auth/token?token=${token}`).expect(200)
    expect(info.body).toEqual({ purpose: 'invite', email, name: 'New Classifier' })
    await anon.agent.post('/api/auth/set-password').set('x-csrf-token', anon.csrf).send({ token, password: 'a brand new secret' }).expect(200)
    const again = await anon.agent.post('/api/auth/set-password').set('x-csrf-token', anon.csrf).send({ token, password: 'another secret here' }).expect(410)
    expect(again.body.error.code).toBe('link_expired')

    const signedIn = await signedInAgent(t.app, email, 'a brand new secret')
    const me = await signedIn.agent.get('/api/me').expect(200)
    expect(me.body.user.role).toBe('classifier')
  })

  it('refuses an expired invitation link', async () => {
    const email = uniqueEmail('late')
    const res = await lead.agent.post('/api/users').set('x-csrf-token', lead.csrf).send({ email, name: 'Late Person', role: 'observer' }).expect(201)
    const token = tokenFrom((await lastMailTo(email))!.text)!
    await UserToken.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { userId: res.body.user.id } })
    const anon = await agentFor(t.app)
    await anon.agent.get(`/api/auth/token?token=${token}`).expect(410)
    await anon.agent.post('/api/auth/set-password').set('x-csrf-token', anon.csrf).send({ token, password: 'too late for this' }).expect(410)
    const user = await User.findByPk(res.body.user.id)
    expect(user!.passwordHash).toBeNull()
  })

  it('refuses a second account for the same address', async () => {
    const { user } = await makeUser('observer')
    const res = await lead.agent.post('/api/users').set('x-csrf-token', lead.csrf).send({ email: user.email, name: 'Twin', role: 'observer' }).expect(409)
    expect(res.body.error.details.fields.email).toBeDefined()
  })
})

describe('password reset', () => {
  it('mails a link for a known address that works once', async () => {
    const { user } = await makeUser('observer')
    const anon = await agentFor(t.app)
    const res = await anon.agent.post('/api/auth/forgot').set('x-csrf-token', anon.csrf).send({ email: user.email }).expect(202)
    await settleBackground()
    const token = tokenFrom((await lastMailTo(user.email))!.text)!
    await anon.agent.post('/api/auth/set-password').set('x-csrf-token', anon.csrf).send({ token, password: 'reset and ready' }).expect(200)
    await anon.agent.post('/api/auth/set-password').set('x-csrf-token', anon.csrf).send({ token, password: 'reset and again' }).expect(410)
    await signedInAgent(t.app, user.email, 'reset and ready')
    expect(res.body.message).toMatch(/If that address belongs to an account/)
  })

  it('gives the same reply for an unknown address and sends nothing', async () => {
    const email = uniqueEmail('ghost')
    const anon = await agentFor(t.app)
    const res = await anon.agent.post('/api/auth/forgot').set('x-csrf-token', anon.csrf).send({ email }).expect(202)
    expect(res.body.message).toMatch(/If that address belongs to an account/)
    expect(await lastMailTo(email)).toBeNull()
  })
})

describe('PATCH /api/users/:id', () => {
  it('changes a role', async () => {
    const { user } = await makeUser('observer')
    const res = await lead.agent.patch(`/api/users/${user.id}`).set('x-csrf-token', lead.csrf).send({ role: 'classifier' }).expect(200)
    expect(res.body.user.role).toBe('classifier')
  })

  it('ends the sessions of a deactivated person at once', async () => {
    const { user, password } = await makeUser('classifier')
    const victim = await signedInAgent(t.app, user.email, password)
    await victim.agent.get('/api/me').expect(200)
    await lead.agent.patch(`/api/users/${user.id}`).set('x-csrf-token', lead.csrf).send({ active: false }).expect(200)
    expect(await Session.count({ where: { userId: user.id } })).toBe(0)
    await victim.agent.get('/api/me').expect(401)
  })

  it('does not let a lead demote or deactivate themself', async () => {
    const { user, password } = await makeUser('lead')
    const self = await signedInAgent(t.app, user.email, password)
    const res = await self.agent.patch(`/api/users/${user.id}`).set('x-csrf-token', self.csrf).send({ active: false }).expect(409)
    expect(res.body.error.code).toBe('self_change')
  })
})

describe('POST /api/me/password', () => {
  it('changes the own password when the current one is right', async () => {
    const { user, password } = await makeUser('observer')
    const me = await signedInAgent(t.app, user.email, password)
    await me.agent.post('/api/me/password').set('x-csrf-token', me.csrf).send({ currentPassword: 'wrong one', newPassword: 'a longer new one' }).expect(422)
    await me.agent.post('/api/me/password').set('x-csrf-token', me.csrf).send({ currentPassword: password, newPassword: 'a longer new one' }).expect(200)
    await signedInAgent(t.app, user.email, 'a longer new one')
  })
})

describe('GET /api/outbox', () => {
  it('lists the mails the fake received, newest first', async () => {
    const res = await lead.agent.get('/api/outbox?pageSize=5').expect(200)
    expect(res.body.total).toBeGreaterThan(0)
    const first = res.body.items[0]
    const detail = await lead.agent.get(`/api/outbox/${first.id}`).expect(200)
    expect(detail.body.mail.subject).toBe(first.subject)
    expect(typeof detail.body.mail.text).toBe('string')
  })
})
