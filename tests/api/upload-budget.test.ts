import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Campaign, CampaignMember, Spectrum } from '../../server/models'
import { closeDatabase, createTestContext, makeUser, signedInAgent, type TestContext } from '../helpers/context'
import { syntheticTextSpectrum } from '../helpers/spectra'

let seed = 900_000 + Math.floor(Math.random() * 1e6)
afterAll(closeDatabase)

async function observerIn(t: TestContext) {
  const campaign = await Campaign.create({ code: `UB-${Date.now()}-${seed}`, name: 'Upload allowance', description: '' })
  const { user, password } = await makeUser('observer')
  await CampaignMember.create({ campaignId: campaign.id, userId: user.id })
  return { campaign, user, client: await signedInAgent(t.app, user.email, password) }
}

describe('upload allowance per person', () => {
  let t: TestContext
  beforeAll(async () => {
    // Four API requests a minute, but ten files: uploads are counted by what they carry.
    t = await createTestContext({ API_RATE_PER_MINUTE: 4, UPLOAD_FILES_PER_MINUTE: 10 })
  })
  afterAll(() => t.close())

  it('takes many one-file uploads past the per-request limit, then refuses files over the allowance with Retry-After', async () => {
    const { campaign, user, client } = await observerIn(t)
    const send = (n: number) => {
      let req = client.agent.post('/api/spectra').set('x-csrf-token', client.csrf).field('campaignId', String(campaign.id))
      for (let i = 0; i < n; i++) req = req.attach('files', syntheticTextSpectrum(seed++), `allow-${seed}.txt`)
      return req
    }
    for (let i = 0; i < 6; i++) await send(1).expect(200)
    await send(4).expect(200)
    const refused = await send(1).expect(429)
    expect(refused.body.error.code).toBe('upload_allowance_used')
    const wait = Number(refused.headers['retry-after'])
    // One file's worth of a ten-a-minute allowance comes back in six seconds.
    expect(wait).toBeGreaterThanOrEqual(1)
    expect(wait).toBeLessThanOrEqual(6)
    expect(await Spectrum.count({ where: { submittedBy: user.id } })).toBe(10)
  })

  it('counts each person on their own', async () => {
    const { campaign, client } = await observerIn(t)
    const res = await client.agent.post('/api/spectra').set('x-csrf-token', client.csrf).field('campaignId', String(campaign.id)).attach('files', syntheticTextSpectrum(seed++), 'other.txt')
    expect(res.status).toBe(200)
  })
})

describe('upload allowance in bytes', () => {
  let t: TestContext
  beforeAll(async () => {
    t = await createTestContext({ UPLOAD_BYTES_PER_MINUTE: 160_000 })
  })
  afterAll(() => t.close())

  it('refuses an upload the byte allowance cannot take before reading it', async () => {
    const { campaign, user, client } = await observerIn(t)
    let req = client.agent.post('/api/spectra').set('x-csrf-token', client.csrf).field('campaignId', String(campaign.id))
    for (let i = 0; i < 3; i++) req = req.attach('files', syntheticTextSpectrum(seed++), `bytes-${i}.txt`)
    await req.expect(200)
    const big = await client.agent.post('/api/spectra').set('x-csrf-token', client.csrf).field('campaignId', String(campaign.id)).attach('files', syntheticTextSpectrum(seed++), 'over.txt')
    expect(big.status).toBe(429)
    expect(Number(big.headers['retry-after'])).toBeGreaterThan(0)
    expect(await Spectrum.count({ where: { submittedBy: user.id } })).toBe(3)
  })
})
