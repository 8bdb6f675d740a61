import { Op } from 'sequelize'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { settleBackground } from '../../server/lib/background'
import { MailMessage, User } from '../../server/models'
import { agentFor, closeDatabase, createTestContext, makeUser, signedInAgent, uniqueEmail, type TestContext } from '../helpers/context'
import { send, signedInPerson } from '../helpers/review'
import { makeCampaign, suggested } from '../helpers/world'

let t: TestContext
beforeAll(async () => {
  t = await createTestContext()
})
afterAll(async () => {
  await t.close()
  await closeDatabase()
})

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b)
  return s.length % 2 ? s[s.length >> 1]! : (s[s.length / 2 - 1]! + s[s.length / 2]!) / 2
}
const mailsTo = (address: string) => MailMessage.count({ where: { toAddresses: { [Op.like]: `%${address}%` } } })

describe('password reset', () => {
  it('answers a known and an unknown address alike, in the same time, and mails outside the request', async () => {
    const fast = await createTestContext({ RESET_MAX_REQUESTS: 10_000 })
    try {
      const { user } = await makeUser('observer')
      const unknown = uniqueEmail('nobody')
      const anon = await agentFor(fast.app)
      const times: Record<'known' | 'unknown', number[]> = { known: [], unknown: [] }
      const bodies = new Set<string>()
      for (let i = 0; i < 25; i++) {
        for (const [kind, email] of [
          ['known', user.email],
          ['unknown', unknown],
        ] as const) {
          const started = process.hrtime.bigint()
          const res = await send(anon, 'post', '/api/auth/forgot', { email })
          times[kind].push(Number(process.hrtime.bigint() - started) / 1e6)
          expect(res.status).toBe(202)
          bodies.add(JSON.stringify(res.body))
          // Each request is timed on an idle server, as a prober would see it.
          await settleBackground()
        }
      }
      await settleBackground()
      const known = median(times.known)
      const unknownMedian = median(times.unknown)
      console.log(`password reset medians over 25 requests each: known address ${known.toFixed(1)} ms, unknown address ${unknownMedian.toFixed(1)} ms`)
      expect(bodies.size).toBe(1)
      // Timing tolerance: common practice for a constant-time answer (within noise of a loopback request).
      expect(Math.abs(known - unknownMedian)).toBeLessThan(3 + 0.5 * Math.min(known, unknownMedian))
      expect(await mailsTo(user.email)).toBe(25)
      expect(await mailsTo(unknown)).toBe(0)
    } finally {
      await fast.close()
    }
  }, 60_000)

  it('counts every request from an address, not only failed ones', async () => {
    const limited = await createTestContext({ RESET_MAX_REQUESTS: 5 })
    try {
      const { user } = await makeUser('observer')
      const anon = await agentFor(limited.app)
      const statuses: number[] = []
      for (let i = 0; i < 100; i++) statuses.push((await send(anon, 'post', '/api/auth/forgot', { email: user.email })).status)
      await settleBackground()
      expect(statuses.filter((s) => s === 202)).toHaveLength(5)
      expect(statuses.filter((s) => s === 429)).toHaveLength(95)
      expect(await mailsTo(user.email)).toBe(5)
    } finally {
      await limited.close()
    }
  })
})

describe('changing the password', () => {
  it('ends the account’s other sessions and keeps this one', async () => {
    const { user, password } = await makeUser('classifier')
    const here = await signedInAgent(t.app, user.email, password)
    const elsewhere = await signedInAgent(t.app, user.email, password)
    await send(here, 'post', '/api/me/password', { currentPassword: password, newPassword: 'a new long secret' }).expect(200)
    await here.agent.get('/api/me').expect(200)
    await elsewhere.agent.get('/api/me').expect(401)
  })
})

describe('X-Forwarded-For', () => {
  const failedSignIns = async (app: TestContext['app'], email: string) => {
    const anon = await agentFor(app)
    const statuses: number[] = []
    for (let i = 0; i < 6; i++) {
      const res = await anon.agent
        .post('/api/auth/login')
        .set('x-csrf-token', anon.csrf)
        .set('x-forwarded-for', `203.0.113.${i + 1}`)
        .send({ email, password: 'wrong password' })
      statuses.push(res.status)
    }
    return statuses
  }

  it('is ignored unless TRUST_PROXY is set, so rotating it does not escape the sign-in limit', async () => {
    const direct = await createTestContext({ LOGIN_MAX_ATTEMPTS: 3 })
    try {
      const { user } = await makeUser('observer')
      expect(await failedSignIns(direct.app, user.email)).toEqual([401, 401, 401, 429, 429, 429])
    } finally {
      await direct.close()
    }
  })

  it('gives the client address from the proxy when TRUST_PROXY names it', async () => {
    const proxied = await createTestContext({ LOGIN_MAX_ATTEMPTS: 3, TRUST_PROXY: 'loopback' })
    try {
      const { user } = await makeUser('observer')
      expect(await failedSignIns(proxied.app, user.email)).toEqual([401, 401, 401, 401, 401, 401])
    } finally {
      await proxied.close()
    }
  })

  it('does not escape the API rate limit either', async () => {
    const direct = await createTestContext({ API_RATE_PER_MINUTE: 5 })
    try {
      const anon = await agentFor(direct.app)
      const statuses: number[] = []
      for (let i = 0; i < 8; i++) statuses.push((await anon.agent.get('/api/health').set('x-forwarded-for', `198.51.100.${i + 1}`)).status)
      expect(statuses.filter((s) => s === 429).length).toBeGreaterThanOrEqual(3)
    } finally {
      await direct.close()
    }
  })
})

describe('the last active lead', () => {
  it('stays a lead when two leads demote each other at once', async () => {
    const others = await User.findAll({ where: { role: 'lead', active: true }, attributes: ['id'] })
    await User.update({ active: false }, { where: { id: { [Op.in]: others.map((u) => u.id) } } })
    try {
      const a = await signedInPerson(t.app, 'lead', 'Lead Ada')
      const b = await signedInPerson(t.app, 'lead', 'Lead Ben')
      const [ab, ba] = await Promise.all([send(a.client, 'patch', `/api/users/${b.user.id}`, { role: 'classifier' }), send(b.client, 'patch', `/api/users/${a.user.id}`, { role: 'classifier' })])
      expect([ab.status, ba.status].sort()).toEqual([200, 409])
      const refused = ab.status === 409 ? ab : ba
      expect(refused.body.error.code).toBe('last_lead')
      expect(await User.count({ where: { role: 'lead', active: true } })).toBe(1)
      // Deactivating the last one is refused the same way.
      const survivor = ab.status === 200 ? a : b
      const third = await signedInPerson(t.app, 'lead', 'Lead Cy')
      await send(survivor.client, 'patch', `/api/users/${third.user.id}`, { active: false }).expect(200)
      await third.client.agent.get('/api/me').expect(401)
    } finally {
      await User.update({ active: true }, { where: { id: { [Op.in]: others.map((u) => u.id) } } })
    }
  })
})

describe('review claims', () => {
  it('holds at most CLAIMS_MAX_OPEN open claims per classifier; a call or a release frees one', async () => {
    const capped = await createTestContext({ CLAIMS_MAX_OPEN: 3 })
    try {
      const observer = await signedInPerson(capped.app, 'observer', 'Queue Observer')
      const classifier = await signedInPerson(capped.app, 'classifier', 'Greedy Classifier')
      const colleague = await signedInPerson(capped.app, 'classifier', 'Patient Colleague')
      const campaign = await makeCampaign('Q', [observer, classifier, colleague])
      const items = []
      for (let i = 0; i < 6; i++) items.push(await suggested(capped.ctx.sequelize, campaign, observer))
      for (const s of items.slice(0, 3)) await send(classifier.client, 'post', `/api/queue/${s.id}/claim`).expect(200)
      const fourth = await send(classifier.client, 'post', `/api/queue/${items[3]!.id}/claim`).expect(409)
      expect(fourth.body.error.code).toBe('too_many_claims')
      expect(fourth.body.error.message).toMatch(/3/)
      // Claiming one already held again only extends it.
      await send(classifier.client, 'post', `/api/queue/${items[0]!.id}/claim`).expect(200)
      // The colleague still has work.
      const queue = await colleague.client.agent.get(`/api/queue?campaign=${campaign.id}`).expect(200)
      expect(queue.body.items).toHaveLength(3)
      await send(classifier.client, 'delete', `/api/queue/${items[0]!.id}/claim`).expect(204)
      await send(classifier.client, 'post', `/api/queue/${items[3]!.id}/claim`).expect(200)
      await send(classifier.client, 'post', `/api/spectra/${items[1]!.id}/calls`, { acceptedSuggestion: true, confidence: 2 }).expect(201)
      await send(classifier.client, 'post', `/api/queue/${items[4]!.id}/claim`).expect(200)
    } finally {
      await capped.close()
    }
  })

  it('are not taken by listing the queue or asking for the next item', async () => {
    const observer = await signedInPerson(t.app, 'observer', 'Queue Observer')
    const classifier = await signedInPerson(t.app, 'classifier', 'Browsing Classifier')
    const campaign = await makeCampaign('Q', [observer, classifier])
    for (let i = 0; i < 3; i++) await suggested(t.ctx.sequelize, campaign, observer)
    await classifier.client.agent.get(`/api/queue?campaign=${campaign.id}`).expect(200)
    await classifier.client.agent.get(`/api/queue/next?campaign=${campaign.id}`).expect(200)
    const queue = await classifier.client.agent.get(`/api/queue?campaign=${campaign.id}`).expect(200)
    expect(queue.body.items.map((i: { claim: { state: string } }) => i.claim.state)).toEqual(['free', 'free', 'free'])
  })
})

describe('the Outbox', () => {
  it('masks invitation and reset links for leads; the mail catcher keeps them', async () => {
    const lead = await signedInPerson(t.app, 'lead', 'Outbox Lead')
    const email = uniqueEmail('invitee')
    await send(lead.client, 'post', '/api/users', { email, name: 'Invited Person', role: 'observer' }).expect(201)
    const stored = await MailMessage.findOne({ where: { toAddresses: { [Op.like]: `%${email}%` } }, order: [['id', 'DESC']] })
    const token = /set-password\?token=([A-Za-z0-9_-]+)/.exec(stored!.text)?.[1]
    expect(token).toBeTruthy()
    const res = await lead.client.agent.get(`/api/outbox/${stored!.id}`).expect(200)
    expect(res.body.mail.text).not.toContain(token)
    expect(res.body.mail.text).not.toContain('set-password?token=')
    expect(res.body.mail.text).toContain('[single-use link hidden: only the recipient can use it]')

    const { user } = await makeUser('observer')
    const anon = await agentFor(t.app)
    await send(anon, 'post', '/api/auth/forgot', { email: user.email }).expect(202)
    await settleBackground()
    const reset = await MailMessage.findOne({ where: { toAddresses: { [Op.like]: `%${user.email}%` } }, order: [['id', 'DESC']] })
    const resetToken = /set-password\?token=([A-Za-z0-9_-]+)/.exec(reset!.text)?.[1]
    const shown = await lead.client.agent.get(`/api/outbox/${reset!.id}`).expect(200)
    expect(shown.body.mail.text).not.toContain(resetToken)
  })
})
