import { open } from 'node:fs/promises'
import type { Readable } from 'node:stream'
import { ConnectionError, Op, QueryTypes, UniqueConstraintError, Utils, literal, type Order, type WhereOptions } from 'sequelize'
import { parseDeclination, parseRightAscension } from '../../shared/coords'
import type { SpectrumStatus } from '../../shared/status'
import type { AppContext } from '../context'
import { bufferToFloat32, bufferToFloat64 } from '../lib/binary'
import { decimateMinMax } from '../lib/decimate'
import { lowerBound } from '../spectra/prepare/stats'
import { HttpError, notFound } from '../lib/http-error'
import { sha256Hex } from '../lib/tokens'
import { sqlTime } from '../lib/sql-time'
import { executeInTransaction, insertModelRow } from '../db/execute'
import { rawFileKey } from '../storage'
import {
  Campaign,
  Classification,
  Instrument,
  LineMeasurementRow,
  Measurement,
  ProcessingJob,
  ReviewCall,
  ReviewClaim,
  Spectrum,
  SpectrumBlob,
  SpectrumEvent,
  Standard,
  Suggestion,
  User,
} from '../models'
import type { ReadMeta, ReadOptions } from '../spectra/io'
import { readHere, type FileReading, type FileSource, type ReadOutcome } from '../jobs/reading'
import type { Config } from '../config'
import { campaignForSubmission } from './campaigns.service'
import { instrumentForSpectrum } from './instruments.service'
import { findVisibleSpectrum, visibilityWhere } from './visibility'
import { finalClassificationsFor, type FinalClassification } from './review.service'
import { indexSuggestionFlags } from './suggestions.service'
import type {
  FileResult,
  KnownFiles,
  KnownFilesInput,
  ReadChoices,
  SeriesQuery,
  SpectrumCorrectionInput,
  SpectrumDetail,
  SpectrumList,
  SpectrumListItem,
  SpectrumListQuery,
  SpectrumMetadataInput,
  SubmitFields,
} from '../../shared/api/spectra'

export type { FileResult, SpectrumDetail, SpectrumListItem }

/** One uploaded file: in memory (zip entries, the demo) or where the upload parser wrote it. */
export type UploadedFile = { name: string; bytes: Uint8Array } | { name: string; path: string }

const sourceOf = (file: UploadedFile): FileSource => ('bytes' in file ? { bytes: file.bytes } : { path: file.path })
/** Reading runs in the server's read pool; without one (tests, the demo seed), here. */
const readingOf = (ctx: AppContext): FileReading => ctx.reading ?? readHere

/** Characters a stored name never holds: control characters (they break exports, logs and screens). */
const CONTROL = /[\u0000-\u001f\u007f]+/g
/** Text from a file name or header, cleaned and cut to what the column holds (an ellipsis marks a cut). */
export function fitText(text: string, max: number): string {
  const clean = text.replace(CONTROL, ' ').replace(/\s+/g, ' ').trim()
  return clean.length <= max ? clean : `${clean.slice(0, max - 1).trimEnd()}…`
}

/** The batch's fields as the upload sends them (the demo seed and tests may leave the defaults out). */
export type SubmitOptions = Omit<SubmitFields, 'wavelengthUnit'> & Partial<Pick<SubmitFields, 'wavelengthUnit'>>

/** The observer's reading choices from a form: 'file' and absent mean "as the file says". */
function choicesOf(
  input: { wavelengthMedium?: string | undefined; wavelengthUnit?: string | undefined; hdu?: number | null | undefined; aperture?: number | null | undefined },
  base: ReadChoices = {},
): ReadChoices {
  const out: ReadChoices = { ...base }
  if (input.wavelengthMedium !== undefined) {
    if (input.wavelengthMedium === 'file') delete out.medium
    else out.medium = input.wavelengthMedium as 'air' | 'vacuum'
  }
  if (input.wavelengthUnit !== undefined) {
    if (input.wavelengthUnit === 'file') delete out.unit
    else out.unit = input.wavelengthUnit
  }
  if (input.hdu !== undefined) {
    if (input.hdu === null) delete out.hdu
    else out.hdu = input.hdu
  }
  if (input.aperture !== undefined) {
    if (input.aperture === null) delete out.aperture
    else out.aperture = input.aperture
  }
  return out
}

const sameChoices = (a: ReadChoices, b: ReadChoices) => a.medium === b.medium && a.unit === b.unit && a.hdu === b.hdu && a.aperture === b.aperture

/** Reader options for stored or new choices, with the server's limits. */
function readOptionsFor(config: Config, choices: ReadChoices): ReadOptions {
  const out: ReadOptions = { maxBytes: config.UPLOAD_MAX_BYTES, maxPixels: config.UPLOAD_MAX_PIXELS, minPixels: config.UPLOAD_MIN_PIXELS }
  if (choices.medium) out.assumeVacuum = choices.medium === 'vacuum'
  if (choices.unit) out.wavelengthUnit = choices.unit
  if (choices.hdu !== undefined) out.hdu = choices.hdu
  if (choices.aperture !== undefined) out.aperture = choices.aperture
  return out
}

const ZIP_MAGIC = [0x50, 0x4b, 0x03, 0x04]
const isZip = (b: Uint8Array) => ZIP_MAGIC.every((v, i) => b[i] === v)

const headerString = (h: Record<string, unknown>, ...keys: string[]) => {
  for (const k of keys) if (h[k] !== undefined && h[k] !== '') return String(h[k]).trim()
  return undefined
}
const headerNumber = (h: Record<string, unknown>, ...keys: string[]) => {
  for (const k of keys) {
    const v = Number(h[k])
    if (h[k] !== undefined && h[k] !== '' && Number.isFinite(v)) return v
  }
  return undefined
}

/** The observer's values win; the file's header fills what they left empty. */
function resolveMetadata(input: SpectrumMetadataInput, meta: ReadMeta, fileName: string) {
  const h = meta.header
  const raText = input.ra || headerString(h, 'RA', 'OBJCTRA', 'RA_OBJ')
  const decText = input.dec || headerString(h, 'DEC', 'OBJCTDEC', 'DEC_OBJ')
  const ra = raText ? parseRightAscension(raText) : null
  const dec = decText ? parseDeclination(decText) : null
  const dateText = input.obsDate || headerString(h, 'DATE-OBS', 'DATE_OBS', 'DATE')
  const obsDate = dateText && !Number.isNaN(Date.parse(dateText)) ? new Date(dateText.endsWith('Z') || /[+-]\d\d:?\d\d$/.test(dateText) ? dateText : `${dateText}Z`) : null
  const baseName = fileName.split('/').pop() ?? fileName
  return {
    objectName: fitText(input.objectName || headerString(h, 'OBJECT', 'OBJNAME') || baseName.replace(/\.[^.]+$/, ''), 120) || 'unnamed',
    raDeg: ra && ra.ok ? ra.degrees : null,
    decDeg: dec && dec.ok ? dec.degrees : null,
    obsDate: obsDate && !Number.isNaN(obsDate.getTime()) ? obsDate : null,
    exposureS: headerNumber(h, 'EXPTIME', 'EXPOSURE') ?? null,
    instrument: fitText(input.instrument || headerString(h, 'INSTRUME', 'INSTRUMENT') || '', 160),
    resolutionFwhm: input.resolutionFwhm ?? headerNumber(h, 'SPEC_RES', 'RESOLUTN', 'FWHM') ?? null,
    resolvingPower: input.resolvingPower ?? headerNumber(h, 'SPECRP', 'RESPOWER', 'R') ?? null,
    vMag: input.vMag ?? null,
    parallaxMas: input.parallaxMas ?? null,
    parallaxErrorMas: input.parallaxErrorMas ?? null,
    ebv: input.ebv ?? null,
    notes: input.notes ?? '',
  }
}

/** The same file again in the same campaign; its id is told only to someone who may see that spectrum. */
async function findDuplicate(user: User, campaignId: number, sha: string): Promise<{ id: number | null } | null> {
  const existing = await Spectrum.findOne({ where: { campaignId, fileSha256: sha }, attributes: ['id'] })
  if (!existing) return null
  const visible = await Spectrum.count({ where: { [Op.and]: [{ id: existing.id }, await visibilityWhere(user)] } })
  return { id: visible ? existing.id : null }
}

/** Which of these files (by SHA-256) the campaign holds already; ids only of spectra the user may see. */
export async function knownFiles(user: User, input: KnownFilesInput): Promise<KnownFiles> {
  await campaignForSubmission(user, input.campaignId)
  const rows = input.sha256.length
    ? await Spectrum.findAll({ where: { campaignId: input.campaignId, fileSha256: { [Op.in]: [...new Set(input.sha256)] } }, attributes: ['id', 'fileSha256', 'submittedBy', 'campaignId'] })
    : []
  const visible = rows.length
    ? new Set((await Spectrum.findAll({ where: { [Op.and]: [{ id: { [Op.in]: rows.map((r) => r.id) } }, await visibilityWhere(user)] }, attributes: ['id'] })).map((r) => r.id))
    : new Set<number>()
  return { known: rows.map((r) => ({ sha256: r.fileSha256, spectrumId: visible.has(r.id) ? r.id : null })) }
}

async function storeOne(ctx: AppContext, user: User, batch: Batch, file: UploadedFile, opts: SubmitOptions): Promise<FileResult> {
  const { campaign } = batch
  const choices = choicesOf(opts)
  const answer = await readingOf(ctx).read(file.name, sourceOf(file), readOptionsFor(ctx.config, choices))
  const sha = answer.sha256
  const duplicate = (id: number | null): FileResult => ({
    file: file.name,
    outcome: 'duplicate',
    spectrumId: id,
    message: `${file.name} was submitted to this campaign before${id ? ` (spectrum #${id})` : ''}; it is not stored twice.`,
  })
  const existing = await findDuplicate(user, campaign.id, sha)
  if (existing) return duplicate(existing.id)

  const read = answer.read
  if (!read.ok) return { file: file.name, outcome: 'refused', code: read.code, message: read.message }
  // The file is stored before its row: a crash in between leaves an unreferenced file, never a row without its file.
  const key = rawFileKey(sha)
  if (!(await ctx.files.exists(key))) {
    if ('path' in file) await ctx.files.putFile(key, file.path)
    else await ctx.files.put(key, Buffer.from(answer.bytes!.buffer, answer.bytes!.byteOffset, answer.bytes!.byteLength))
  }
  return insertSpectrum(ctx, user, batch, { name: file.name, size: answer.size, key }, sha, read, opts, choices).catch(async (error: unknown) => {
    if (error instanceof UniqueConstraintError) return duplicate((await findDuplicate(user, campaign.id, sha))?.id ?? null)
    throw error
  })
}

interface StoredFile {
  name: string
  size: number
  key: string
}

/** What a successful read gives the spectrum row and its blob. */
type ReadColumns = Extract<ReadOutcome, { ok: true }>

async function insertSpectrum(ctx: AppContext, user: User, batch: Batch, file: StoredFile, sha: string, columns: ReadColumns, opts: SubmitOptions, choices: ReadChoices): Promise<FileResult> {
  const { meta } = columns
  const metadata = resolveMetadata(opts, meta, file.name)
  const instrument = await batch.instrumentFor(metadata.instrument)
  const id = await ctx.sequelize.transaction(async (transaction) => {
    const spectrumId = await insertModelRow(transaction, Spectrum, {
      campaignId: batch.campaign.id,
      submittedBy: user.id,
      batchId: opts.batchId ?? null,
      statusReason: null,
      ...metadata,
      instrumentId: instrument?.id ?? null,
      fileName: fitText(file.name, 255),
      fileSha256: sha,
      fileSize: file.size,
      ...columns.row,
      readChoices: JSON.stringify(choices),
    })
    const { wavelength, flux, error, mask } = columns.blob
    await executeInTransaction(transaction, 'INSERT INTO spectrum_blobs (spectrum_id, raw, raw_key, wavelength, flux, error, mask) VALUES (?, NULL, ?, ?, ?, ?, ?)', [
      spectrumId,
      file.key,
      wavelength,
      flux,
      error,
      mask,
    ])
    await executeInTransaction(transaction, "INSERT INTO processing_jobs (spectrum_id, status, attempts, requested_by, created_at) VALUES (?, 'queued', 0, ?, ?)", [
      spectrumId,
      user.id,
      sqlTime(new Date()),
    ])
    return spectrumId
  })
  ctx.jobs?.enqueue(id)
  const row = columns.row
  return {
    file: file.name,
    outcome: 'accepted',
    spectrumId: id,
    pixels: row.pixels,
    wavelengthRange: [row.wlMin, row.wlMax],
    dispersion: row.dispersion,
    snr: row.snr,
    objectName: metadata.objectName,
    notes: meta.notes,
    decisions: meta.decisions!,
  }
}

/**
 * What the files of one request share: their campaign, and the instrument each setup names (looked
 * up once per request, not once per file).
 */
interface Batch {
  campaign: Campaign
  instrumentFor(setup: string): Promise<Instrument | null>
}

function batchOf(campaign: Campaign, chosen: number | null | undefined): Batch {
  const found = new Map<string, Promise<Instrument | null>>()
  return {
    campaign,
    instrumentFor(setup) {
      const key = setup.trim().toLowerCase()
      let instrument = found.get(key)
      if (!instrument) {
        instrument = instrumentForSpectrum(campaign.id, chosen, setup)
        found.set(key, instrument)
        // A failed lookup is the file's alone: the next file asks again.
        instrument.catch(() => found.delete(key))
      }
      return instrument
    },
  }
}

/** Errors that are about the server, not the file: the whole request fails with them (e.g. 503). */
const isServerTrouble = (error: unknown) => error instanceof ConnectionError || error instanceof HttpError

/** One file's own result, whatever goes wrong with it. */
async function storeSafely(ctx: AppContext, user: User, batch: Batch, file: UploadedFile, opts: SubmitOptions): Promise<FileResult> {
  try {
    return await storeOne(ctx, user, batch, file, opts)
  } catch (error) {
    if (isServerTrouble(error)) throw error
    ctx.logger.error({ err: error, file: file.name }, 'storing an uploaded file failed')
    return { file: file.name, outcome: 'refused', code: 'NOT_STORED', message: `${file.name} could not be stored; nothing of it was kept. Try it again, or tell a lead if it keeps failing.` }
  }
}

/** Why a zip entry was left out, as a result line of its own (directories are not files and say nothing). */
function skippedEntry(archive: string, name: string): FileResult | null {
  if (name.endsWith('/') || name.endsWith('\\')) return null
  const file = `${archive}/${name}`
  if (name.split(/[/\\]/).includes('..') || /^([/\\]|[A-Za-z]:)/.test(name)) {
    return { file, outcome: 'refused', code: 'ZIP_UNSAFE_PATH', message: `${file}: the name points outside the archive (..), so the entry was skipped.` }
  }
  return { file, outcome: 'refused', code: 'ZIP_ENTRY_SKIPPED', message: `${file}: hidden files and system folders (names starting with a dot, __MACOSX) are skipped.` }
}

/** Reads and stores each uploaded file (zip archives file by file); one bad file never stops the others. */
export async function submitFiles(ctx: AppContext, user: User, files: UploadedFile[], opts: SubmitOptions): Promise<FileResult[]> {
  const campaign = await campaignForSubmission(user, opts.campaignId)
  // A wrong instrument is the batch's mistake, not each file's: refuse before reading any.
  if (opts.instrumentId !== undefined && opts.instrumentId !== null) await instrumentForSpectrum(campaign.id, opts.instrumentId, undefined)
  const batch = batchOf(campaign, opts.instrumentId)
  const results: FileResult[] = []
  let budget = ctx.config.UPLOAD_MAX_FILES
  for (const file of files) {
    const head = 'bytes' in file ? file.bytes.subarray(0, 4) : await readHead(file.path)
    if (isZip(head)) {
      const unzipped = await readingOf(ctx).unzip(sourceOf(file), { maxEntries: budget, maxTotalBytes: ctx.config.UPLOAD_MAX_BYTES * 4, maxEntryBytes: ctx.config.UPLOAD_MAX_BYTES })
      if (!unzipped.ok) {
        results.push({ file: file.name, outcome: 'refused', code: unzipped.code, message: unzipped.message })
        continue
      }
      for (const entry of unzipped.entries) {
        budget--
        results.push(await storeSafely(ctx, user, batch, { name: `${file.name}/${entry.name}`, bytes: entry.bytes }, opts))
      }
      for (const name of unzipped.skipped) {
        const line = skippedEntry(file.name, name)
        if (line) results.push(line)
      }
      continue
    }
    budget--
    if (budget < 0) {
      results.push({ file: file.name, outcome: 'refused', code: 'TOO_MANY_FILES', message: `${file.name}: a batch holds at most ${ctx.config.UPLOAD_MAX_FILES} files` })
      continue
    }
    results.push(await storeSafely(ctx, user, batch, file, opts))
  }
  return results
}

async function readHead(path: string): Promise<Buffer> {
  const handle = await open(path, 'r')
  try {
    const { buffer, bytesRead } = await handle.read(Buffer.alloc(4), 0, 4, 0)
    return buffer.subarray(0, bytesRead)
  } finally {
    await handle.close()
  }
}

/** The columns a list row shows. */
const LIST_COLUMNS = [
  'id',
  'objectName',
  'status',
  'statusReason',
  'campaignId',
  'submittedBy',
  'fileName',
  'obsDate',
  'createdAt',
  'snr',
  'pixels',
  'wlMin',
  'wlMax',
  'dispersion',
  'raDeg',
  'decDeg',
] as const
type ListRow = Pick<Spectrum, (typeof LIST_COLUMNS)[number]>

function toListItem(s: ListRow & { campaign?: Pick<Campaign, 'code' | 'name'>; submitter?: Pick<User, 'name'> }, classification: FinalClassification | null = null): SpectrumListItem {
  return {
    id: s.id,
    objectName: s.objectName,
    status: s.status,
    statusReason: s.statusReason,
    campaign: { id: s.campaignId, code: s.campaign?.code ?? '', name: s.campaign?.name ?? '' },
    submittedBy: { id: s.submittedBy, name: s.submitter?.name ?? '' },
    fileName: s.fileName,
    obsDate: s.obsDate ? s.obsDate.toISOString() : null,
    createdAt: s.createdAt.toISOString(),
    snr: s.snr,
    pixels: s.pixels,
    wavelengthRange: [s.wlMin, s.wlMax],
    dispersion: s.dispersion,
    raDeg: s.raDeg,
    decDeg: s.decDeg,
    classification,
  }
}

export type ListQuery = SpectrumListQuery

/** Words InnoDB's full-text index leaves out by default (its stopword list), so a search never requires one. */
const FULLTEXT_STOPWORDS = new Set(['about', 'are', 'com', 'for', 'from', 'how', 'that', 'the', 'this', 'was', 'what', 'when', 'where', 'who', 'will', 'with', 'und', 'www'])
/** File-name endings say nothing about which spectrum is meant, and nearly every name has one. */
const FILE_ENDINGS = new Set(['fits', 'fit', 'fts', 'txt', 'csv', 'dat', 'zip', 'ascii', 'tsv'])
/** InnoDB indexes words of at least this many characters (innodb_ft_min_token_size). */
const FULLTEXT_MIN_WORD = 3

/** Up to this many candidates are taken from the indexes before the text itself is checked. */
const SEARCH_CANDIDATES = 5000

/**
 * A search over object and file names: names that contain the text and either start with it or
 * hold its most specific word. Candidates come from indexes — names starting with the text (B-tree)
 * and, through the full-text index, names holding the text's longest word of three or more letters
 * (matched from its start; file endings such as "fits" do not count) — and the whole text is then
 * checked as a substring on those few rows. Catalogue prefixes that every name shares ("HD", "KRF")
 * are thus never scanned. When a word is so common that the candidates overflow, the full-text
 * condition is applied in the list query itself (slower, still exact).
 */
export async function nameSearchWhere(q: string): Promise<WhereOptions<Spectrum>> {
  const sequelize = Spectrum.sequelize!
  const like = (text: string) => text.replace(/[\\%_]/g, (c) => `\\${c}`)
  const contains = { [Op.or]: [{ objectName: { [Op.like]: `%${like(q)}%` } }, { fileName: { [Op.like]: `%${like(q)}%` } }] }
  const word = q
    .split(/[^\p{L}\p{N}]+/u)
    .filter((w) => w.length >= FULLTEXT_MIN_WORD && !FULLTEXT_STOPWORDS.has(w.toLowerCase()) && !FILE_ENDINGS.has(w.toLowerCase()))
    .sort((x, y) => y.length - x.length)[0]
  const match = word ? `MATCH (object_name, file_name) AGAINST (${sequelize.escape(`+${word}*`)} IN BOOLEAN MODE)` : null
  const prefix = sequelize.escape(`${like(q)}%`)
  const rows = await sequelize.query<{ id: number }>(
    `(SELECT id FROM spectra WHERE object_name LIKE ${prefix} LIMIT ${SEARCH_CANDIDATES + 1})
     UNION (SELECT id FROM spectra WHERE file_name LIKE ${prefix} LIMIT ${SEARCH_CANDIDATES + 1})
     ${match ? `UNION (SELECT id FROM spectra WHERE ${match} LIMIT ${SEARCH_CANDIDATES + 1})` : ''}`,
    { type: QueryTypes.SELECT },
  )
  if (rows.length > SEARCH_CANDIDATES && match) {
    return {
      [Op.and]: [
        {
          [Op.or]: [
            literal(match.replace('(object_name, file_name)', '(`Spectrum`.`object_name`, `Spectrum`.`file_name`)')),
            { objectName: { [Op.like]: `${like(q)}%` } },
            { fileName: { [Op.like]: `${like(q)}%` } },
          ],
        },
        contains,
      ],
    } as WhereOptions<Spectrum>
  }
  return { [Op.and]: [{ id: { [Op.in]: [0, ...rows.map((r) => Number(r.id))] } }, contains] }
}

/** Up to this many matching rows are counted exactly on every request; beyond, the count is cached a while. */
const EXACT_COUNT_LIMIT = 1000
const COUNT_CACHE_MS = 30_000
const countCache = new Map<string, { total: number; at: number }>()

/**
 * The number of rows a list filter matches. Small results are counted exactly each time (a bounded
 * scan of at most EXACT_COUNT_LIMIT index entries); a larger count is computed once and kept for
 * COUNT_CACHE_MS, so paging through 100 000 spectra does not count them all on every page.
 */
async function countMatching(where: WhereOptions<Spectrum>, key: string, now = Date.now()): Promise<number> {
  const sequelize = Spectrum.sequelize!
  // The query Sequelize would run for these ids, counted in the database rather than sent over.
  const options = Utils.mapOptionFieldNames({ where, attributes: ['id'], limit: EXACT_COUNT_LIMIT + 1 } as never, Spectrum as never) as object
  const generator = sequelize.getQueryInterface().queryGenerator as unknown as { selectQuery(table: string, options: object, model: unknown): string }
  const inner = generator.selectQuery('spectra', options, Spectrum).replace(/;\s*$/, '')
  const [bounded] = await sequelize.query<{ n: number }>(`SELECT COUNT(*) AS n FROM (${inner}) AS bounded`, { type: QueryTypes.SELECT })
  const n = Number(bounded?.n ?? 0)
  if (n <= EXACT_COUNT_LIMIT) return n
  const cached = countCache.get(key)
  if (cached && now - cached.at < COUNT_CACHE_MS) return Math.max(cached.total, n)
  const total = await Spectrum.count({ where })
  if (countCache.size > 500) countCache.clear()
  countCache.set(key, { total, at: now })
  return total
}

export async function listSpectra(user: User, query: ListQuery): Promise<SpectrumList> {
  const and: WhereOptions<Spectrum>[] = [await visibilityWhere(user)]
  if (query.status) and.push({ status: query.status })
  if (query.campaign) and.push({ campaignId: query.campaign })
  if (query.instrument) and.push({ instrumentId: query.instrument })
  if (query.mine === '1') and.push({ submittedBy: user.id })
  if (query.q) and.push(await nameSearchWhere(query.q))
  if (query.from) and.push({ createdAt: { [Op.gte]: new Date(query.from) } })
  if (query.to) and.push({ createdAt: { [Op.lte]: new Date(query.to) } })
  if (query.snrMin !== undefined) and.push({ snr: { [Op.gte]: query.snrMin } })
  if (query.snrMax !== undefined) and.push({ snr: { [Op.lte]: query.snrMax } })
  const desc = query.sort.startsWith('-')
  const field = query.sort.replace(/^-/, '')
  const order: Order = [
    [field, desc ? 'DESC' : 'ASC'],
    ['id', desc ? 'DESC' : 'ASC'],
  ]
  const where = { [Op.and]: and }
  const { page: _page, pageSize: _size, sort: _sort, ...filters } = query
  const countKey = JSON.stringify([user.id, filters])
  const [rows, count] = await Promise.all([
    // Plain rows: building a model instance per row costs more than the query on a busy server.
    Spectrum.findAll({
      where,
      attributes: [...LIST_COLUMNS],
      order,
      limit: query.pageSize,
      offset: (query.page - 1) * query.pageSize,
      raw: true,
    }) as Promise<ListRow[]>,
    countMatching(where, countKey),
  ])
  // Names of the few campaigns and people on the page, by key rather than a join per row.
  const [campaigns, people, decided] = await Promise.all([
    Campaign.findAll({ where: { id: { [Op.in]: [0, ...new Set(rows.map((r) => r.campaignId))] } }, attributes: ['id', 'code', 'name'], raw: true }),
    User.findAll({ where: { id: { [Op.in]: [0, ...new Set(rows.map((r) => r.submittedBy))] } }, attributes: ['id', 'name'], raw: true }),
    finalClassificationsFor(rows.map((r) => r.id)),
  ])
  const campaignOf = new Map(campaigns.map((c) => [c.id, c]))
  const personOf = new Map(people.map((u) => [u.id, u]))
  return {
    items: rows.map((r) => toListItem({ ...r, campaign: campaignOf.get(r.campaignId), submitter: personOf.get(r.submittedBy) }, decided.get(r.id) ?? null)),
    total: count,
    page: query.page,
    pageSize: query.pageSize,
  }
}

export async function getSpectrumDetail(user: User, id: number): Promise<SpectrumDetail> {
  const s = await findVisibleSpectrum(user, id)
  const [campaign, submitter, decided, calls] = await Promise.all([
    Campaign.findByPk(s.campaignId),
    User.findByPk(s.submittedBy, { attributes: ['id', 'name'] }),
    finalClassificationsFor([s.id]),
    ReviewCall.count({ where: { spectrumId: s.id } }),
  ])
  return {
    ...toListItem(Object.assign(s, { campaign: campaign ?? undefined, submitter: submitter ?? undefined }), decided.get(s.id) ?? null),
    instrument: s.instrument,
    instrumentRecord: s.instrumentId !== null ? await instrumentRef(s.instrumentId) : null,
    exposureS: s.exposureS,
    resolutionFwhm: s.resolutionFwhm,
    resolvingPower: s.resolvingPower,
    vMag: s.vMag,
    parallaxMas: s.parallaxMas,
    parallaxErrorMas: s.parallaxErrorMas,
    ebv: s.ebv,
    notes: s.notes,
    format: s.format,
    fileSize: s.fileSize,
    fileSha256: s.fileSha256,
    vacuumConverted: s.vacuumConverted,
    read: JSON.parse(s.readInfo) as ReadMeta,
    readChoices: JSON.parse(s.readChoices) as ReadChoices,
    canEdit: s.submittedBy === user.id || user.role === 'lead',
    canWithdraw: s.submittedBy === user.id && calls === 0,
    canReread: user.role === 'lead' || (s.submittedBy === user.id && calls === 0),
  }
}

async function instrumentRef(id: number): Promise<{ id: number; name: string; resolutionFwhm: number | null } | null> {
  const i = await Instrument.findByPk(id, { attributes: ['id', 'name', 'resolutionFwhm'] })
  return i ? { id: i.id, name: i.name, resolutionFwhm: i.resolutionFwhm } : null
}

/** Statuses a re-read may send back to "received"; review states keep theirs (the calls stay). */
const BEFORE_REVIEW = new Set<SpectrumStatus>(['received', 'failed', 'measured', 'suggested'])

const describeRead = (s: Spectrum, meta: ReadMeta) => ({
  choices: JSON.parse(s.readChoices) as ReadChoices,
  wavelengthRange: [s.wlMin, s.wlMax],
  pixels: s.pixels,
  hdu: meta.hdu ?? null,
  aperture: meta.decisions?.aperture?.number ?? null,
  unit: meta.wavelengthUnit,
  vacuumConverted: meta.vacuumConverted,
  vacuumSource: meta.vacuumSource,
})

/**
 * Corrects what the header or the batch form said. Object, coordinates and the like change in
 * place. A new reading choice (medium, unit, HDU, aperture) re-reads the stored file; a new
 * resolution re-processes; either way the earlier measurement and suggestion stay in the history
 * and a spectrum event says what changed. The submitter may do it until the first call; a lead at
 * any time. A file the new choices cannot read is refused and nothing changes.
 */
export async function updateSpectrumMetadata(ctx: AppContext, user: User, id: number, input: SpectrumCorrectionInput): Promise<SpectrumDetail> {
  const s = await findVisibleSpectrum(user, id)
  if (s.submittedBy !== user.id && user.role !== 'lead') throw new HttpError(403, 'forbidden', 'Only the person who submitted a spectrum, or a lead, can change its details.')
  const changes: Partial<Spectrum> = {}
  if (input.objectName !== undefined) changes.objectName = input.objectName
  if (input.ra !== undefined) changes.raDeg = input.ra === '' ? null : (parseRightAscension(input.ra) as { degrees: number }).degrees
  if (input.dec !== undefined) changes.decDeg = input.dec === '' ? null : (parseDeclination(input.dec) as { degrees: number }).degrees
  if (input.obsDate !== undefined) changes.obsDate = input.obsDate === '' ? null : new Date(input.obsDate)
  if (input.instrument !== undefined) changes.instrument = input.instrument
  if (input.notes !== undefined) changes.notes = input.notes
  // Numbers: undefined leaves the stored value, null clears it.
  for (const key of ['resolutionFwhm', 'resolvingPower', 'vMag', 'parallaxMas', 'parallaxErrorMas', 'ebv'] as const) {
    const value = input[key]
    if (value !== undefined) changes[key] = value
  }
  const before = JSON.parse(s.readChoices) as ReadChoices
  const choices = choicesOf(input, before)
  const reread = !sameChoices(before, choices)
  const resolutionChanged =
    (changes.resolutionFwhm !== undefined && changes.resolutionFwhm !== s.resolutionFwhm) || (changes.resolvingPower !== undefined && changes.resolvingPower !== s.resolvingPower)
  // Another instrument means other standards to match against: processed again, like a new resolution.
  let instrumentText: string | null = null
  if (input.instrumentId !== undefined && input.instrumentId !== s.instrumentId) {
    const instrument = input.instrumentId === null ? null : await instrumentForSpectrum(s.campaignId, input.instrumentId, undefined)
    const old = s.instrumentId !== null ? await Instrument.findByPk(s.instrumentId, { attributes: ['id', 'name'] }) : null
    changes.instrumentId = instrument?.id ?? null
    instrumentText = `instrument ${instrument?.name ?? 'none'} (was ${old?.name ?? 'none'})`
  }
  if (!reread && !resolutionChanged && instrumentText === null) {
    await s.update(changes)
    return getSpectrumDetail(user, id)
  }
  const calls = await ReviewCall.count({ where: { spectrumId: id } })
  if (calls > 0 && user.role !== 'lead') {
    throw new HttpError(
      409,
      'has_calls',
      'Classifiers have already called this spectrum, so how it is read and processed can only be changed by a lead. Ask a lead, or correct only the descriptive details.',
    )
  }
  let read: ReadColumns | undefined
  const oldMeta = JSON.parse(s.readInfo) as ReadMeta
  if (reread) {
    const raw = await storedRawBytes(ctx, id)
    const { read: result } = await readingOf(ctx).read(s.fileName, { bytes: raw }, readOptionsFor(ctx.config, choices))
    if (!result.ok) {
      throw new HttpError(422, 'read_refused', `With these choices the file cannot be read: ${result.message}. Nothing was changed.`, { code: result.code })
    }
    read = result
  }
  const fwhmText = (fwhm: number | null, power: number | null) => (fwhm != null ? `${fwhm} Å FWHM` : power != null ? `R = ${power}` : 'none given')
  const resolutionText = `resolution ${fwhmText(changes.resolutionFwhm !== undefined ? changes.resolutionFwhm : s.resolutionFwhm, changes.resolvingPower !== undefined ? changes.resolvingPower : s.resolvingPower)} (was ${fwhmText(s.resolutionFwhm, s.resolvingPower)})`
  let summary: string
  if (reread) {
    const m = read!.meta
    const d = m.decisions!
    summary = `Read again as ${m.vacuumConverted ? 'vacuum' : 'air'}, unit ${m.wavelengthUnit}${m.hdu !== undefined ? `, HDU ${m.hdu}` : ''}${d.aperture ? `, aperture ${d.aperture.number}` : ''}: ${read!.row.wlMin.toFixed(1)}–${read!.row.wlMax.toFixed(1)} Å, ${read!.row.pixels} pixels (was ${s.wlMin.toFixed(1)}–${s.wlMax.toFixed(1)} Å, ${s.pixels} pixels)${resolutionChanged ? `; ${resolutionText}` : ''}${instrumentText ? `; ${instrumentText}` : ''}`
  } else summary = `Processed again with ${[resolutionChanged ? resolutionText : null, instrumentText].filter((x) => x !== null).join(' and ')}`
  const [currentMeasurement, currentSuggestion] = await Promise.all([
    Measurement.findOne({ where: { spectrumId: id, isCurrent: true }, attributes: ['id'] }),
    Suggestion.findOne({ where: { spectrumId: id, isCurrent: true }, attributes: ['id', 'spectralType'] }),
  ])
  await ctx.sequelize.transaction(async (transaction) => {
    await SpectrumEvent.create(
      {
        spectrumId: id,
        campaignId: s.campaignId,
        kind: reread ? 'reread' : 'reprocess',
        userId: user.id,
        summary,
        details: JSON.stringify({
          before: {
            ...describeRead(s, oldMeta),
            resolutionFwhm: s.resolutionFwhm,
            resolvingPower: s.resolvingPower,
            instrumentId: s.instrumentId,
            measurementId: currentMeasurement?.id ?? null,
            suggestionId: currentSuggestion?.id ?? null,
            suggestion: currentSuggestion?.spectralType ?? null,
          },
          after: {
            choices,
            resolutionFwhm: changes.resolutionFwhm ?? s.resolutionFwhm,
            resolvingPower: changes.resolvingPower ?? s.resolvingPower,
            instrumentId: changes.instrumentId !== undefined ? changes.instrumentId : s.instrumentId,
            ...(read
              ? {
                  wavelengthRange: [read!.row.wlMin, read!.row.wlMax],
                  pixels: read!.row.pixels,
                  vacuumConverted: read.meta.vacuumConverted,
                  vacuumSource: read.meta.vacuumSource,
                  unit: read.meta.wavelengthUnit,
                  hdu: read.meta.hdu ?? null,
                  aperture: read.meta.decisions?.aperture?.number ?? null,
                }
              : {}),
          },
        }),
      },
      { transaction },
    )
    if (reread) {
      // The old measurement and suggestion described other arrays: they stay as history, no longer current.
      await Measurement.update({ isCurrent: false }, { where: { spectrumId: id, isCurrent: true }, transaction })
      await Suggestion.update({ isCurrent: false }, { where: { spectrumId: id, isCurrent: true }, transaction })
      await indexSuggestionFlags(ctx.sequelize, id, [], transaction)
      await SpectrumBlob.update(read!.blob, { where: { spectrumId: id }, transaction })
      Object.assign(changes, read!.row, { readChoices: JSON.stringify(choices) })
      if (BEFORE_REVIEW.has(s.status)) Object.assign(changes, { status: 'received', statusReason: null })
    } else if (s.status === 'failed') Object.assign(changes, { status: 'received', statusReason: null })
    await s.update(changes, { transaction })
    const pending = await ProcessingJob.count({ where: { spectrumId: id, status: 'queued' }, transaction })
    if (pending === 0) await ProcessingJob.create({ spectrumId: id, error: null, requestedBy: user.id, startedAt: null, finishedAt: null }, { transaction })
  })
  ctx.jobs?.enqueue(id)
  return getSpectrumDetail(user, id)
}

/** The uploaded file's bytes, from the file store (or from the row, for spectra stored before the file store). */
async function storedRawBytes(ctx: Pick<AppContext, 'files'>, id: number): Promise<Buffer> {
  const blob = await SpectrumBlob.findByPk(id, { attributes: ['spectrumId', 'raw', 'rawKey'] })
  if (blob?.rawKey && (await ctx.files.exists(blob.rawKey))) return ctx.files.get(blob.rawKey)
  if (blob?.raw) return blob.raw
  throw notFound('The uploaded file')
}

/**
 * The submitter withdraws their own spectrum before anyone has called it: the raw file, the arrays,
 * the measurements, suggestions and jobs go; a spectrum event keeps the record of what was withdrawn.
 */
export async function withdrawSpectrum(ctx: AppContext, user: User, id: number): Promise<{ message: string }> {
  const s = await findVisibleSpectrum(user, id)
  if (s.submittedBy !== user.id) throw new HttpError(403, 'forbidden', 'Only the person who submitted a spectrum can withdraw it.')
  const [calls, decided, standards, running] = await Promise.all([
    ReviewCall.count({ where: { spectrumId: id } }),
    Classification.count({ where: { spectrumId: id } }),
    Standard.count({ where: { spectrumId: id } }),
    ProcessingJob.count({ where: { spectrumId: id, status: 'running' } }),
  ])
  if (calls > 0 || decided > 0) throw new HttpError(409, 'has_calls', 'Classifiers have already called this spectrum, so it can no longer be withdrawn. Ask a lead if it must go.')
  if (standards > 0) throw new HttpError(409, 'is_standard', 'This spectrum is in the standards library, so it cannot be withdrawn. Ask a lead to retire the standard first.')
  if (running > 0) throw new HttpError(409, 'processing', 'This spectrum is being processed right now; withdraw it again in a moment.')
  await ctx.sequelize.transaction(async (transaction) => {
    await SpectrumEvent.create(
      {
        spectrumId: id,
        campaignId: s.campaignId,
        kind: 'withdrawn',
        userId: user.id,
        summary: `${user.name || user.email} withdrew ${s.fileName} (${s.objectName}) before any call`,
        details: JSON.stringify({
          fileName: s.fileName,
          fileSha256: s.fileSha256,
          fileSize: s.fileSize,
          objectName: s.objectName,
          status: s.status,
          submittedAt: s.createdAt.toISOString(),
          wavelengthRange: [s.wlMin, s.wlMax],
          pixels: s.pixels,
        }),
      },
      { transaction },
    )
    const measurements = (await Measurement.findAll({ where: { spectrumId: id }, attributes: ['id'], transaction })).map((m) => m.id)
    await Suggestion.destroy({ where: { spectrumId: id }, transaction })
    if (measurements.length) await LineMeasurementRow.destroy({ where: { measurementId: measurements }, transaction })
    await Measurement.destroy({ where: { spectrumId: id }, transaction })
    await ProcessingJob.destroy({ where: { spectrumId: id }, transaction })
    await ReviewClaim.destroy({ where: { spectrumId: id }, transaction })
    await SpectrumBlob.destroy({ where: { spectrumId: id }, transaction })
    await Spectrum.destroy({ where: { id }, transaction })
  })
  // The same file may be stored for another campaign under the same key: it goes only with the last.
  const key = rawFileKey(s.fileSha256)
  if ((await SpectrumBlob.count({ where: { rawKey: key } })) === 0) await ctx.files.remove(key)
  return { message: `${s.fileName} was withdrawn; its file and results are gone.` }
}

export interface SeriesPayload {
  layout: { points: number; total: number; decimated: boolean; columns: string[] }
  body: Buffer
}

/** The observed arrays between from and to (Å), decimated to maxPoints, as float32 columns. */
export async function getSpectrumSeries(user: User, id: number, q: SeriesQuery): Promise<SeriesPayload> {
  await findVisibleSpectrum(user, id)
  const blob = await SpectrumBlob.findByPk(id, { attributes: ['wavelength', 'flux', 'error', 'mask'] })
  if (!blob) throw notFound('The spectrum data')
  const wl = bufferToFloat64(blob.wavelength)
  const flux = bufferToFloat32(blob.flux)
  const error = blob.error ? bufferToFloat32(blob.error) : null
  const mask = blob.mask
  const from = q.from !== undefined ? lowerBound(wl, q.from) : 0
  const to = q.to !== undefined ? lowerBound(wl, q.to) : wl.length
  const keep = decimateMinMax(flux, from, Math.max(from, to), q.maxPoints)
  const columns = error ? ['wavelength', 'flux', 'error'] : ['wavelength', 'flux']
  const out = new Float32Array(keep.length * columns.length)
  keep.forEach((idx, k) => {
    const bad = mask ? mask[idx] === 1 : false
    out[k] = wl[idx]!
    out[keep.length + k] = bad ? Number.NaN : flux[idx]!
    if (error) out[2 * keep.length + k] = error[idx]!
  })
  return {
    layout: { points: keep.length, total: to - from, decimated: keep.length < to - from, columns },
    body: Buffer.from(out.buffer, out.byteOffset, out.byteLength),
  }
}

/** The file exactly as it was uploaded, as a stream from the file store. */
export async function getRawFile(ctx: Pick<AppContext, 'files'>, user: User, id: number): Promise<{ name: string; size: number; body: Readable }> {
  const s = await findVisibleSpectrum(user, id)
  const blob = await SpectrumBlob.findByPk(id, { attributes: ['spectrumId', 'rawKey'] })
  if (!blob?.rawKey || !(await ctx.files.exists(blob.rawKey))) throw notFound('The uploaded file')
  return { name: s.fileName.split('/').pop() ?? s.fileName, size: s.fileSize, body: await ctx.files.stream(blob.rawKey) }
}

/**
 * Moves files that older versions kept in the database into the file store, a few at a time
 * (idempotent: a file already in the store is not written again).
 */
export async function moveRawFilesToStore(ctx: Pick<AppContext, 'files' | 'logger'>): Promise<number> {
  let moved = 0
  for (;;) {
    const ids = await SpectrumBlob.findAll({ where: { raw: { [Op.ne]: null } }, attributes: ['spectrumId'], limit: 20 })
    if (ids.length === 0) break
    for (const { spectrumId } of ids) {
      const blob = await SpectrumBlob.findByPk(spectrumId, { attributes: ['spectrumId', 'raw'] })
      if (!blob?.raw) continue
      const key = rawFileKey(sha256Hex(blob.raw))
      if (!(await ctx.files.exists(key))) await ctx.files.put(key, blob.raw)
      await SpectrumBlob.update({ raw: null, rawKey: key }, { where: { spectrumId } })
      moved++
    }
  }
  if (moved > 0) ctx.logger.info({ moved }, 'uploaded files moved from the database to the file store')
  return moved
}
