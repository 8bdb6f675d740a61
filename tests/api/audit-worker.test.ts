import { createServer } from 'node:net'
import { afterAll, describe, expect, it } from 'vitest'

const savedPort = process.env.DB_PORT
afterAll(() => {
  process.env.DB_PORT = savedPort
})

/** A loopback port nothing listens on: bound, read, closed. */
async function closedPort(): Promise<number> {
  const server = createServer()
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve))
  const { port } = server.address() as { port: number }
  await new Promise((resolve) => server.close(resolve))
  return port
}

describe('the audit worker thread', () => {
  it('tries again, then says the database is unavailable instead of throwing an error that loses its kind between threads', async () => {
    process.env.DB_PORT = String(await closedPort())
    const { default: report } = await import('../../server/jobs/audit-worker')
    const started = Date.now()
    const answer = await report({ campaign: { id: 1, code: 'X', name: 'X' }, campaignId: 1, from: null, to: null })
    expect(answer).toEqual({ databaseUnavailable: expect.stringMatching(/ECONNREFUSED|connect/i) })
    // Three tries with back-off (100 and 200 ms, each ×0.5–1.5) before giving up.
    expect(Date.now() - started).toBeGreaterThanOrEqual(150)
  })
})
