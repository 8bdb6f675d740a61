import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import supertest from 'supertest'
import { Session, User } from '../../server/models'
import { agentFor, closeDatabase, createTestContext, makeUser, sessionCookie, signedInAgent, type TestContext } from '../helpers/context'

let t: TestContext
beforeAll(async () => {
  t = await createTestContext()
})
afterAll(async () => {
  await t.close()
  await closeDatabase()
})

describe('POST /api/auth/login', () => {
  it('signs in with the right password and records the time', async () => {
    const { user, password } = await makeUser('observer')
    const client = await agentFor(t.app)
    const res = await client.agent.post('/api/auth/login').set('x-csrf-token', client.csrf).send({ email: user.email.toUpperCase(), password }).expect(200)
    expect(res.body.user).toMatchObject({ id: user.id, role: 'observer', email: user.email })
    expect(res.body.user).not.toHaveProperty('passwordHash')
    await user.reload()
    expect(user.lastLoginAt).not.toBeNull()
  })

  it('refuses a wrong password with 401 and writes nothing', async () => {
    const { user } = await makeUser('observer')
    const client = await agentFor(t.app)
    const res = await client.agent.post('/api/auth/login').set('x-csrf-token', client.csrf).send({ email: user.email, password: 'not the password' }).expect(401)
    expect(res.body.error.code).toBe('invalid_credentials')
    await user.reload()
    expect(user.lastLoginAt).toBeNull()
  })

  it('answers an unknown e-mail exactly as a wrong password', async () => {
    const client = await agentFor(t.app)
    const res = await client.agent.post('/api/auth/login').set('x-csrf-token', client.csrf).send({ email: 'nobody@test.example', password: 'whatever-it-is' }).expect(401)
    expect(res.body.error).toEqual({ code: 'invalid_credentials', message: 'Wrong e-mail address or password.', details: null })
  })

  it('refuses a deactivated account with 403 once the password is right', async () => {
    const { user, password } = await makeUser('classifier', { active: false })
    const client = await agentFor(t.app)
    const res = await client.agent.post('/api/auth/login').set('x-csrf-token', client.csrf).send({ email: user.email, password }).expect(403)
    expect(res.body.error.code).toBe('account_inactive')
  })

  it('refuses a request without the CSRF token', async () => {
    const { user, password } = await makeUser('observer')
    const agent = supertest.agent(t.app)
    const res = await agent.post('/api/auth/login').send({ email: user.email, password }).expect(403)
    expect(res.body.error.code).toBe('csrf_failed')
  })

  it('changes the session id at sign-in, against session fixation', async () => {
    const { user, password } = await makeUser('observer')
    const agent = supertest.agent(t.app)
    const before = sessionCookie(await agent.get('/api/auth/csrf'))
    const csrf = (await agent.get('/api/auth/csrf')).body.csrfToken
    const login = await agent.post('/api/auth/login').set('x-csrf-token', csrf).send({ email: user.email, password }).expect(200)
    const after = sessionCookie(login)
    expect(before).not.toBeNull()
    expect(after).not.toBeNull()
    expect(after).not.toBe(before)
  })

  it('sets an httpOnly, SameSite session cookie', async () => {
    const res = await supertest(t.app).get('/api/auth/csrf')
    const raw = String((res.headers['set-cookie'] as unknown as string[])[0])
    expect(raw).toMatch(/HttpOnly/i)
    expect(raw).toMatch(/SameSite=Lax/i)
  })

  it('rate-limits failed attempts on one account', async () => {
    const limited = await import('../helpers/context').then((m) => m.createTestContext({ LOGIN_MAX_ATTEMPTS: 3 }))
    try {
      const { user } = await makeUser('observer')
      const client = await agentFor(limited.app)
      const codes: number[] = []
      for (let i = 0; i < 5; i++) {
        const res = await client.agent
          .post('/api/auth/login')
          .set('x-csrf-token', client.csrf)
          .send({ email: user.email, password: `wrong-${i}-xxxx` })
        codes.push(res.status)
      }
      expect(codes).toEqual([401, 401, 401, 429, 429])
    } finally {
      await limited.close()
    }
  })
})

describe('sign-in rate limit per address', () => {
  it('also stops one address trying many accounts', async () => {
    const limited = await import('../helpers/context').then((m) => m.createTestContext({ LOGIN_MAX_ATTEMPTS: 1 }))
    try {
      const client = await agentFor(limited.app)
      const codes: number[] = []
      // Ten accounts, one wrong password each: the per-account rule alone would allow them all.
      for (let i = 0; i < 11; i++) {
        const res = await client.agent
          .post('/api/auth/login')
          .set('x-csrf-token', client.csrf)
          .send({ email: `nobody-${i}@test.example`, password: 'wrong-password' })
        codes.push(res.status)
      }
      expect(codes.slice(0, 10).every((c) => c === 401)).toBe(true)
      expect(codes[10]).toBe(429)
    } finally {
      await limited.close()
    }
  })
})

describe('sessions', () => {
  it('signs out, after which the API refuses the old cookie', async () => {
    const { user, password } = await makeUser('lead')
    const client = await signedInAgent(t.app, user.email, password)
    await client.agent.get('/api/me').expect(200)
    await client.agent.post('/api/auth/logout').set('x-csrf-token', client.csrf).expect(200)
    await client.agent.get('/api/me').expect(401)
  })

  it('survives a server restart: a new app instance over the same database knows the session', async () => {
    const { user, password } = await makeUser('classifier')
    const client = await signedInAgent(t.app, user.email, password)
    const cookie = sessionCookie(await client.agent.get('/api/me').expect(200))
    const again = await import('../helpers/context').then((m) => m.createTestContext())
    try {
      const res = await supertest(again.app).get('/api/me').set('Cookie', cookie!).expect(200)
      expect(res.body.user.id).toBe(user.id)
    } finally {
      await again.close()
    }
  })

  it('reads pages without writing the session, and writes the last-seen time again once it is a minute old', async () => {
    const { user, password } = await makeUser('observer')
    const client = await signedInAgent(t.app, user.email, password)
    const before = await Session.findOne({ where: { userId: user.id } })
    for (let i = 0; i < 5; i++) await client.agent.get('/api/me').expect(200)
    const after = await Session.findOne({ where: { userId: user.id } })
    expect(after!.updatedAt.getTime()).toBe(before!.updatedAt.getTime())
    expect(after!.data).toBe(before!.data)
    // A last-seen time over a minute old is brought up to date (and the row's expiry with it).
    const data = JSON.parse(after!.data)
    data.lastSeenAt = Date.now() - 61_000
    await after!.update({ data: JSON.stringify(data) })
    const stale = after!.updatedAt.getTime()
    await client.agent.get('/api/me').expect(200)
    const renewed = await Session.findOne({ where: { userId: user.id } })
    expect(JSON.parse(renewed!.data).lastSeenAt).toBeGreaterThan(Date.now() - 10_000)
    expect(renewed!.updatedAt.getTime()).toBeGreaterThanOrEqual(stale)
  })

  it('ends a session that has been idle longer than the idle lifetime', async () => {
    const { user, password } = await makeUser('observer')
    const client = await signedInAgent(t.app, user.email, password)
    const row = await Session.findOne({ where: { userId: user.id } })
    const data = JSON.parse(row!.data)
    data.lastSeenAt = Date.now() - (t.ctx.config.SESSION_IDLE_MINUTES + 1) * 60_000
    await row!.update({ data: JSON.stringify(data) })
    const res = await client.agent.get('/api/me').expect(401)
    expect(res.body.error.code).toBe('session_expired')
  })

  it('ends a session older than the absolute lifetime even when in use', async () => {
    const { user, password } = await makeUser('observer')
    const client = await signedInAgent(t.app, user.email, password)
    const row = await Session.findOne({ where: { userId: user.id } })
    const data = JSON.parse(row!.data)
    data.startedAt = Date.now() - (t.ctx.config.SESSION_ABSOLUTE_HOURS * 60 + 1) * 60_000
    await row!.update({ data: JSON.stringify(data) })
    await client.agent.get('/api/me').expect(401)
  })
})

describe('bad requests', () => {
  it('answers malformed JSON with 400 and the error shape', async () => {
    const client = await agentFor(t.app)
    const res = await client.agent.post('/api/auth/login').set('x-csrf-token', client.csrf).set('content-type', 'application/json').send('{"email": ').expect(400)
    expect(res.body.error.code).toBe('malformed_json')
  })

  it('answers an oversize body with 413', async () => {
    const client = await agentFor(t.app)
    const res = await client.agent
      .post('/api/auth/login')
      .set('x-csrf-token', client.csrf)
      .send({ email: 'x'.repeat(2_000_000), password: 'x' })
      .expect(413)
    expect(res.body.error.code).toBe('payload_too_large')
  })

  it('refuses a role above the caller and writes nothing', async () => {
    const { user, password } = await makeUser('observer')
    const client = await signedInAgent(t.app, user.email, password)
    const before = await User.count()
    const res = await client.agent.post('/api/users').set('x-csrf-token', client.csrf).send({ email: 'new@test.example', name: 'New', role: 'lead' }).expect(403)
    expect(res.body.error.code).toBe('forbidden')
    expect(await User.count()).toBe(before)
  })

  it('names invalid fields with 422', async () => {
    const { user, password } = await makeUser('lead')
    const client = await signedInAgent(t.app, user.email, password)
    const res = await client.agent.post('/api/users').set('x-csrf-token', client.csrf).send({ email: 'not-an-address', name: '', role: 'astronaut' }).expect(422)
    expect(Object.keys(res.body.error.details.fields).sort()).toEqual(['email', 'name', 'role'])
  })

  it('answers an unknown API path with a JSON 404', async () => {
    const res = await supertest(t.app).get('/api/no-such-thing').expect(404)
    expect(res.body.error.code).toBe('not_found')
  })

  it('reports the database in the health check', async () => {
    const res = await supertest(t.app).get('/api/health').expect(200)
    expect(res.body).toEqual({ status: 'ok', database: 'ok' })
  })

  it('sends security headers', async () => {
    const res = await supertest(t.app).get('/api/health')
    expect(res.headers['x-content-type-options']).toBe('nosniff')
    expect(res.headers['content-security-policy']).toContain("default-src 'self'")
    expect(res.headers['x-powered-by']).toBeUndefined()
  })
})
