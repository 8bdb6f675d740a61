import { http } from './http'

// Mirrors /api/releases (server/services/releases.service.ts).

export const DOWNLOAD_FORMATS = [
  { format: 'csv', label: 'CSV', hint: 'Comma-separated, one header line' },
  { format: 'votable', label: 'VOTable', hint: 'IVOA VOTable (XML)' },
  { format: 'fits', label: 'FITS', hint: 'FITS binary table' },
  { format: 'mrt', label: 'Fixed-width + ReadMe', hint: 'Byte-by-byte description, as journals take it' },
] as const

export type DownloadFormat = (typeof DOWNLOAD_FORMATS)[number]['format']

export interface ReleaseSummary {
  id: number
  campaign: { id: number; code: string; name: string }
  /** 1, 2, … within the campaign. */
  version: number
  title: string
  description: string
  rows: number
  createdBy: { id: number; name: string }
  createdAt: string
  /** Id of the release that replaced this one. */
  supersededBy: number | null
  downloads: Record<DownloadFormat, string>
}

export interface ReleaseColumn {
  name: string
  description: string
  /** IVOA VOUnit; '' when dimensionless. */
  unit: string
  ucd: string
  type: string
  nullable: boolean
}

export interface ReleaseParam {
  key: string
  name: string
  value: string | number
  description: string
  unit?: string
}

export type ReleaseCell = string | number | boolean | null
export type ReleaseRow = Record<string, ReleaseCell>

export interface ReleaseDetail {
  release: ReleaseSummary
  columns: ReleaseColumn[]
  params: ReleaseParam[]
  notes: string[]
  rows: ReleaseRow[]
  total: number
}

export interface FreezeInput {
  campaignId: number
  title: string
  description: string
}

/** The server pages rows at most this many at a time. */
const PAGE = 200

export async function listReleases(): Promise<ReleaseSummary[]> {
  return (await http.get<{ releases: ReleaseSummary[] }>('/releases')).releases
}

/** A release with all its rows (fetched page by page; releases are a few thousand rows at most). */
export async function getRelease(id: number): Promise<ReleaseDetail> {
  type Page = ReleaseDetail & { page: number; pageSize: number }
  const first = await http.get<Page>(`/releases/${id}`, { query: { page: 1, pageSize: PAGE } })
  const pages = Math.ceil(first.total / PAGE)
  const rest = await Promise.all(Array.from({ length: Math.max(0, pages - 1) }, (_, i) => http.get<Page>(`/releases/${id}`, { query: { page: i + 2, pageSize: PAGE } })))
  return { release: first.release, columns: first.columns, params: first.params, notes: first.notes, total: first.total, rows: [...first.rows, ...rest.flatMap((p) => p.rows)] }
}

export async function freezeRelease(input: FreezeInput): Promise<ReleaseSummary> {
  return (await http.post<{ release: ReleaseSummary }>('/releases', input)).release
}

/** A plain link the browser follows; the server names the file. */
export const downloadUrl = (release: Pick<ReleaseSummary, 'id'> & { downloads?: Partial<Record<DownloadFormat, string>> }, format: DownloadFormat): string =>
  release.downloads?.[format] ?? `/api/releases/${release.id}/download?format=${format}`
