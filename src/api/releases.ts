import type { CellValue, ExportColumn, ExportFormat, ExportRow, ReleaseDetail as ReleasePage, ReleasePreview, ReleaseSummary, TableParam } from '@shared/api/releases'
import { http } from './http'

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
export type ReleaseParam = TableParam
export type ReleaseCell = CellValue
export type ReleaseRow = ExportRow

/** A release with all its rows. */
export type ReleaseDetail = Omit<ReleasePage, 'page' | 'pageSize'>

export interface FreezeInput {
  campaignId: number
  title: string
  description: string
  authors?: string
  /** Name who decided each row (off for privacy). */
  includeDecider?: boolean
}

/** What freezing the campaign now would give. */
export const previewRelease = async (campaignId: number, includeDecider: boolean): Promise<ReleasePreview> =>
  (await http.get<{ preview: ReleasePreview }>('/releases/preview', { query: { campaign: campaignId, includeDecider: String(includeDecider) } })).preview

/** The server pages rows at most this many at a time. */
const PAGE = 200

export async function listReleases(): Promise<ReleaseSummary[]> {
  return (await http.get<{ releases: ReleaseSummary[] }>('/releases')).releases
}

/** A release with all its rows (fetched page by page; releases are a few thousand rows at most). */
export async function getRelease(id: number): Promise<ReleaseDetail> {
  const first = await http.get<ReleasePage>(`/releases/${id}`, { query: { page: 1, pageSize: PAGE } })
  const pages = Math.ceil(first.total / PAGE)
  const rest = await Promise.all(Array.from({ length: Math.max(0, pages - 1) }, (_, i) => http.get<ReleasePage>(`/releases/${id}`, { query: { page: i + 2, pageSize: PAGE } })))
  return { release: first.release, columns: first.columns, params: first.params, notes: first.notes, total: first.total, rows: [...first.rows, ...rest.flatMap((p) => p.rows)] }
}

export async function freezeRelease(input: FreezeInput): Promise<ReleaseSummary> {
  return (await http.post<{ release: ReleaseSummary }>('/releases', input)).release
}

/** A plain link the browser follows; the server names the file. */
export const downloadUrl = (release: Pick<ReleaseSummary, 'id'> & { downloads?: Partial<Record<DownloadFormat, string>> }, format: DownloadFormat): string =>
  release.downloads?.[format] ?? `/api/releases/${release.id}/download?format=${format}`
