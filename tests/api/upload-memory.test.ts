import { randomBytes } from 'node:crypto'
import { mkdtempSync, readdirSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { setTimeout as sleep } from 'node:timers/promises'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Campaign, CampaignMember, type User } from '../../server/models'
import { uploadSlots } from '../../server/middleware/upload'
import { closeDatabase, createTestContext, makeUser, type TestContext } from '../helpers/context'
import { syntheticTextSpectrum } from '../helpers/spectra'
import { httpClient, startServer, treeRss, type RunningServer } from '../helpers/server'

const MB = 1024 * 1024
let t: TestContext
let server: RunningServer
let storage: string
const people: Array<{ user: User; password: string }> = []
let campaign: Campaign

beforeAll(async () => {
  t = await createTestContext()
  campaign = await Campaign.create({ code: `MEM-${randomBytes(3).toString('hex')}`, name: 'Memory fields', description: '' })
  for (let i = 0; i < 2; i++) {
    const p = await makeUser('observer')
    await CampaignMember.create({ campaignId: campaign.id, userId: p.user.id })
    people.push(p)
  }
  storage = mkdtempSync(join(tmpdir(), 'lineweight-files-'))
  server = await startServer({ STORAGE_DIR: storage, UPLOADS_PER_USER: '2', UPLOADS_TOTAL: '8' })
}, 90_000)
afterAll(async () => {
  await server?.stop()
  rmSync(storage, { recursive: true, force: true })
  await t.close()
  await closeDatabase()
})

function batch(files: Array<[string, Uint8Array]>) {
  const form = new FormData()
  form.append('campaignId', String(campaign.id))
  for (const [name, bytes] of files) form.append('files', new Blob([bytes]), name)
  return form
}

describe('concurrent large uploads', () => {
  it('stream to disk, so the server’s memory stays bounded, and a third upload of one person waits its turn', async () => {
    const [a, b] = [await httpClient(server.url, people[0]!.user.email, people[0]!.password), await httpClient(server.url, people[1]!.user.email, people[1]!.password)]
    // Four files of 45 MB that are not spectra: the server reads each one and refuses it.
    const big = Array.from({ length: 4 }, (_, i) => [`noise-${i}.fits`, randomBytes(45 * MB)] as [string, Uint8Array])
    await sleep(1000)
    const before = treeRss(server.process.pid!)
    let peak = before
    const sampler = setInterval(() => (peak = Math.max(peak, treeRss(server.process.pid!))), 25)
    try {
      const heavy = [a.call('POST', '/api/spectra', batch(big)), a.call('POST', '/api/spectra', batch(big))]
      await sleep(300)
      const third = await a.call('POST', '/api/spectra', batch([['small.txt', syntheticTextSpectrum(Date.now())]]))
      expect(third.status).toBe(429)
      expect(third.headers.get('retry-after')).toBe('5')
      expect(((await third.json()) as { error: { code: string } }).error.code).toBe('too_many_uploads')
      // Someone else is not held up by it.
      const other = await b.call('POST', '/api/spectra', batch([['other.txt', syntheticTextSpectrum(Date.now() + 1)]]))
      expect(other.status).toBe(200)
      const answers = await Promise.all(heavy)
      expect(answers.map((r) => r.status)).toEqual([200, 200])
      for (const r of answers) {
        const body = (await r.json()) as { results: Array<{ outcome: string }> }
        expect(body.results.map((x) => x.outcome)).toEqual(['refused', 'refused', 'refused', 'refused'])
      }
    } finally {
      clearInterval(sampler)
    }
    const growth = (peak - before) / MB
    console.log(`server RSS during two concurrent 4 × 45 MB uploads: ${(before / MB).toFixed(0)} MB before, ${(peak / MB).toFixed(0)} MB at the peak (+${growth.toFixed(0)} MB)`)
    // Held in memory, the two bodies alone would be 360 MB; streamed, one 45 MB file per request is read at a time.
    expect(growth).toBeLessThan(250)
    // Nothing is left behind in the upload folder.
    await sleep(200)
    expect(readdirSync(join(storage, '.incoming'))).toEqual([])
  }, 120_000)
})

describe('uploadSlots', () => {
  const run = (mw: ReturnType<typeof uploadSlots>, userId: number) => {
    const handlers: Record<string, () => void> = {}
    const res = { set: () => res, once: (e: string, f: () => void) => (handlers[e] = f) }
    let error: unknown = null
    try {
      mw({ user: { id: userId } } as never, res as never, () => undefined)
    } catch (e) {
      error = e
    }
    return { error: error as { status?: number; code?: string } | null, finish: () => handlers.finish?.() }
  }

  it('bounds uploads per person and overall, and frees a slot when an upload ends', () => {
    const slots = uploadSlots(1, 2)
    const first = run(slots, 1)
    expect(first.error).toBeNull()
    expect(run(slots, 1).error).toMatchObject({ status: 429, code: 'too_many_uploads' })
    expect(run(slots, 2).error).toBeNull()
    expect(run(slots, 3).error).toMatchObject({ status: 429 })
    first.finish()
    expect(run(slots, 3).error).toBeNull()
  })
})
