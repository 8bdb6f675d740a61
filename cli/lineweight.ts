import { createHash, randomUUID } from 'node:crypto'
import { createReadStream } from 'node:fs'
import { readdir, stat, writeFile } from 'node:fs/promises'
import { join, resolve } from 'node:path'
import { parseArgs } from 'node:util'
import cliProgress from 'cli-progress'
import { campaignsApi } from '../shared/api/campaigns'
import { spectraApi, type FileResult, type SpectrumListItem } from '../shared/api/spectra'
import { ClientError, LineweightClient, retriable } from './client'

const USAGE = `Usage: npm run lineweight -- <command> [options]

Commands:
  submit --campaign ID [--parallel N] [--retries N] FILES…   upload spectra (files or folders); files the
                                                            campaign already holds are skipped, so running
                                                            it again resumes a batch
  status [--campaign ID]                                    the campaigns' progress (or one campaign's)
  results --campaign ID [--format csv|json] [--output FILE] every spectrum of the campaign with its decision

Environment:
  LINEWEIGHT_URL     the server, e.g. https://lineweight.example.org (default http://127.0.0.1:8080)
  LINEWEIGHT_TOKEN   a personal API token (My account → API tokens in the app)

Exit status: 0 when everything went through, 1 when files were refused or could not be sent, 2 on a usage
or connection error.`

/** Exit codes. */
const OK = 0
const SOME_FAILED = 1
const USAGE_ERROR = 2

class UsageError extends Error {}

function positiveInt(value: string | undefined, name: string, fallback?: number): number {
  if (value === undefined) {
    if (fallback === undefined) throw new UsageError(`--${name} is required`)
    return fallback
  }
  const n = Number(value)
  if (!Number.isInteger(n) || n < 1) throw new UsageError(`--${name} must be a whole number of 1 or more, not ${value}`)
  return n
}

function clientFromEnv(env: NodeJS.ProcessEnv): LineweightClient {
  const token = env.LINEWEIGHT_TOKEN?.trim()
  if (!token) throw new UsageError('LINEWEIGHT_TOKEN is not set: create a token under My account → API tokens and export it')
  return new LineweightClient(env.LINEWEIGHT_URL?.trim() || 'http://127.0.0.1:8080', token)
}

/** Regular files named on the command line, folders walked. */
async function expandFiles(args: string[]): Promise<{ path: string; size: number }[]> {
  const out: { path: string; size: number }[] = []
  for (const arg of args) {
    const path = resolve(arg)
    const info = await stat(path).catch(() => null)
    if (!info) throw new UsageError(`${arg}: no such file or folder`)
    if (info.isDirectory()) {
      const entries = await readdir(path, { recursive: true, withFileTypes: true })
      for (const e of entries.filter((x) => x.isFile()).sort((a, b) => join(a.parentPath, a.name).localeCompare(join(b.parentPath, b.name)))) {
        const p = join(e.parentPath, e.name)
        out.push({ path: p, size: (await stat(p)).size })
      }
    } else if (info.isFile()) out.push({ path, size: info.size })
  }
  return [...new Map(out.map((f) => [f.path, f])).values()]
}

function sha256Of(path: string): Promise<string> {
  return new Promise((res, rej) => {
    const hash = createHash('sha256')
    createReadStream(path)
      .on('data', (d) => hash.update(d))
      .on('error', rej)
      .on('end', () => res(hash.digest('hex')))
  })
}

/** Runs `work` on every item, at most `limit` at once. */
async function inParallel<T>(items: T[], limit: number, work: (item: T) => Promise<void>): Promise<void> {
  let next = 0
  await Promise.all(
    Array.from({ length: Math.min(limit, items.length) }, async () => {
      while (next < items.length) await work(items[next++]!)
    }),
  )
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms))
const mb = (bytes: number) => (bytes / 1e6).toFixed(1)

interface Outcome {
  file: string
  outcome: 'accepted' | 'duplicate' | 'skipped' | 'refused' | 'failed'
  spectrumId: number | null
  message: string
}

async function submit(client: LineweightClient, argv: string[], out: NodeJS.WritableStream, err: NodeJS.WriteStream): Promise<number> {
  const { values, positionals } = parseArgs({ args: argv, allowPositionals: true, options: { campaign: { type: 'string' }, parallel: { type: 'string' }, retries: { type: 'string' } } })
  const campaignId = positiveInt(values.campaign, 'campaign')
  const parallel = positiveInt(values.parallel, 'parallel', 2)
  const retries = positiveInt(values.retries, 'retries', 5)
  if (positionals.length === 0) throw new UsageError('name at least one file or folder to submit')
  const files = await expandFiles(positionals)
  if (files.length === 0) throw new UsageError('the folders named hold no files')

  err.write(`Checking ${files.length} file${files.length === 1 ? '' : 's'} against campaign ${campaignId}…\n`)
  const hashed = await Promise.all(files.map(async (f) => ({ ...f, sha256: await sha256Of(f.path) })))
  const known = new Map<string, number | null>()
  for (let i = 0; i < hashed.length; i += 1000) {
    const reply = await client.call(spectraApi.known, { body: { campaignId, sha256: [...new Set(hashed.slice(i, i + 1000).map((f) => f.sha256))] } })
    for (const k of reply.known) known.set(k.sha256, k.spectrumId)
  }
  const outcomes: Outcome[] = []
  const todo = hashed.filter((f) => {
    if (!known.has(f.sha256)) return true
    const id = known.get(f.sha256) ?? null
    outcomes.push({ file: f.path, outcome: 'skipped', spectrumId: id, message: `already on the server${id ? ` (spectrum #${id})` : ''}` })
    return false
  })
  const totalBytes = todo.reduce((s, f) => s + f.size, 0)
  const tty = Boolean(err.isTTY)
  // Lines for a terminal that also shows the bar wait until the bar is done; lines for a file or pipe go at once.
  const held: string[] = []
  const holdLines = tty && Boolean((out as NodeJS.WriteStream).isTTY)
  const line = (o: Outcome) => {
    const text = `${o.outcome}\t${o.spectrumId ?? ''}\t${o.file}${o.outcome === 'accepted' ? '' : `\t${o.message}`}\n`
    if (holdLines) held.push(text)
    else out.write(text)
  }
  const report = (o: Outcome) => {
    outcomes.push(o)
    line(o)
  }
  for (const o of outcomes) line(o)
  const bar = tty
    ? new cliProgress.SingleBar(
        { stream: err, format: 'Uploading {bar} {percentage}% | {sentMb}/{totalMb} MB | {done}/{files} files | {refused} refused', hideCursor: true, clearOnComplete: false },
        cliProgress.Presets.shades_classic,
      )
    : null
  const sentBy = new Map<string, number>()
  let done = 0
  let refused = 0
  const sentTotal = () => [...sentBy.values()].reduce((a, b) => a + b, 0)
  const payload = () => ({ sentMb: mb(sentTotal()), totalMb: mb(totalBytes), done, files: todo.length, refused })
  bar?.start(Math.max(totalBytes, 1), 0, payload())
  const batchId = randomUUID()

  await inParallel(todo, parallel, async (f) => {
    let result: FileResult[] | null = null
    let failure = ''
    for (let attempt = 0; attempt <= retries && !result; attempt++) {
      try {
        const reply = await client.upload(f.path, f.size, { campaignId, batchId }, (sent) => {
          sentBy.set(f.path, Math.min(sent, f.size))
          bar?.update(sentTotal(), payload())
        })
        result = reply.results
      } catch (e) {
        sentBy.set(f.path, 0)
        if (!retriable(e) || attempt === retries) {
          failure = e instanceof Error ? e.message : String(e)
          break
        }
        await sleep(Math.min(10_000, 500 * 2 ** attempt))
      }
    }
    sentBy.set(f.path, f.size)
    done++
    bar?.update(sentTotal(), payload())
    if (!result) {
      refused++
      report({ file: f.path, outcome: 'failed', spectrumId: null, message: failure })
    } else {
      // A zip gives one result per entry.
      for (const r of result) {
        const name = result.length > 1 ? `${f.path}:${r.file}` : f.path
        if (r.outcome === 'refused') refused++
        report({ file: name, outcome: r.outcome, spectrumId: r.outcome === 'refused' ? null : r.spectrumId, message: r.outcome === 'accepted' ? '' : r.message })
      }
    }
    if (!tty) err.write(`[${done}/${todo.length}] ${f.path}\n`)
  })
  bar?.stop()
  for (const text of held) out.write(text)

  const count = (k: Outcome['outcome']) => outcomes.filter((o) => o.outcome === k).length
  err.write(
    `\nCampaign ${campaignId}: ${count('accepted')} accepted, ${count('skipped')} already on the server, ${count('duplicate')} duplicates, ${count('refused')} refused, ${count('failed')} not sent.\n`,
  )
  const bad = outcomes.filter((o) => o.outcome === 'refused' || o.outcome === 'failed')
  for (const o of bad) err.write(`  ${o.outcome}: ${o.file}: ${o.message}\n`)
  return bad.length > 0 ? SOME_FAILED : OK
}

async function status(client: LineweightClient, argv: string[], out: NodeJS.WritableStream): Promise<number> {
  const { values } = parseArgs({ args: argv, options: { campaign: { type: 'string' } } })
  const only = values.campaign === undefined ? undefined : positiveInt(values.campaign, 'campaign')
  const { campaigns } = await client.call(campaignsApi.list, {})
  const shown = only === undefined ? campaigns : campaigns.filter((c) => c.id === only)
  if (only !== undefined && shown.length === 0) throw new UsageError(`campaign ${only} is not one of yours`)
  out.write(['id', 'code', 'total', 'processing', 'waiting', 'under review', 'agreed', 'disputed', 'settled', 'failed'].join('\t') + '\n')
  for (const c of shown) {
    const p = c.progress
    out.write([c.id, c.code, p?.total, p?.processing, p?.waiting, p?.underReview, p?.agreed, p?.disputed, p?.settled, p?.failed].map((v) => v ?? '').join('\t') + '\n')
  }
  return OK
}

const RESULT_COLUMNS = ['id', 'file', 'object', 'status', 'statusReason', 'snr', 'spectralType', 'typeCode', 'luminosityClass', 'classCode', 'decision', 'decidedAt', 'submittedAt'] as const

function resultRow(s: SpectrumListItem): Record<(typeof RESULT_COLUMNS)[number], string | number | null> {
  const c = s.classification
  return {
    id: s.id,
    file: s.fileName,
    object: s.objectName,
    status: s.status,
    statusReason: s.statusReason,
    snr: s.snr,
    spectralType: c?.spectralType ?? null,
    typeCode: c?.typeCode ?? null,
    luminosityClass: c?.luminosityClass ?? null,
    classCode: c?.classCode ?? null,
    decision: c?.source ?? null,
    decidedAt: c?.decidedAt ?? null,
    submittedAt: s.createdAt,
  }
}

const csvCell = (v: string | number | null) => {
  if (v === null) return ''
  const text = String(v)
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text
}

async function results(client: LineweightClient, argv: string[], out: NodeJS.WritableStream): Promise<number> {
  const { values } = parseArgs({ args: argv, options: { campaign: { type: 'string' }, format: { type: 'string' }, output: { type: 'string' } } })
  const campaign = positiveInt(values.campaign, 'campaign')
  const format = values.format ?? 'csv'
  if (format !== 'csv' && format !== 'json') throw new UsageError(`--format must be csv or json, not ${format}`)
  const rows: ReturnType<typeof resultRow>[] = []
  for (let page = 1; ; page++) {
    const list = await client.call(spectraApi.list, { query: { campaign, page, pageSize: 200, sort: 'id' } })
    rows.push(...list.items.map(resultRow))
    if (page * list.pageSize >= list.total || list.items.length === 0) break
  }
  const text = format === 'json' ? `${JSON.stringify(rows, null, 2)}\n` : [RESULT_COLUMNS.join(','), ...rows.map((r) => RESULT_COLUMNS.map((k) => csvCell(r[k])).join(','))].join('\n') + '\n'
  if (values.output) await writeFile(values.output, text)
  else out.write(text)
  return OK
}

/** Runs one command; returns the exit status. */
export async function main(argv: string[], env: NodeJS.ProcessEnv = process.env, out: NodeJS.WritableStream = process.stdout, err: NodeJS.WriteStream = process.stderr): Promise<number> {
  const [command, ...rest] = argv
  try {
    if (!command || command === 'help' || command === '--help' || command === '-h') {
      out.write(`${USAGE}\n`)
      return command ? OK : USAGE_ERROR
    }
    const client = clientFromEnv(env)
    if (command === 'submit') return await submit(client, rest, out, err)
    if (command === 'status') return await status(client, rest, out)
    if (command === 'results') return await results(client, rest, out)
    throw new UsageError(`unknown command ${command}`)
  } catch (e) {
    if (e instanceof UsageError || (e instanceof TypeError && 'code' in e && String(e.code).startsWith('ERR_PARSE_ARGS'))) {
      err.write(`lineweight: ${e.message}\n\n${USAGE}\n`)
      return USAGE_ERROR
    }
    if (e instanceof ClientError) {
      err.write(`lineweight: ${e.message}${e.status ? ` (${e.status} ${e.code})` : ''}\n`)
      return USAGE_ERROR
    }
    throw e
  }
}

if (process.argv[1] && resolve(process.argv[1]) === resolve(new URL(import.meta.url).pathname)) {
  main(process.argv.slice(2)).then(
    (code) => process.exit(code),
    (e: unknown) => {
      process.stderr.write(`lineweight: ${e instanceof Error ? (e.stack ?? e.message) : String(e)}\n`)
      process.exit(USAGE_ERROR)
    },
  )
}
