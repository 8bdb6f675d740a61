import { Op, type Transaction, type WhereOptions } from 'sequelize'
import { agreementLabel, decisionLabel } from '../../shared/decision'
import { decimalsForUncertainty, roundToUncertainty } from '../../shared/rounding'
import type { DerivedParameters } from '../../shared/derived'
import { CATALOGUE_COLUMNS, CATALOGUE_NOTES, isoTimestamp, writeTable, type ExportColumn, type ExportFormat, type ExportRow, type ExportTable, type TableParam } from '../exports'
import { HttpError, notFound } from '../lib/http-error'
import { Campaign, Classification, LibraryVersion, Measurement, Release, ReleaseRow, ReviewCall, Spectrum, Suggestion, User } from '../models'
import { campaignIdsOf } from './campaigns.service'
import { decisionUncertainty, estimatesFor, observerInputs } from './derived.service'
import type { Paging } from '../../shared/api/common'
import type { ReleaseDetail, ReleaseInput, ReleasePreview, ReleaseSummary } from '../../shared/api/releases'

export type { ReleaseDetail, ReleasePreview, ReleaseSummary }

/** Spectra in these states have a decided classification and go into a release. */
export const RELEASED_STATUSES = ['agreed', 'settled'] as const

// ---------------------------------------------------------------------------------------------
// One catalogue row
// ---------------------------------------------------------------------------------------------

export interface CatalogueSources {
  spectrum: Pick<Spectrum, 'id' | 'objectName' | 'raDeg' | 'decDeg' | 'obsDate' | 'snr' | 'vMag' | 'ebv' | 'parallaxMas' | 'parallaxErrorMas'> &
    Partial<Pick<Spectrum, 'instrument' | 'resolvingPower' | 'wlMin' | 'wlMax' | 'fileName'>>
  classification: Pick<Classification, 'source' | 'spectralType' | 'typeCode' | 'luminosityClass' | 'classCode' | 'peculiarities' | 'nCalls' | 'agreement' | 'typeSpread' | 'classSpread'>
  suggestion: (Pick<Suggestion, 'pipelineVersion' | 'uncertaintySubtypes' | 'uncertaintyClasses'> & Partial<Pick<Suggestion, 'spectralType'>>) | null
  libraryVersion: string | null
  measurement: Pick<Measurement, 'snr' | 'rv' | 'rvError' | 'pipelineVersion'> | null
  /** The settling lead, or the classifiers whose calls the decision rests on. */
  decidedBy: string[]
}

/** How a decision came about, in the words of the catalogue. */
export function decisionText(c: Pick<Classification, 'source' | 'nCalls'>): string {
  return decisionLabel(c)
}

const num = (v: number | null | undefined) => (v === null || v === undefined || !Number.isFinite(v) ? null : v)

/** Modified Julian Date of a moment: days since 1858-11-17T00:00 UTC (MJD 40587 is 1970-01-01). */
export function modifiedJulianDate(d: Date): number {
  return d.getTime() / 86_400_000 + 40_587
}

/** Pairs of a value column and its uncertainty, rounded together as tables are written. */
const UNCERTAIN_PAIRS: readonly [string, string][] = [
  ['TypeCode', 'e_TypeCode'],
  ['ClassCode', 'e_ClassCode'],
  ['RV', 'e_RV'],
  ['Plx', 'e_Plx'],
  ['Teff', 'e_Teff'],
  ['MV', 'e_MV'],
  ['Dist', 'e_Dist'],
  ['DistPlx', 'e_DistPlx'],
  ['Lum', 'e_Lum'],
  ['Rad', 'e_Rad'],
]

/**
 * Each value rounded to the decimal place of its uncertainty, and the uncertainty to two significant
 * figures (common practice), so no file claims digits the measurement does not have.
 */
export function roundRowToUncertainty(row: ExportRow): ExportRow {
  const out = { ...row }
  for (const [value, error] of UNCERTAIN_PAIRS) {
    const e = out[error]
    if (typeof e !== 'number' || !(e > 0)) continue
    const d = decimalsForUncertainty(e)!
    out[error] = Number(e.toFixed(d))
    const v = out[value]
    if (typeof v === 'number') out[value] = roundToUncertainty(v, e)
  }
  return out
}

function derivedCells(d: DerivedParameters): ExportRow {
  if (!d.ok) return { DFlag: d.flag }
  return {
    Teff: d.teff.value,
    e_Teff: d.teff.uncertainty,
    MV: d.absoluteMagnitudeV.value,
    e_MV: d.absoluteMagnitudeV.uncertainty,
    BC: d.bolometricCorrectionV.value,
    Dist: num(d.spectroscopicDistancePc?.value),
    e_Dist: num(d.spectroscopicDistancePc?.uncertainty),
    DistPlx: num(d.parallaxDistancePc?.value),
    e_DistPlx: num(d.parallaxDistancePc?.uncertainty),
    Lum: d.luminositySolar.value,
    e_Lum: d.luminositySolar.uncertainty,
    Rad: d.radiusSolar.value,
    e_Rad: d.radiusSolar.uncertainty,
    DFlag: null,
  }
}

/** The values of every catalogue column for one decided spectrum (labels of {@link CATALOGUE_COLUMNS}). */
export function catalogueRow(src: CatalogueSources): ExportRow {
  const { spectrum: s, classification: c, measurement: m } = src
  const u = decisionUncertainty(c, src.suggestion)
  const peculiarities = (JSON.parse(c.peculiarities || '[]') as string[]).join(' ')
  const derived = estimatesFor({ source: 'classification', spectralType: c.spectralType, typeUncertainty: u.type, classUncertainty: u.class }, observerInputs(s))
  const row: ExportRow = {
    SpId: s.id,
    Object: s.objectName,
    RAdeg: num(s.raDeg),
    DEdeg: num(s.decDeg),
    ObsDate: s.obsDate ? isoTimestamp(s.obsDate) : null,
    MJD: s.obsDate ? Number(modifiedJulianDate(s.obsDate).toFixed(6)) : null,
    SpType: c.spectralType,
    TypeCode: num(c.typeCode),
    LumClass: c.luminosityClass || null,
    ClassCode: num(c.classCode),
    e_TypeCode: u.type,
    e_ClassCode: u.class,
    Pec: peculiarities || null,
    SugType: src.suggestion?.spectralType || null,
    Decision: decisionText(c),
    DecidedBy: src.decidedBy.length ? src.decidedBy.join('; ') : null,
    Ncalls: c.nCalls,
    Agreement: agreementLabel(c),
    LibVer: src.libraryVersion,
    PipeVer: src.suggestion?.pipelineVersion ?? m?.pipelineVersion ?? null,
    Instrument: s.instrument || null,
    ResPower: num(s.resolvingPower),
    WlMin: s.wlMin == null ? null : Number((s.wlMin / 10).toFixed(3)),
    WlMax: s.wlMax == null ? null : Number((s.wlMax / 10).toFixed(3)),
    FileName: s.fileName || null,
    SNR: num(m?.snr ?? s.snr),
    RV: num(m?.rv),
    e_RV: num(m?.rvError),
    Vmag: num(s.vMag),
    EBV: num(s.ebv),
    Plx: num(s.parallaxMas),
    e_Plx: num(s.parallaxErrorMas),
    Teff: null,
    e_Teff: null,
    MV: null,
    e_MV: null,
    BC: null,
    Dist: null,
    e_Dist: null,
    DistPlx: null,
    e_DistPlx: null,
    Lum: null,
    e_Lum: null,
    Rad: null,
    e_Rad: null,
    DFlag: null,
    ...derivedCells(derived),
  }
  return roundRowToUncertainty(row)
}

/** Latest decided classification of each released spectrum of a campaign, with what its row needs. */
async function gatherRows(campaignId: number, transaction: Transaction): Promise<Array<{ spectrumId: number; cells: ExportRow }>> {
  const spectra = await Spectrum.findAll({
    where: { campaignId, status: { [Op.in]: [...RELEASED_STATUSES] } },
    attributes: ['id', 'objectName', 'raDeg', 'decDeg', 'obsDate', 'snr', 'vMag', 'ebv', 'parallaxMas', 'parallaxErrorMas', 'instrument', 'resolvingPower', 'wlMin', 'wlMax', 'fileName'],
    order: [['id', 'ASC']],
    transaction,
  })
  if (spectra.length === 0) return []
  const ids = spectra.map((s) => s.id)
  const latest = new Map<number, Classification>()
  for (const c of await Classification.findAll({ where: { spectrumId: { [Op.in]: ids } }, order: [['id', 'ASC']], transaction })) latest.set(c.spectrumId, c)
  const decided = spectra.filter((s) => latest.has(s.id))
  const classifications = decided.map((s) => latest.get(s.id)!)

  const suggestions = await Suggestion.findAll({
    where: { [Op.or]: [{ id: { [Op.in]: [0, ...classifications.map((c) => c.suggestionId ?? 0)] } }, { spectrumId: { [Op.in]: ids }, isCurrent: true }] },
    attributes: ['id', 'spectrumId', 'isCurrent', 'libraryVersionId', 'pipelineVersion', 'uncertaintySubtypes', 'uncertaintyClasses', 'spectralType'],
    transaction,
  })
  const versions = new Map((await LibraryVersion.findAll({ attributes: ['id', 'name'], transaction })).map((v) => [v.id, v.name]))
  const measurements = new Map(
    (await Measurement.findAll({ where: { spectrumId: { [Op.in]: ids }, isCurrent: true }, attributes: ['id', 'spectrumId', 'snr', 'rv', 'rvError', 'pipelineVersion'], transaction })).map((m) => [
      m.spectrumId,
      m,
    ]),
  )
  const callIds = classifications.flatMap((c) => JSON.parse(c.callIds || '[]') as number[])
  const callers = new Map((callIds.length ? await ReviewCall.findAll({ where: { id: { [Op.in]: callIds } }, attributes: ['id', 'userId'], transaction }) : []).map((r) => [r.id, r.userId]))
  const userIds = new Set<number>([...callers.values(), ...classifications.map((c) => c.decidedBy ?? 0)])
  const names = new Map((await User.findAll({ where: { id: { [Op.in]: [...userIds] } }, attributes: ['id', 'name'], transaction })).map((u) => [u.id, u.name]))

  return decided.map((s) => {
    const c = latest.get(s.id)!
    const suggestion = suggestions.find((x) => x.id === c.suggestionId) ?? suggestions.find((x) => x.spectrumId === s.id && x.isCurrent) ?? null
    const who =
      c.source === 'settled'
        ? [c.decidedBy ? (names.get(c.decidedBy) ?? `#${c.decidedBy}`) : null]
        : [...new Set((JSON.parse(c.callIds || '[]') as number[]).map((id) => callers.get(id)).filter((x): x is number => x !== undefined))].map((id) => names.get(id) ?? `#${id}`)
    return {
      spectrumId: s.id,
      cells: catalogueRow({
        spectrum: s,
        classification: c,
        suggestion,
        libraryVersion: suggestion ? (versions.get(suggestion.libraryVersionId) ?? `#${suggestion.libraryVersionId}`) : null,
        measurement: measurements.get(s.id) ?? null,
        decidedBy: who.filter((x): x is string => x !== null),
      }),
    }
  })
}

/** The distinct non-empty values of one column, joined, for the release keywords. */
const distinct = (rows: ExportRow[], key: string) => [...new Set(rows.map((r) => r[key]).filter((v) => v !== null && v !== ''))].map(String).sort().join(', ')

// ---------------------------------------------------------------------------------------------
// Releases
// ---------------------------------------------------------------------------------------------

async function summaries(releases: Release[]): Promise<ReleaseSummary[]> {
  const campaigns = new Map((await Campaign.findAll({ where: { id: { [Op.in]: [0, ...releases.map((r) => r.campaignId)] } } })).map((c) => [c.id, c]))
  const users = new Map((await User.findAll({ where: { id: { [Op.in]: [0, ...releases.map((r) => r.createdBy)] } }, attributes: ['id', 'name'] })).map((u) => [u.id, u.name]))
  return releases.map((r) => {
    const c = campaigns.get(r.campaignId)
    return {
      id: r.id,
      campaign: { id: r.campaignId, code: c?.code ?? '', name: c?.name ?? '' },
      version: r.version,
      title: r.title,
      description: r.description,
      authors: r.authors,
      rows: r.rowCount,
      createdBy: { id: r.createdBy, name: users.get(r.createdBy) ?? '' },
      createdAt: r.createdAt.toISOString(),
      supersededBy: r.supersededBy ?? null,
      downloads: {
        csv: `/api/releases/${r.id}/download?format=csv`,
        ecsv: `/api/releases/${r.id}/download?format=ecsv`,
        votable: `/api/releases/${r.id}/download?format=votable`,
        fits: `/api/releases/${r.id}/download?format=fits`,
        mrt: `/api/releases/${r.id}/download?format=mrt`,
      },
    }
  })
}

export type { ReleaseInput }

/** The catalogue's columns for a release: all of them, or all but the decider's name. */
export function releaseColumns(includeDecider = true): ExportColumn[] {
  return CATALOGUE_COLUMNS.filter((c) => includeDecider || c.name !== 'DecidedBy')
}

/** What freezing a campaign now would give: the row count, what is still open, and the columns. */
export async function previewRelease(campaignId: number, includeDecider = true): Promise<ReleasePreview> {
  const campaign = await Campaign.findByPk(campaignId)
  if (!campaign) throw notFound('The campaign')
  const rows = await Release.sequelize!.transaction((transaction) => gatherRows(campaign.id, transaction))
  const counts = await Spectrum.count({ where: { campaignId }, group: ['status'] })
  const byStatus = new Map(counts.map((c) => [String((c as unknown as { status: string }).status), Number(c.count)]))
  const waiting = ['received', 'measured', 'suggested', 'under_review'].reduce((n, k) => n + (byStatus.get(k) ?? 0), 0)
  const previous = await Release.findOne({ where: { campaignId }, order: [['version', 'DESC']] })
  return {
    campaign: { id: campaign.id, code: campaign.code, name: campaign.name },
    version: (previous?.version ?? 0) + 1,
    rows: rows.length,
    waiting,
    disputed: byStatus.get('disputed') ?? 0,
    failed: byStatus.get('failed') ?? 0,
    columns: releaseColumns(includeDecider).map((c) => ({ name: c.name, unit: c.unit, description: c.description })),
  }
}

/**
 * Freezes every agreed or settled spectrum of the campaign into a new release, numbered one
 * above the campaign's latest, which it supersedes. The campaign row is locked so two leads
 * releasing at once get consecutive versions.
 */
export async function createRelease(user: User, input: ReleaseInput): Promise<ReleaseSummary> {
  const sequelize = Release.sequelize!
  const release = await sequelize.transaction(async (transaction) => {
    const campaign = await Campaign.findByPk(input.campaignId, { transaction, lock: transaction.LOCK.UPDATE })
    if (!campaign) throw notFound('The campaign')
    const previous = await Release.findOne({ where: { campaignId: campaign.id }, order: [['version', 'DESC']], transaction })
    const rows = await gatherRows(campaign.id, transaction)
    if (rows.length === 0) throw new HttpError(409, 'nothing_to_release', 'No spectrum of this campaign is agreed or settled yet, so there is nothing to release.')
    const version = (previous?.version ?? 0) + 1
    const createdAt = new Date()
    const columns = releaseColumns(input.includeDecider ?? true)
    const keep = new Set(columns.map((c) => c.name))
    const cells = rows.map((r) => Object.fromEntries(Object.entries(r.cells).filter(([k]) => keep.has(k))) as ExportRow)
    const params: TableParam[] = [
      { key: 'CAMPAIGN', name: 'campaign', value: campaign.code, description: 'campaign code', ucd: 'meta.id;meta.dataset' },
      { key: 'RELEASE', name: 'release', value: version, description: 'release version within the campaign', ucd: 'meta.version' },
      { key: 'LIBVER', name: 'library_versions', value: distinct(cells, 'LibVer'), description: 'standards-library versions of the rows', ucd: 'meta.version;meta.dataset' },
      { key: 'PIPEVER', name: 'pipeline_versions', value: distinct(cells, 'PipeVer'), description: 'pipeline versions of the rows', ucd: 'meta.version' },
      { key: 'NOBJ', name: 'rows', value: rows.length, description: 'number of rows', ucd: 'meta.number' },
    ]
    const created = await Release.create(
      {
        campaignId: campaign.id,
        version,
        title: input.title,
        description: input.description,
        authors: input.authors ?? '',
        rowCount: rows.length,
        columns: JSON.stringify(columns),
        params: JSON.stringify(params),
        notes: JSON.stringify(CATALOGUE_NOTES),
        createdBy: user.id,
        createdAt,
      },
      { transaction },
    )
    await ReleaseRow.bulkCreate(
      rows.map((r, i) => ({ releaseId: created.id, position: i + 1, spectrumId: r.spectrumId, cells: JSON.stringify(cells[i]) })),
      { transaction },
    )
    if (previous && previous.supersededBy === null) await previous.update({ supersededBy: created.id }, { transaction })
    return created
  })
  return (await summaries([release]))[0]!
}

/** A newer release of the same campaign that supersedes this one; only the latest release can be superseded. */
export async function supersedeRelease(user: User, releaseId: number, input: Omit<ReleaseInput, 'campaignId'>): Promise<ReleaseSummary> {
  const release = await Release.findByPk(releaseId)
  if (!release) throw notFound('The release')
  if (release.supersededBy !== null) throw new HttpError(409, 'already_superseded', `Release ${release.version} is already superseded by a newer release.`)
  return createRelease(user, { campaignId: release.campaignId, ...input })
}

/** Releases of the campaigns the user belongs to (leads: all); others are not there for them. */
async function visibleCampaigns(user: User): Promise<WhereOptions<Release>> {
  const ids = await campaignIdsOf(user)
  return ids === 'all' ? {} : { campaignId: { [Op.in]: ids } }
}

async function findVisibleRelease(user: User, id: number): Promise<Release> {
  const release = await Release.findOne({ where: { [Op.and]: [{ id }, await visibleCampaigns(user)] } })
  if (!release) throw notFound('The release')
  return release
}

export async function listReleases(user: User, query: { campaignId?: number }): Promise<ReleaseSummary[]> {
  const where: WhereOptions<Release>[] = [await visibleCampaigns(user)]
  if (query.campaignId) where.push({ campaignId: query.campaignId })
  const rows = await Release.findAll({
    where: { [Op.and]: where },
    order: [
      ['campaignId', 'ASC'],
      ['version', 'DESC'],
    ],
  })
  return summaries(rows)
}

export async function getRelease(user: User, id: number, paging: Paging): Promise<ReleaseDetail> {
  const release = await findVisibleRelease(user, id)
  const rows = await ReleaseRow.findAll({ where: { releaseId: id }, order: [['position', 'ASC']], offset: (paging.page - 1) * paging.pageSize, limit: paging.pageSize })
  return {
    release: (await summaries([release]))[0]!,
    columns: JSON.parse(release.columns) as ExportColumn[],
    params: JSON.parse(release.params) as TableParam[],
    notes: JSON.parse(release.notes) as string[],
    rows: rows.map((r) => JSON.parse(r.cells) as ExportRow),
    total: release.rowCount,
    page: paging.page,
    pageSize: paging.pageSize,
  }
}

/** The frozen release as one table for the writers. */
export async function releaseTable(id: number): Promise<{ table: ExportTable; campaignCode: string; version: number }> {
  const release = await Release.findByPk(id)
  if (!release) throw notFound('The release')
  const campaign = await Campaign.findByPk(release.campaignId, { attributes: ['id', 'code', 'name'] })
  const rows = await ReleaseRow.findAll({ where: { releaseId: id }, order: [['position', 'ASC']] })
  return {
    campaignCode: campaign?.code ?? `campaign-${release.campaignId}`,
    version: release.version,
    table: {
      name: 'catalogue',
      title: release.title,
      description: release.description,
      authors: release.authors,
      date: isoTimestamp(release.createdAt),
      params: JSON.parse(release.params) as TableParam[],
      columns: JSON.parse(release.columns) as ExportColumn[],
      notes: JSON.parse(release.notes) as string[],
      rows: rows.map((r) => JSON.parse(r.cells) as ExportRow),
    },
  }
}

/** File-name-safe text: letters, digits, dot, dash and underscore. */
const safeName = (s: string) => s.replace(/[^A-Za-z0-9._-]+/g, '_').replace(/^_+|_+$/g, '') || 'catalogue'

/** The bytes of a release in one format, with its media type and a file name such as "TF-1_release-2.vot". */
export async function downloadRelease(user: User, id: number, format: ExportFormat): Promise<{ body: Buffer; contentType: string; fileName: string }> {
  await findVisibleRelease(user, id)
  const { table, campaignCode, version } = await releaseTable(id)
  const stem = `${safeName(campaignCode)}_release-${version}`
  const file = writeTable(table, format, stem)
  const suffix = format === 'mrt' ? '_table' : ''
  return { body: file.body, contentType: file.contentType, fileName: `${stem}${suffix}.${file.extension}` }
}
