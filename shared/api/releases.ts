// The catalogue's column table travels with each release, so the writers and the release page read one description.
import { z } from 'zod'
import { CampaignRef, PersonRef, idParams, multiLine, numeric, paging, singleLine } from './common'
import { binaryBody, endpoint } from './endpoint'

/** Storage type of a column. `datetime` values are ISO 8601 UTC strings "YYYY-MM-DDThh:mm:ss.sss". */
export const ColumnType = z.enum(['int', 'double', 'string', 'datetime', 'boolean'])
export type ColumnType = z.infer<typeof ColumnType>

/** Fixed-width display of a double: `F` with `decimals` after the point, or `E` with `decimals` in the mantissa. */
export const NumberFormat = z.object({
  notation: z.enum(['F', 'E']),
  /** Total characters, sign included. */
  width: z.number().int(),
  decimals: z.number().int(),
})
export type NumberFormat = z.infer<typeof NumberFormat>

export const ExportColumn = z
  .object({
    /** Label: a letter, then letters, digits and underscores (≤ 16 characters, so FITS and CDS take it as is). */
    name: z.string(),
    description: z.string(),
    /** IVOA VOUnit; '' when dimensionless. */
    unit: z.string(),
    /** IVOA UCD1+. */
    ucd: z.string(),
    type: ColumnType,
    /** Doubles: display format. */
    format: NumberFormat.optional(),
    /** Ints: digits shown (sign included); strings: the least width of the fixed-width column. @default ints 6, strings 1 */
    width: z.number().int().optional(),
    /** Whether a value may be missing (null). */
    nullable: z.boolean(),
  })
  .meta({ id: 'ExportColumn' })
export type ExportColumn = z.infer<typeof ExportColumn>

export const CellValue = z.union([z.number(), z.string(), z.boolean(), z.null()])
export type CellValue = z.infer<typeof CellValue>
export const ExportRow = z.record(z.string(), CellValue)
export type ExportRow = z.infer<typeof ExportRow>

/** A descriptive keyword of the whole table (VOTable PARAM, FITS header keyword, ECSV meta, ReadMe line). */
export const TableParam = z.object({
  /** ≤ 8 characters, upper case (the FITS keyword); the other writers use it too. */
  key: z.string(),
  /** The VOTable PARAM name. */
  name: z.string(),
  value: z.union([z.string(), z.number()]),
  description: z.string(),
  ucd: z.string(),
  unit: z.string().optional(),
})
export type TableParam = z.infer<typeof TableParam>

/** csv: plain, one header line; ecsv: with units; mrt: the fixed-width table and its ReadMe in a zip. */
export const EXPORT_FORMATS = ['csv', 'ecsv', 'votable', 'fits', 'mrt'] as const
export type ExportFormat = (typeof EXPORT_FORMATS)[number]

export const ReleaseSummary = z
  .object({
    id: z.number().int(),
    campaign: CampaignRef,
    /** 1, 2, … within the campaign. */
    version: z.number().int(),
    title: z.string(),
    description: z.string(),
    authors: z.string(),
    rows: z.number().int(),
    createdBy: PersonRef,
    createdAt: z.string(),
    /** Id of the release that replaced this one. */
    supersededBy: z.number().int().nullable(),
    /** A download link for each format. */
    downloads: z.record(z.enum(EXPORT_FORMATS), z.string()),
  })
  .meta({ id: 'ReleaseSummary' })
export type ReleaseSummary = z.infer<typeof ReleaseSummary>

/** One page of a release's rows, with its column table. */
export const ReleaseDetail = z
  .object({
    release: ReleaseSummary,
    columns: z.array(ExportColumn),
    params: z.array(TableParam),
    notes: z.array(z.string()),
    rows: z.array(ExportRow),
    total: z.number().int(),
    page: z.number().int(),
    pageSize: z.number().int(),
  })
  .meta({ id: 'ReleaseDetail' })
export type ReleaseDetail = z.infer<typeof ReleaseDetail>

/** What freezing a campaign now would give, shown before a lead confirms. */
export const ReleasePreview = z
  .object({
    campaign: CampaignRef,
    /** The version number the release would get. */
    version: z.number().int(),
    /** Agreed or settled spectra: the rows. */
    rows: z.number().int(),
    /** Spectra of the campaign still being processed or waiting for calls. */
    waiting: z.number().int(),
    disputed: z.number().int(),
    failed: z.number().int(),
    columns: z.array(z.object({ name: z.string(), unit: z.string(), description: z.string() })),
  })
  .meta({ id: 'ReleasePreview' })
export type ReleasePreview = z.infer<typeof ReleasePreview>

const title = singleLine(200).pipe(z.string().min(1, 'is required'))
const description = multiLine(5000).default('')
const authors = z.string().trim().max(500, 'must be at most 500 characters').default('')
/** Name who decided each row (off for privacy). */
const includeDecider = z.boolean().default(true)

export const FreezeInput = z.object({
  campaignId: numeric(z.number({ message: 'choose a campaign' }).int().positive({ message: 'choose a campaign' })),
  title,
  description,
  authors,
  includeDecider,
})
export type FreezeInput = z.infer<typeof FreezeInput>
/** A freeze as the screens and the service take it: authors and the decider column may be left to their defaults. */
export type ReleaseInput = Pick<FreezeInput, 'campaignId' | 'title' | 'description'> & Partial<Pick<FreezeInput, 'authors' | 'includeDecider'>>

export const SupersedeInput = z.object({ title, description, authors, includeDecider })
export type SupersedeInput = z.infer<typeof SupersedeInput>

export const PreviewQuery = z.object({
  campaign: z.coerce.number({ message: 'choose a campaign' }).int().positive({ message: 'choose a campaign' }),
  includeDecider: z
    .enum(['true', 'false'])
    .default('true')
    .transform((v) => v === 'true'),
})

const releaseReply = z.object({ release: ReleaseSummary })

export const releasesApi = {
  list: endpoint({
    method: 'get',
    path: '/releases',
    tag: 'Releases',
    summary: 'Frozen catalogue releases the caller may see',
    query: z.object({ campaign: z.preprocess((v) => (v === '' ? undefined : v), z.coerce.number().int().positive().optional()) }),
    response: z.object({ releases: z.array(ReleaseSummary) }),
  }),
  freeze: endpoint({ method: 'post', path: '/releases', tag: 'Releases', summary: "Freeze a campaign's decided rows as a release", body: FreezeInput, status: 201, response: releaseReply }),
  preview: endpoint({
    method: 'get',
    path: '/releases/preview',
    tag: 'Releases',
    summary: 'What freezing the campaign now would give',
    query: PreviewQuery,
    response: z.object({ preview: ReleasePreview }),
  }),
  get: endpoint({
    method: 'get',
    path: '/releases/:id',
    tag: 'Releases',
    summary: "A page of a release's rows with its column table",
    params: idParams,
    query: z.object(paging),
    response: ReleaseDetail,
  }),
  supersede: endpoint({
    method: 'post',
    path: '/releases/:id/supersede',
    tag: 'Releases',
    summary: 'Freeze a new version that replaces this release',
    params: idParams,
    body: SupersedeInput,
    status: 201,
    response: releaseReply,
  }),
  download: endpoint({
    method: 'get',
    path: '/releases/:id/download',
    tag: 'Releases',
    summary: 'The release as a file',
    params: idParams,
    query: z.object({ format: z.enum(EXPORT_FORMATS, { message: `must be one of ${EXPORT_FORMATS.join(', ')}` }) }),
    response: binaryBody('application/octet-stream', 'CSV, ECSV, VOTable, FITS, or the fixed-width table with its ReadMe in a zip.'),
  }),
}
