import { spawn } from 'node:child_process'
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { setTimeout as sleep } from 'node:timers/promises'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { privateDatabase } from '../helpers/private-db'
import { freePort, httpClient, startServer, type RunningServer } from '../helpers/server'
import { syntheticTextSpectrum } from '../helpers/spectra'

let db: Awaited<ReturnType<typeof privateDatabase>>
let server: RunningServer | null = null
let campaignId: number
let backups: string
const serverEnv = () => ({ ...db.env, JOB_POLL_SECONDS: '0.5', WORKERS: '1' })

beforeAll(async () => {
  db = await privateDatabase()
  campaignId = await db.campaign('BAK')
  await db.person('observer', 'observer@backup.example', 'observer password', campaignId)
  await db.person('classifier', 'classifier@backup.example', 'classifier password', campaignId)
  await db.person('lead', 'lead@backup.example', 'lead password')
  backups = mkdtempSync(join(tmpdir(), 'lineweight-backups-'))
  server = await startServer(serverEnv())
}, 120_000)
afterAll(async () => {
  await server?.stop()
  await db?.dispose()
  rmSync(backups, { recursive: true, force: true })
})

function script(name: string, args: string[]) {
  return new Promise<{ code: number | null; output: string }>((resolve) => {
    const child = spawn(process.execPath, [`scripts/${name}.mjs`, ...args], { env: { ...db.env, MANAGE_DB: '0', PORT: String(portForScripts) }, stdio: ['ignore', 'pipe', 'pipe'] })
    let output = ''
    child.stdout.on('data', (d: Buffer) => (output += d.toString()))
    child.stderr.on('data', (d: Buffer) => (output += d.toString()))
    child.on('exit', (code) => resolve({ code, output }))
  })
}
let portForScripts = 0

type Client = Awaited<ReturnType<typeof httpClient>>
const json = async <T>(res: Response) => (await res.json()) as T

async function snapshot(as: { observer: Client; lead: Client; classifier: Client }) {
  const spectra = await json<{ items: Array<{ id: number; objectName: string; status: string }> }>(await as.lead.call('GET', '/api/spectra?sort=id'))
  const histories = await Promise.all(spectra.items.map(async (s) => json<unknown>(await as.lead.call('GET', `/api/spectra/${s.id}/history`))))
  const releases = await json<{ releases: Array<{ id: number; rows: number; version: number }> }>(await as.lead.call('GET', '/api/releases'))
  const csv = await (await as.lead.call('GET', `/api/releases/${releases.releases[0]!.id}/download?format=csv`)).text()
  const files = await Promise.all(spectra.items.map(async (s) => Buffer.from(await (await as.observer.call('GET', `/api/spectra/${s.id}/file`)).arrayBuffer())))
  return { spectra: spectra.items, histories, releases: releases.releases, csv, files }
}

async function signIn(url: string) {
  return {
    observer: await httpClient(url, 'observer@backup.example', 'observer password'),
    classifier: await httpClient(url, 'classifier@backup.example', 'classifier password'),
    lead: await httpClient(url, 'lead@backup.example', 'lead password'),
  }
}

describe('npm run backup and npm run restore', () => {
  it('back up, wipe and restore: every spectrum, call, release and stored file is there again', async () => {
    const as = await signIn(server!.url)
    const bytes = [syntheticTextSpectrum(101), syntheticTextSpectrum(102)]
    const ids: number[] = []
    for (const [i, b] of bytes.entries()) {
      const form = new FormData()
      form.append('campaignId', String(campaignId))
      form.append('files', new Blob([b]), `backup-star-${i}.txt`)
      ids.push((await json<{ results: Array<{ spectrumId: number }> }>(await as.observer.call('POST', '/api/spectra', form))).results[0]!.spectrumId)
    }
    for (let i = 0; i < 600; i++) {
      const list = await json<{ items: Array<{ status: string }> }>(await as.lead.call('GET', '/api/spectra'))
      if (list.items.length === 2 && list.items.every((s) => s.status === 'suggested')) break
      await sleep(100)
    }
    expect((await as.classifier.call('POST', `/api/spectra/${ids[0]}/calls`, { acceptedSuggestion: true, confidence: 2 })).status).toBe(201)
    expect((await as.lead.call('POST', '/api/releases', { campaignId, title: 'Backed-up release' })).status).toBe(201)
    const before = await snapshot(as)
    expect(before.spectra).toHaveLength(2)
    expect(before.releases).toHaveLength(1)
    expect(before.files.map((f) => f.length)).toEqual(bytes.map((b) => b.length))

    portForScripts = await freePort()
    const folder = join(backups, 'today')
    const backup = await script('backup', [folder])
    expect(backup.code, backup.output).toBe(0)
    expect(existsSync(join(folder, 'database.sql'))).toBe(true)
    expect(JSON.parse(readFileSync(join(folder, 'manifest.json'), 'utf8')).files.count).toBe(2)

    // A bad day: the server stops, the tables and the stored files are gone.
    await server!.stop()
    server = null
    await db.sql.query('SET FOREIGN_KEY_CHECKS = 0')
    const [tables] = (await db.sql.query('SHOW TABLES')) as [Array<Record<string, string>>, unknown]
    for (const t of tables) await db.sql.query(`DROP TABLE \`${Object.values(t)[0]}\``)
    await db.sql.query('SET FOREIGN_KEY_CHECKS = 1')
    rmSync(db.env.STORAGE_DIR!, { recursive: true, force: true })

    const refused = await script('restore', [join(backups, 'nothing-here')])
    expect(refused.code).toBe(1)
    expect(refused.output).toMatch(/not a Lineweight backup/)
    const restore = await script('restore', [folder])
    expect(restore.code, restore.output).toBe(0)

    server = await startServer(serverEnv())
    const after = await snapshot(await signIn(server.url))
    expect(after.spectra).toEqual(before.spectra)
    expect(after.histories).toEqual(before.histories)
    expect(after.releases).toEqual(before.releases)
    expect(after.csv).toBe(before.csv)
    expect(after.files.map((f) => f.toString('utf8'))).toEqual(bytes.map((b) => b.toString('utf8')))
    expect(JSON.stringify(after.histories)).toMatch(/accept/i)
  }, 240_000)
})
