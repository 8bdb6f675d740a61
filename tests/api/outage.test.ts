import { setTimeout as sleep } from 'node:timers/promises'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { privateDatabase } from '../helpers/private-db'
import { httpClient, startServer, type RunningServer } from '../helpers/server'
import { syntheticTextSpectrum } from '../helpers/spectra'

let db: Awaited<ReturnType<typeof privateDatabase>>
let server: RunningServer
let campaignId: number

beforeAll(async () => {
  db = await privateDatabase()
  campaignId = await db.campaign('OUT')
  await db.person('observer', 'observer@outage.example', 'observer password', campaignId)
  server = await startServer({ ...db.env, JOB_POLL_SECONDS: '0.5', JOB_LEASE_SECONDS: '3', DB_RETRY_AFTER_SECONDS: '4', WORKERS: '1' })
}, 120_000)
afterAll(async () => {
  await server?.stop()
  await db?.dispose()
})

const upload = (client: Awaited<ReturnType<typeof httpClient>>, seed: number) => {
  const form = new FormData()
  form.append('campaignId', String(campaignId))
  form.append('files', new Blob([syntheticTextSpectrum(seed)]), `star-${seed}.txt`)
  return client.call('POST', '/api/spectra', form)
}

async function statusOf(spectrumId: number) {
  const [[row]] = (await db.sql.query(
    'SELECT sp.status AS spectrum, (SELECT status FROM processing_jobs j WHERE j.spectrum_id = sp.id ORDER BY j.id DESC LIMIT 1) AS job FROM spectra sp WHERE sp.id = ?',
    { replacements: [spectrumId] },
  )) as [Array<{ spectrum: string; job: string }>, unknown]
  return row!
}

async function waitFor<T>(what: string, seconds: number, probe: () => Promise<T | null>): Promise<T> {
  const until = Date.now() + seconds * 1000
  for (;;) {
    const value = await probe().catch(() => null)
    if (value !== null) return value
    if (Date.now() > until) throw new Error(`${what} did not happen within ${seconds} s`)
    await sleep(100)
  }
}

describe('a MariaDB outage', () => {
  it('answers 503 "database unavailable" with Retry-After, then recovers and resumes processing by itself', async () => {
    const observer = await httpClient(server.url, 'observer@outage.example', 'observer password')
    const first = await upload(observer, 1)
    expect(first.status).toBe(200)
    const firstId = ((await first.json()) as { results: Array<{ spectrumId: number }> }).results[0]!.spectrumId
    await waitFor('processing of the first spectrum', 60, async () => ((await statusOf(firstId)).job === 'done' ? true : null))

    // A job left running by a runner that died with the database: its lease lapses during the outage.
    const second = await upload(observer, 2)
    const secondId = ((await second.json()) as { results: Array<{ spectrumId: number }> }).results[0]!.spectrumId
    await waitFor('processing of the second spectrum', 60, async () => ((await statusOf(secondId)).job === 'done' ? true : null))
    await db.sql.query("UPDATE processing_jobs SET status = 'running', started_at = NOW(3), lease_expires_at = NOW(3) + INTERVAL 1 SECOND WHERE spectrum_id = ?", { replacements: [secondId] })
    await db.sql.query("UPDATE spectra SET status = 'received' WHERE id = ?", { replacements: [secondId] })
    await db.sql.close().catch(() => undefined)
    await db.stop()

    for (const [method, path] of [
      ['GET', '/api/spectra'],
      ['GET', '/api/me'],
      ['GET', `/api/spectra/${firstId}`],
      ['POST', '/api/auth/login'],
    ] as const) {
      const res = await observer.call(method, path, method === 'POST' ? { email: 'observer@outage.example', password: 'observer password' } : undefined)
      expect(`${method} ${path} ${res.status}`).toBe(`${method} ${path} 503`)
      expect(res.headers.get('retry-after')).toBe('4')
      const body = (await res.json()) as { error: { code: string; message: string } }
      expect(body.error.code).toBe('database_unavailable')
      expect(body.error.message).toMatch(/database is unavailable/)
    }
    const refused = await upload(observer, 3)
    expect(refused.status).toBe(503)
    const health = await observer.call('GET', '/api/health')
    expect(health.status).toBe(503)
    expect(health.headers.get('retry-after')).toBe('4')
    await sleep(2000)

    await db.start()
    const back = Date.now()
    await waitFor('the API answering again', 30, async () => ((await observer.call('GET', '/api/spectra')).status === 200 ? true : null))
    const apiSeconds = (Date.now() - back) / 1000
    // No new upload: the timer finds the lapsed job and runs it.
    db.sql = new (db.sql.constructor as typeof import('sequelize').Sequelize)(db.env.DB_NAME!, db.env.DB_USER!, db.env.DB_PASSWORD!, {
      host: '127.0.0.1',
      port: db.port,
      dialect: 'mariadb',
      logging: false,
    })
    await waitFor('processing of the stalled spectrum', 60, async () => {
      const s = await statusOf(secondId)
      return s.job === 'done' && s.spectrum !== 'received' ? true : null
    })
    const jobSeconds = (Date.now() - back) / 1000
    console.log(`outage recovery after MariaDB came back: API answering in ${apiSeconds.toFixed(1)} s, the stalled job done in ${jobSeconds.toFixed(1)} s (poll 0.5 s, lease 3 s)`)
    expect(apiSeconds).toBeLessThan(10)
    // The re-run the observer would ask for is accepted again.
    const rerun = await observer.call('POST', `/api/spectra/${secondId}/process`, {})
    expect(rerun.status).toBe(202)
  }, 180_000)
})
