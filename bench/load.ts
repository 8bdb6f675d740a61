// `npm run bench:load`: ingest throughput through the API, then list, queue, review and audit
// latencies at 1 000, 10 000 and 100 000 spectra, each at concurrency 1 and 8. Everything runs on
// loopback in a throw-away MariaDB and redis-server; the table goes to bench/results/.
//
// Seeding, honestly: the first spectra are real uploads (FITS and text files drawn from the model
// standards, as the demo makes them) sent through POST /api/spectra and processed by the pipeline.
// Larger sizes copy those rows by SQL with new identities (file hash, object name, time): spectrum
// and current-suggestion rows are copied whole; the arrays and measurements are not (only the
// review of an original spectrum reads them, and that is what is timed). Calls are made by SQL from
// each suggestion (two classifiers on 62 % of the spectra, agreeing within a subtype), with the
// decisions that follow (at 100 000 spectra, about 62 000 called).
import { execFileSync, spawn, type ChildProcess } from 'node:child_process'
import { mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs'
import { availableParallelism, loadavg, tmpdir } from 'node:os'
import { join } from 'node:path'
import { QueryTypes, type Sequelize } from 'sequelize'
import { SERVER_NODE_FLAGS, WORKER_NODE_FLAGS, ensureDatabase, ensureDebianPackages, freePort, startMariaDB, startRedis } from '../scripts/lib/setup.mjs'
import { loadConfig } from '../server/config'
import { createSequelize } from '../server/db'
import { migrateUp } from '../server/db/migrate'
import { DEMO_ENTRIES, demoFits, demoObservation, demoText } from '../server/db/demo-spectra'
import { Campaign, CampaignMember, User } from '../server/models'
import { ensureDefaultLibrary } from '../server/services/standards.service'
import { hashPassword } from '../server/services/users.service'
import { QUEUE_PAGE_SIZE } from '../shared/api/queue'

const SIZES = (process.env.BENCH_SIZES ?? '1000,10000,100000')
  .split(',')
  .map(Number)
  .filter((n) => n > 0)
const INGEST_FILES = Number(process.env.BENCH_INGEST_FILES ?? 2000)
const FILES_PER_REQUEST = 50
const PASSWORD = 'bench-password-2026'
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms))
const say = (m: string) => console.log(`[bench:load] ${m}`)

// ---------------------------------------------------------------------------------------------
// Services
// ---------------------------------------------------------------------------------------------

ensureDebianPackages({ mariadbd: 'mariadb-server', mariadb: 'mariadb-client', 'redis-server': 'redis-server' })
const loadAtStart = loadavg()[0]!
const dir = mkdtempSync(join(tmpdir(), 'lineweight-bench-'))
const dbPort = Number(process.env.BENCH_DB_PORT ?? (await freePort()))
const db = await startMariaDB({ dir: join(dir, 'mariadb'), port: dbPort })
ensureDatabase({ socket: db.socket, name: 'lineweight_bench', user: 'lineweight_bench', password: 'lineweight-bench', grantAll: true })
const redis = await startRedis({ dir: join(dir, 'redis'), port: Number(process.env.BENCH_REDIS_PORT ?? (await freePort())) })
const baseEnv: NodeJS.ProcessEnv = {
  ...process.env,
  NODE_ENV: 'production',
  DB_HOST: '127.0.0.1',
  DB_PORT: String(dbPort),
  DB_NAME: 'lineweight_bench',
  DB_USER: 'lineweight_bench',
  DB_PASSWORD: 'lineweight-bench',
  SESSION_SECRET: 'bench-secret-bench-secret-bench-secret-0123',
  STORAGE_DIR: join(dir, 'files'),
  REDIS_URL: redis.url,
  LOG_LEVEL: 'warn',
  MAIL_MODE: 'fake',
  BCRYPT_ROUNDS: '4',
  // The benchmark is one client making many requests on purpose.
  API_RATE_PER_MINUTE: '1000000',
}
const config = loadConfig(baseEnv)
const sequelize: Sequelize = createSequelize(config)
await migrateUp(sequelize)
await ensureDefaultLibrary(sequelize)

const children: ChildProcess[] = []
function startProcess(script: string, env: NodeJS.ProcessEnv, ownFlags: string[] = []): ChildProcess {
  // BENCH_NODE_FLAGS, e.g. "--cpu-prof --cpu-prof-dir=/tmp/prof", goes to every server and worker process.
  const flags = [...ownFlags, ...(process.env.BENCH_NODE_FLAGS ?? '').split(' ').filter(Boolean)]
  const child = spawn('node_modules/.bin/tsx', [...flags, script], { env: { ...baseEnv, ...env }, detached: true, stdio: ['ignore', 'inherit', 'inherit'] })
  children.push(child)
  return child
}
async function stopProcess(child: ChildProcess): Promise<void> {
  if (child.pid && child.exitCode === null) {
    const exited = new Promise((r) => child.once('exit', r))
    process.kill(-child.pid, 'SIGTERM')
    await Promise.race([exited, sleep(10_000)])
  }
}
async function startServer(env: NodeJS.ProcessEnv): Promise<{ url: string; child: ChildProcess }> {
  const port = await freePort()
  const child = startProcess('server/index.ts', { PORT: String(port), SMTP_PORT: '0', ...env }, SERVER_NODE_FLAGS)
  const url = `http://127.0.0.1:${port}`
  for (let i = 0; ; i++) {
    if (child.exitCode !== null) throw new Error(`the server exited with ${child.exitCode}`)
    try {
      if ((await fetch(`${url}/api/health`)).ok) return { url, child }
    } catch {
      // not yet
    }
    if (i > 600) throw new Error('the server did not start within 60 s')
    await sleep(100)
  }
}

const CLOCK_TICKS = Number(execFileSync('getconf', ['CLK_TCK'], { encoding: 'utf8' }).trim())

/**
 * CPU seconds (user + system, every thread) used so far by the processes of the process groups
 * led by `groups` and by `pids`, from /proc/<pid>/stat (proc(5): fields 5, 14 and 15).
 */
function cpuSeconds(groups: number[], pids: number[] = []): number {
  let ticks = 0
  for (const entry of readdirSync('/proc')) {
    if (!/^\d+$/.test(entry)) continue
    let stat: string
    try {
      stat = readFileSync(`/proc/${entry}/stat`, 'utf8')
    } catch {
      continue // exited meanwhile
    }
    // The command name (field 2) may hold spaces: the fields after it start past its ')'.
    const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ')
    if (groups.includes(Number(fields[2])) || pids.includes(Number(entry))) ticks += Number(fields[11]) + Number(fields[12])
  }
  return ticks / CLOCK_TICKS
}
const mariadbPid = () => Number(readFileSync(join(dir, 'mariadb', 'mysqld.pid'), 'utf8').trim())

async function cleanup(): Promise<void> {
  await Promise.all(children.map(stopProcess))
  await sequelize.close().catch(() => undefined)
  await redis.stop()
  await db.stop()
  rmSync(dir, { recursive: true, force: true })
}
process.on('SIGINT', () => void cleanup().then(() => process.exit(130)))
// A failed step stops everything it started before the error is shown.
const fail = (error: unknown) => {
  console.error(error)
  void cleanup().finally(() => process.exit(1))
}
process.on('uncaughtException', fail)
process.on('unhandledRejection', fail)

// ---------------------------------------------------------------------------------------------
// People, sign-in
// ---------------------------------------------------------------------------------------------

async function person(role: 'lead' | 'classifier' | 'observer', name: string) {
  return User.create({ email: `${name.toLowerCase().replace(/\W+/g, '.')}@bench.example`, name, role, passwordHash: await hashPassword(PASSWORD, 4), active: true, lastLoginAt: null })
}
const lead = await person('lead', 'Bench Lead')
const classifierA = await person('classifier', 'Bench Classifier A')
const classifierB = await person('classifier', 'Bench Classifier B')
const observer = await person('observer', 'Bench Observer')

class Client {
  private cookie = ''
  csrf = ''
  constructor(readonly url: string) {}
  static async signIn(url: string, email: string): Promise<Client> {
    const c = new Client(url)
    const csrf = await c.request('GET', '/api/auth/csrf')
    c.csrf = ((await csrf.json()) as { csrfToken: string }).csrfToken
    const res = await c.request('POST', '/api/auth/login', JSON.stringify({ email, password: PASSWORD }), { 'content-type': 'application/json' })
    if (!res.ok) throw new Error(`sign-in of ${email} failed: ${res.status}`)
    c.csrf = ((await res.json()) as { csrfToken: string }).csrfToken
    return c
  }
  async request(method: string, path: string, body?: string | FormData, headers: Record<string, string> = {}): Promise<Response> {
    const res = await fetch(`${this.url}${path}`, { method, body, headers: { ...headers, cookie: this.cookie, ...(method === 'GET' ? {} : { 'x-csrf-token': this.csrf }) } })
    const set = res.headers.getSetCookie().find((c) => c.startsWith('lw.sid='))
    if (set) this.cookie = set.split(';')[0]!
    return res
  }
}

// ---------------------------------------------------------------------------------------------
// Ingest
// ---------------------------------------------------------------------------------------------

/** Real upload files: the demo's observations of the model standards, each with its own noise and velocity. */
function uploadFiles(count: number, salt: number): Array<{ name: string; bytes: Buffer }> {
  const files: Array<{ name: string; bytes: Buffer }> = []
  for (let i = 0; i < count; i++) {
    const base = DEMO_ENTRIES[i % DEMO_ENTRIES.length]!
    const target = { ...base, objectName: `KRF B${salt}-${i}`, rv: base.rv + ((i * 7) % 60) - 30 }
    const obs = demoObservation(target, salt * 1_000_003 + i)
    const date = new Date(Date.UTC(2026, 0, 1) + i * 60_000).toISOString().slice(0, 19)
    files.push(i % 2 === 0 ? { name: `b${salt}-${i}.fits`, bytes: demoFits(target, obs, date) } : { name: `b${salt}-${i}.txt`, bytes: demoText(target, obs, date) })
  }
  return files
}

interface IngestResult {
  label: string
  files: number
  seconds: number
  perSecond: number
  /** Seconds until the last file was answered; the rest of the run is the queue draining. */
  sendingSeconds: number
  /** Seconds for the untimed warm-up files, sent to the freshly started processes first. */
  warmUpSeconds: number
  /** CPU milliseconds per timed spectrum: web server and worker processes, MariaDB, and this benchmark's client. */
  cpuMsPerSpectrum: { server: number; database: number; client: number }
  failed: number
  refused: number
}

/** Untimed files sent first: enough that every processing thread takes some, loading its standards and preparing the level. */
const WARM_UP_FILES = 100

async function ingest(
  label: string,
  serverEnv: NodeJS.ProcessEnv,
  workerProcesses: number,
  warmUp: Array<{ name: string; bytes: Buffer }>,
  files: Array<{ name: string; bytes: Buffer }>,
  campaign: Campaign,
): Promise<IngestResult> {
  const server = await startServer(serverEnv)
  const workers = Array.from({ length: workerProcesses }, () => startProcess('server/worker.ts', { ...serverEnv, WORKERS: '1' }, WORKER_NODE_FLAGS))
  await sleep(workerProcesses > 0 ? 4000 : 500)
  const client = await Client.signIn(server.url, observer.email)
  let refused = 0
  /**
   * Sends `list` two requests at a time, as the Submit screen does, and waits until every job of
   * `into` is done: the seconds, and the seconds until the last file was answered.
   */
  const upload = async (list: Array<{ name: string; bytes: Buffer }>, into: Campaign) => {
    const started = performance.now()
    const batches: Array<typeof list> = []
    for (let i = 0; i < list.length; i += FILES_PER_REQUEST) batches.push(list.slice(i, i + FILES_PER_REQUEST))
    const send = async () => {
      for (let batch = batches.shift(); batch; batch = batches.shift()) {
        for (;;) {
          const form = new FormData()
          form.append('campaignId', String(into.id))
          form.append('resolutionFwhm', '3.2')
          for (const f of batch) form.append('files', new Blob([f.bytes]), f.name)
          const res = await client.request('POST', '/api/spectra', form)
          if (res.status === 429 || res.status === 503) {
            await sleep(Number(res.headers.get('retry-after') ?? 1) * 1000)
            continue
          }
          if (!res.ok) throw new Error(`upload answered ${res.status}: ${await res.text()}`)
          const body = (await res.json()) as { results: Array<{ outcome: string }> }
          refused += body.results.filter((r) => r.outcome !== 'accepted').length
          break
        }
      }
    }
    await Promise.all([send(), send()])
    const sendingSeconds = (performance.now() - started) / 1000
    for (;;) {
      const [row] = await sequelize.query<{ open: number }>(
        "SELECT COUNT(*) AS open FROM processing_jobs j JOIN spectra s ON s.id = j.spectrum_id WHERE s.campaign_id = :c AND j.status IN ('queued', 'running')",
        { replacements: { c: into.id }, type: QueryTypes.SELECT },
      )
      if (Number(row!.open) === 0) break
      await sleep(100)
    }
    return { seconds: (performance.now() - started) / 1000, sendingSeconds }
  }
  // Into a campaign of their own, so the benchmark campaign holds the timed files alone.
  const warmUpCampaign = await ingestCampaign(`${campaign.code}-W`)
  const warmUpSeconds = (await upload(warmUp, warmUpCampaign)).seconds
  const groups = [server.child, ...workers].map((c) => c.pid!)
  const before = { server: cpuSeconds(groups), database: cpuSeconds([], [mariadbPid()]), client: process.cpuUsage() }
  const { seconds, sendingSeconds } = await upload(files, campaign)
  const clientCpu = process.cpuUsage(before.client)
  const perSpectrum = (cpu: number) => (1000 * cpu) / files.length
  const cpuMsPerSpectrum = {
    server: perSpectrum(cpuSeconds(groups) - before.server),
    database: perSpectrum(cpuSeconds([], [mariadbPid()]) - before.database),
    client: perSpectrum((clientCpu.user + clientCpu.system) / 1e6),
  }
  const [failed] = await sequelize.query<{ n: number }>("SELECT COUNT(*) AS n FROM processing_jobs j JOIN spectra s ON s.id = j.spectrum_id WHERE s.campaign_id IN (:c) AND j.status = 'failed'", {
    replacements: { c: [campaign.id, warmUpCampaign.id] },
    type: QueryTypes.SELECT,
  })
  await Promise.all([stopProcess(server.child), ...workers.map(stopProcess)])
  const result = { label, files: files.length, seconds, perSecond: files.length / seconds, sendingSeconds, warmUpSeconds, cpuMsPerSpectrum, failed: Number(failed!.n), refused }
  say(
    `ingest ${label}: ${files.length} files in ${seconds.toFixed(1)} s = ${result.perSecond.toFixed(1)}/s, the last file answered after ${sendingSeconds.toFixed(1)} s (after ${warmUp.length} warm-up files in ${warmUpSeconds.toFixed(1)} s); CPU per spectrum ${cpuMsPerSpectrum.server.toFixed(1)} ms server, ${cpuMsPerSpectrum.database.toFixed(1)} ms MariaDB, ${cpuMsPerSpectrum.client.toFixed(1)} ms client; ${result.failed} failed, ${refused} refused`,
  )
  return result
}

const campaign = await Campaign.create({ code: 'BENCH', name: 'Load benchmark', description: '' })
for (const u of [lead, classifierA, classifierB, observer]) await CampaignMember.create({ campaignId: campaign.id, userId: u.id })
const ingestCampaign = async (code: string) => {
  const c = await Campaign.create({ code, name: `Ingest ${code}`, description: '' })
  await CampaignMember.create({ campaignId: c.id, userId: observer.id })
  return c
}

say(`machine: ${availableParallelism()} cores; ${INGEST_FILES} files per ingest run, ${FILES_PER_REQUEST} per request, 2 requests at a time`)
const ingests: IngestResult[] = []
// The first run's spectra are the originals every larger size is copied from.
// Warm-up files carry salts of their own (uploads are deduplicated by content).
ingests.push(await ingest('database queue, WORKERS=1', { WORKERS: '1' }, 0, uploadFiles(WARM_UP_FILES, 11), uploadFiles(INGEST_FILES, 1), campaign))
ingests.push(await ingest('database queue, WORKERS=2', { WORKERS: '2' }, 0, uploadFiles(WARM_UP_FILES, 12), uploadFiles(INGEST_FILES, 2), await ingestCampaign('INGEST-2')))
ingests.push(await ingest('Redis queue, 2 worker processes × 1 thread', { QUEUE: 'redis' }, 2, uploadFiles(WARM_UP_FILES, 13), uploadFiles(INGEST_FILES, 3), await ingestCampaign('INGEST-R')))

// ---------------------------------------------------------------------------------------------
// Seeding larger sizes by copying
// ---------------------------------------------------------------------------------------------

async function columnsOf(table: string, leaveOut: string[]): Promise<string[]> {
  const rows = await sequelize.query<{ COLUMN_NAME: string }>(
    "SELECT COLUMN_NAME FROM information_schema.COLUMNS WHERE TABLE_SCHEMA = DATABASE() AND TABLE_NAME = :t AND GENERATION_EXPRESSION IS NULL AND EXTRA NOT LIKE '%GENERATED%' ORDER BY ORDINAL_POSITION",
    { replacements: { t: table }, type: QueryTypes.SELECT },
  )
  return rows.map((r) => r.COLUMN_NAME).filter((c) => !leaveOut.includes(c))
}
const originals = (
  await sequelize.query<{ id: number }>("SELECT id FROM spectra WHERE campaign_id = :c AND status = 'suggested' ORDER BY id", { replacements: { c: campaign.id }, type: QueryTypes.SELECT })
).map((r) => Number(r.id))
if (originals.length === 0) throw new Error('no original spectrum was suggested; nothing to copy')
const spectraColumns = await columnsOf('spectra', ['id'])
const suggestionColumns = await columnsOf('suggestions', ['id', 'spectrum_id'])
let copies = 0

/** Grows the benchmark campaign to `size` spectra by copying the originals with new identities. */
async function growTo(size: number): Promise<void> {
  const [row] = await sequelize.query<{ n: number }>('SELECT COUNT(*) AS n FROM spectra WHERE campaign_id = :c', { replacements: { c: campaign.id }, type: QueryTypes.SELECT })
  let missing = size - Number(row!.n)
  const set = (c: string) => {
    switch (c) {
      case 'file_sha256':
        return 'SHA2(CONCAT(s.file_sha256, :n, s.id), 256)'
      case 'object_name':
        return "CONCAT('KRF C', :n + s.id)"
      case 'batch_id':
        return "CONCAT('copy-of-', s.id)"
      case 'submitted_by':
        return ':observer'
      case 'created_at':
      case 'updated_at':
        // Spread over the past year, so orders by time and weekly trends see a realistic spread.
        return 'NOW(3) - INTERVAL ((:n + s.id) * 311) % 31536000 SECOND'
      default:
        return `s.${c}`
    }
  }
  while (missing > 0) {
    const take = Math.min(missing, originals.length, 5000)
    const first = Number((await sequelize.query<{ m: number }>('SELECT COALESCE(MAX(id), 0) AS m FROM spectra', { type: QueryTypes.SELECT }))[0]!.m)
    await sequelize.query(`INSERT INTO spectra (${spectraColumns.join(', ')}) SELECT ${spectraColumns.map(set).join(', ')} FROM spectra s WHERE s.id IN (:ids)`, {
      replacements: { ids: originals.slice(0, take), n: copies * 7919, observer: observer.id },
    })
    await sequelize.query(
      `INSERT INTO suggestions (spectrum_id, ${suggestionColumns.join(', ')})
       SELECT c.id, ${suggestionColumns.map((x) => `g.${x}`).join(', ')}
       FROM spectra c JOIN suggestions g ON g.spectrum_id = CAST(SUBSTRING(c.batch_id, 9) AS UNSIGNED) AND g.is_current = 1
       WHERE c.id > :first AND c.batch_id LIKE 'copy-of-%'`,
      { replacements: { first } },
    )
    // The queue's flag filters read spectrum_flags, the index of the current suggestion's flags.
    await sequelize.query(
      `INSERT INTO spectrum_flags (spectrum_id, flag)
       SELECT c.id, f.flag FROM spectra c JOIN spectrum_flags f ON f.spectrum_id = CAST(SUBSTRING(c.batch_id, 9) AS UNSIGNED)
       WHERE c.id > :first AND c.batch_id LIKE 'copy-of-%'`,
      { replacements: { first } },
    )
    copies += take
    missing -= take
  }
  // Calls on 62 % of the spectra: two classifiers each, the second sometimes a subtype off; agreed decisions follow.
  const uncalled = `FROM spectra sp JOIN suggestions g ON g.spectrum_id = sp.id AND g.is_current = 1
    WHERE sp.campaign_id = :c AND sp.status = 'suggested' AND MOD(sp.id * 7, 100) < 62`
  for (const [who, offset] of [
    [classifierA.id, '0'],
    [classifierB.id, 'IF(MOD(sp.id, 5) = 0, 1, 0)'],
  ] as const) {
    await sequelize.query(
      `INSERT INTO review_calls (spectrum_id, user_id, kind, first_call, corrects_call_id, spectral_type, letter, subtype, type_code, luminosity_class, class_code,
         peculiarities, notes, confidence, uncertain, accepted_suggestion, suggestion_id, suggestion_shown, seconds_spent, created_at)
       SELECT sp.id, :who, 'call', 1, NULL, g.spectral_type, g.letter, g.subtype, g.type_code + ${offset}, g.luminosity_class, g.class_code,
         '', '', 3, 0, ${offset} = 0, g.id, 1, 20 + MOD(sp.id, 90), sp.created_at + INTERVAL 1 DAY ${uncalled}`,
      { replacements: { who, c: campaign.id } },
    )
  }
  await sequelize.query(
    `INSERT INTO classifications (spectrum_id, source, spectral_type, letter, subtype, type_code, luminosity_class, class_code, peculiarities, decided_by,
       n_calls, call_ids, agreement, type_spread, class_spread, suggestion_id, dispute_id, note, created_at)
     SELECT sp.id, 'agreement', g.spectral_type, g.letter, g.subtype, g.type_code, g.luminosity_class, g.class_code, '', NULL, 2, '[]',
       IF(MOD(sp.id, 5) = 0, 'within', 'exact'), IF(MOD(sp.id, 5) = 0, 1, 0), 0, g.id, NULL, '', sp.created_at + INTERVAL 2 DAY ${uncalled}`,
    { replacements: { c: campaign.id } },
  )
  await sequelize.query(`UPDATE spectra sp SET sp.status = 'agreed' WHERE sp.campaign_id = :c AND sp.status = 'suggested' AND MOD(sp.id * 7, 100) < 62`, { replacements: { c: campaign.id } })
  await sequelize.query('ANALYZE TABLE spectra, suggestions, review_calls, classifications')
}

// ---------------------------------------------------------------------------------------------
// Latency
// ---------------------------------------------------------------------------------------------

/** Untimed requests per endpoint before timing starts, at each size. */
const WARM_UP_REQUESTS = 24

const quantile = (sorted: number[], q: number) => sorted[Math.min(sorted.length - 1, Math.max(0, Math.ceil(q * sorted.length) - 1))]!

/** p50 and p95 (ms) of `total` requests made by `concurrency` clients at once. */
async function measure(client: Client, path: string | (() => string), concurrency: number, total: number): Promise<{ p50: number; p95: number }> {
  const times: number[] = []
  let left = total
  const one = async () => {
    while (left-- > 0) {
      const p = typeof path === 'string' ? path : path()
      const t0 = performance.now()
      const res = await client.request('GET', p)
      await res.arrayBuffer()
      times.push(performance.now() - t0)
      if (!res.ok) throw new Error(`${p} answered ${res.status}`)
    }
  }
  await Promise.all(Array.from({ length: concurrency }, one))
  times.sort((a, b) => a - b)
  return { p50: quantile(times, 0.5), p95: quantile(times, 0.95) }
}

interface Row {
  size: number
  endpoint: string
  c1: { p50: number; p95: number }
  c8: { p50: number; p95: number }
}
const rows: Row[] = []
const auditRows: Array<{ size: number; coldMs: number; warmMs: number; healthP95: number; healthMax: number; healthCount: number }> = []

for (const size of SIZES) {
  say(`seeding to ${size} spectra`)
  const t0 = performance.now()
  await growTo(size)
  say(`seeded in ${((performance.now() - t0) / 1000).toFixed(1)} s`)
  const server = await startServer({ WORKERS: '1' })
  const [leadC, classifierC, observerC] = await Promise.all([Client.signIn(server.url, lead.email), Client.signIn(server.url, classifierA.email), Client.signIn(server.url, observer.email)])
  const original = originals[Math.floor(originals.length / 2)]!
  let page = 0
  const flagsByUse = (
    await sequelize.query<{ flag: string }>('SELECT f.flag FROM spectrum_flags f JOIN spectra s ON s.id = f.spectrum_id WHERE s.campaign_id = :c GROUP BY f.flag ORDER BY COUNT(*) DESC, f.flag', {
      replacements: { c: campaign.id },
      type: QueryTypes.SELECT,
    })
  ).map((r) => r.flag)
  // The queue screen continues after the last item shown.
  const firstPage = (await (await classifierC.request('GET', '/api/queue')).json()) as { items: Array<{ spectrumId: number }> }
  const queueLast = firstPage.items.at(-1)?.spectrumId ?? ''
  const endpoints: Array<[string, Client, string | (() => string)]> = [
    ['list, default (newest first)', leadC, '/api/spectra?pageSize=25'],
    ['list, page 40', leadC, '/api/spectra?pageSize=25&page=40'],
    ...(['objectName', '-snr', 'status', '-obsDate', 'id'] as const).map((s): [string, Client, string] => [`list, sort ${s}`, leadC, `/api/spectra?pageSize=25&sort=${s}`]),
    ['list, status filter', leadC, '/api/spectra?pageSize=25&status=suggested'],
    ['list, campaign filter', leadC, `/api/spectra?pageSize=25&campaign=${campaign.id}`],
    ['list, S/N range', leadC, '/api/spectra?pageSize=25&snrMin=50&snrMax=80'],
    ['list, classifier', classifierC, '/api/spectra?pageSize=25'],
    ['my spectra (observer)', observerC, '/api/spectra?pageSize=25'],
    ['my spectra, paging on', observerC, () => `/api/spectra?pageSize=25&page=${1 + (page++ % 20)}`],
    ['search, object name', leadC, () => `/api/spectra?pageSize=25&q=${encodeURIComponent(`KRF C${1000 + ((page++ * 37) % 5000)}`)}`],
    ['search, file name', leadC, '/api/spectra?pageSize=25&q=b1-17.fits'],
    ['queue, oldest', classifierC, `/api/queue`],
    ['queue, oldest, the next page', classifierC, `/api/queue?after=${queueLast}`],
    ['queue, by S/N', classifierC, `/api/queue?order=snr`],
    ['queue, by flags', classifierC, `/api/queue?order=flagged`],
    ['queue, flag filter (commonest flag)', classifierC, `/api/queue?flags=${flagsByUse.at(0) ?? 'low-snr'}`],
    ['queue, flag filter (rarest flag)', classifierC, `/api/queue?flags=${flagsByUse.at(-1) ?? 'low-snr'}`],
    ['queue/next', classifierC, '/api/queue/next'],
    ['review screen (spectrum)', classifierC, `/api/spectra/${original}/review`],
    ['spectrum detail', leadC, `/api/spectra/${original}`],
    ['health', leadC, '/api/health'],
  ]
  // A fresh server compiles its code on the first requests: one untimed pass over every endpoint
  // first, so the table shows the steady state (the first endpoint would otherwise carry it alone).
  for (const [, client, path] of endpoints) await measure(client, path, 8, WARM_UP_REQUESTS)
  for (const [name, client, path] of endpoints) {
    const c1 = await measure(client, path, 1, 30)
    const c8 = await measure(client, path, 8, 120)
    rows.push({ size, endpoint: name, c1, c8 })
    say(`${size} ${name}: c1 p50 ${c1.p50.toFixed(1)} p95 ${c1.p95.toFixed(1)} | c8 p50 ${c8.p50.toFixed(1)} p95 ${c8.p95.toFixed(1)} ms`)
  }

  // The audit from cold (nothing cached for this data), with /api/health asked every 20 ms meanwhile.
  const health: number[] = []
  let auditing = true
  const poll = (async () => {
    while (auditing) {
      const h0 = performance.now()
      await (await leadC.request('GET', '/api/health')).arrayBuffer()
      health.push(performance.now() - h0)
      await sleep(20)
    }
  })()
  const a0 = performance.now()
  const audit = await leadC.request('GET', `/api/audit?campaign=${campaign.id}`)
  await audit.arrayBuffer()
  const coldMs = performance.now() - a0
  auditing = false
  await poll
  if (!audit.ok) throw new Error(`audit answered ${audit.status}`)
  const warm = await measure(leadC, `/api/audit?campaign=${campaign.id}`, 1, 5)
  health.sort((a, b) => a - b)
  auditRows.push({ size, coldMs, warmMs: warm.p50, healthP95: quantile(health, 0.95), healthMax: health[health.length - 1] ?? 0, healthCount: health.length })
  rows.push({ size, endpoint: 'audit (cached)', c1: warm, c8: await measure(leadC, `/api/audit?campaign=${campaign.id}`, 8, 40) })
  say(`${size} audit: cold ${coldMs.toFixed(0)} ms, warm p50 ${warm.p50.toFixed(1)} ms; health p95 ${quantile(health, 0.95).toFixed(1)} ms over ${health.length} requests meanwhile`)
  await stopProcess(server.child)
}

// ---------------------------------------------------------------------------------------------
// Report
// ---------------------------------------------------------------------------------------------

const f = (v: number) => (v >= 100 ? v.toFixed(0) : v.toFixed(1))
const lines: string[] = []
lines.push(`# Load benchmark (${new Date().toISOString().slice(0, 10)})`, '')
lines.push(`Machine: ${availableParallelism()} cores, Node ${process.version}. Made by \`npm run bench:load\` (bench/load.ts); every request over HTTP on loopback to the real server.`, '')
lines.push(
  `Load average (1 min) when the run started: ${loadAtStart.toFixed(1)}; when it ended: ${loadavg()[0]!.toFixed(1)}. Anything above the benchmark's own share is other work on the machine, and slows every figure here.`,
  '',
)
lines.push(
  '## Ingest through the API',
  '',
  `${INGEST_FILES} real upload files (FITS and text), ${FILES_PER_REQUEST} per request, two requests at a time; from the first byte sent until every job is done. The sending column is when the last file was answered: from then on the queue drains with no uploads to read and store, so a rate taken over part of the run says little about a long one; the whole run's does. Before them, ${WARM_UP_FILES} other files go to the freshly started processes, untimed: every processing thread loads its standards and prepares the library level for these spectra once (seconds of CPU), which says nothing of the rate at which 100 000 spectra go through. Their time is the warm-up column. CPU per spectrum is the user and system time of the timed files (every thread, from /proc): of the web server and worker processes, of mariadbd, and of this benchmark's own client. It leaves out time spent waiting for a core, but not the slowdown of sharing caches and cores with other work on the machine, so it moves between runs too; the cores divided by their sum is about the rate this work allows on a machine of its own.`,
  '',
)
lines.push(
  `| processing | warm-up: ${WARM_UP_FILES} files, s | files | seconds | sending, s | spectra/s | CPU per spectrum, ms: server / MariaDB / client | failed jobs | refused files |`,
  '| --- | ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: |',
)
for (const r of ingests) {
  const cpu = r.cpuMsPerSpectrum
  lines.push(
    `| ${r.label} | ${r.warmUpSeconds.toFixed(1)} | ${r.files} | ${r.seconds.toFixed(1)} | ${r.sendingSeconds.toFixed(1)} | ${r.perSecond.toFixed(1)} | ${cpu.server.toFixed(1)} / ${cpu.database.toFixed(1)} / ${cpu.client.toFixed(1)} | ${r.failed} | ${r.refused} |`,
  )
}
lines.push('', '## Latency, ms (p50 / p95), concurrency 1 and 8', '')
lines.push(
  `Lists ask for 25 rows a page; the queue for its default page of ${QUEUE_PAGE_SIZE} items, as the screens do. At each size the server is started afresh and every endpoint is first asked ${WARM_UP_REQUESTS} times, untimed (the server compiling its code on first use would otherwise land on whichever endpoint comes first); then 30 requests one at a time and 120 at 8 at a time are timed.`,
  '',
)
lines.push(`| endpoint | ${SIZES.map((s) => `${s.toLocaleString('en')}: c1`).join(' | ')} | ${SIZES.map((s) => `${s.toLocaleString('en')}: c8`).join(' | ')} |`)
lines.push(`| --- | ${SIZES.map(() => '---:').join(' | ')} | ${SIZES.map(() => '---:').join(' | ')} |`)
for (const name of [...new Set(rows.map((r) => r.endpoint))]) {
  const of = (s: number) => rows.find((r) => r.endpoint === name && r.size === s)
  lines.push(
    `| ${name} | ${SIZES.map((s) => (of(s) ? `${f(of(s)!.c1.p50)} / ${f(of(s)!.c1.p95)}` : '')).join(' | ')} | ${SIZES.map((s) => (of(s) ? `${f(of(s)!.c8.p50)} / ${f(of(s)!.c8.p95)}` : '')).join(' | ')} |`,
  )
}
lines.push('', '## Agreement audit from cold, with /api/health asked every 20 ms meanwhile', '')
lines.push('| spectra | audit, cold (ms) | audit, cached p50 (ms) | health p95 (ms) | health max (ms) | health requests |', '| ---: | ---: | ---: | ---: | ---: | ---: |')
for (const a of auditRows) lines.push(`| ${a.size.toLocaleString('en')} | ${a.coldMs.toFixed(0)} | ${f(a.warmMs)} | ${f(a.healthP95)} | ${f(a.healthMax)} | ${a.healthCount} |`)
lines.push(
  '',
  "Seeding: the first ingest run's spectra are the originals; larger sizes copy their spectrum and current-suggestion rows by SQL with new identities (arrays and measurements are not copied). Calls: two classifiers on 62 % of the spectra, made by SQL from each suggestion, with the agreed decisions that follow.",
  '',
)

const out = join('bench', 'results')
mkdirSync(out, { recursive: true })
const stamp = new Date().toISOString().slice(0, 10)
writeFileSync(join(out, `load-${stamp}.md`), lines.join('\n'))
writeFileSync(join(out, `load-${stamp}.json`), JSON.stringify({ sizes: SIZES, ingests, rows, audit: auditRows }, null, 2))
console.log(lines.join('\n'))
say(`written to bench/results/load-${stamp}.md`)
await cleanup()
process.exit(0)
