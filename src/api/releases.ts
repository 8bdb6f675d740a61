import { releasesApi, type ExportColumn, type ExportFormat, type ExportRow, type ReleaseInput, type ReleaseDetail as ReleasePage, type ReleasePreview, type ReleaseSummary } from '@shared/api/releases'
import { call } from './http'

export type { ReleasePreview, ReleaseSummary }

export const DOWNLOAD_FORMATS = [
  { format: 'csv', label: 'CSV', hint: 'Plain comma-separated values: one header line, numbers at their precision' },
  { format: 'ecsv', label: 'ECSV', hint: 'CSV with a header of units, types and descriptions (astropy, TOPCAT)' },
  { format: 'votable', label: 'VOTable', hint: 'IVOA VOTable (XML)' },
  { format: 'fits', label: 'FITS', hint: 'FITS binary table' },
  { format: 'mrt', label: 'Fixed-width + ReadMe (zip)', hint: 'The data file and its byte-by-byte ReadMe, as journals and data centres take them' },
] as const satisfies readonly { format: ExportFormat; label: string; hint: string }[]

export type DownloadFormat = ExportFormat

export type ReleaseColumn = ExportColumn
export type ReleaseRow = ExportRow

/** A release with all its rows. */
export type ReleaseDetail = Omit<ReleasePage, 'page' | 'pageSize'>

/** Authors and the decider column (off for privacy) may be left to their defaults. */
export type FreezeInput = ReleaseInput

/** What freezing the campaign now would give. */
export const previewRelease = async (campaignId: number, includeDecider: boolean): Promise<ReleasePreview> =>
  (await call(releasesApi.preview, { query: { campaign: campaignId, includeDecider: includeDecider ? 'true' : 'false' } })).preview

/** The server pages rows at most this many at a time. */
const PAGE = 200

export async function listReleases(): Promise<ReleaseSummary[]> {
  return (await call(releasesApi.list)).releases
}

/** A release with all its rows (fetched page by page; releases are a few thousand rows at most). */
export async function getRelease(id: number): Promise<ReleaseDetail> {
  const page = (n: number): Promise<ReleasePage> => call(releasesApi.get, { params: { id }, query: { page: n, pageSize: PAGE } })
  const first = await page(1)
  const pages = Math.ceil(first.total / PAGE)
  const rest = await Promise.all(Array.from({ length: Math.max(0, pages - 1) }, (_, i) => page(i + 2)))
  return { release: first.release, columns: first.columns, params: first.params, notes: first.notes, total: first.total, rows: [...first.rows, ...rest.flatMap((p) => p.rows)] }
}

export async function freezeRelease(input: FreezeInput): Promise<ReleaseSummary> {
  return (await call(releasesApi.freeze, { body: input })).release
}

/** A plain link the browser follows; the server names the file. */
export const downloadUrl = (release: Pick<ReleaseSummary, 'id'> & { downloads?: Partial<Record<DownloadFormat, string>> }, format: DownloadFormat): string =>
  release.downloads?.[format] ?? `/api/releases/${release.id}/download?format=${format}`
