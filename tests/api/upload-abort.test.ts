import { request } from 'node:http'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Campaign } from '../../server/models'
import { createToken } from '../../server/services/tokens.service'
import { closeDatabase, createTestContext, makeUser, type TestContext } from '../helpers/context'
import { startServer, type RunningServer } from '../helpers/server'
import { syntheticTextSpectrum } from '../helpers/spectra'
import { makeCampaign } from '../helpers/world'

let t: TestContext
let server: RunningServer
let campaign: Campaign
let token: string

beforeAll(async () => {
  t = await createTestContext()
  server = await startServer({ WORKERS: '1' })
  const { user } = await makeUser('observer', { name: 'Interrupted Observer' })
  campaign = await makeCampaign('abort', [{ user } as never])
  token = (await createToken(user, { name: 'interrupted pipeline', expiresInDays: null })).secret
}, 120_000)
afterAll(async () => {
  await server?.stop()
  await t.close()
  await closeDatabase()
})

describe('an upload whose client goes away mid-file', () => {
  it('leaves the server answering, and the same person can upload again at once', async () => {
    const boundary = 'lineweight-abort-boundary'
    const whole = syntheticTextSpectrum(2001)
    const head = `--${boundary}\r\nContent-Disposition: form-data; name="campaignId"\r\n\r\n${campaign.id}\r\n--${boundary}\r\nContent-Disposition: form-data; name="files"; filename="a.txt"\r\nContent-Type: text/plain\r\n\r\n`
    // One whole file, then half of a second: the socket closes while the second is being written.
    const body = Buffer.concat([
      Buffer.from(head),
      whole,
      Buffer.from(`\r\n--${boundary}\r\nContent-Disposition: form-data; name="files"; filename="b.txt"\r\nContent-Type: text/plain\r\n\r\n`),
      whole.subarray(0, whole.length >> 1),
    ])
    await new Promise<void>((resolve) => {
      const req = request(`${server.url}/api/spectra`, {
        method: 'POST',
        headers: { authorization: `Bearer ${token}`, 'content-type': `multipart/form-data; boundary=${boundary}`, 'content-length': body.length + whole.length },
      })
      req.on('error', () => resolve())
      req.on('response', (res) => {
        res.resume()
        resolve()
      })
      req.write(body, () => setTimeout(() => req.destroy(), 300))
    })
    await new Promise((resolve) => setTimeout(resolve, 500))
    const health = await fetch(`${server.url}/api/health`).catch(() => null)
    expect(health?.status, `the server went away; it printed:\n${server.output()}`).toBe(200)

    const form = new FormData()
    form.append('campaignId', String(campaign.id))
    form.append('files', new Blob([syntheticTextSpectrum(2002)]), 'c.txt')
    const again = await fetch(`${server.url}/api/spectra`, { method: 'POST', headers: { authorization: `Bearer ${token}` }, body: form })
    expect(again.status).toBe(200)
    const results = ((await again.json()) as { results: Array<{ outcome: string }> }).results
    expect(results.map((r) => r.outcome)).toEqual(['accepted'])
  })
})
