// The catalogue's column table travels with each release, so the writers and the release page read one description.

/** Storage type of a column. `datetime` values are ISO 8601 UTC strings "YYYY-MM-DDThh:mm:ss.sss". */
export type ColumnType = 'int' | 'double' | 'string' | 'datetime' | 'boolean'

/** Fixed-width display of a double: `F` with `decimals` after the point, or `E` with `decimals` in the mantissa. */
export interface NumberFormat {
  notation: 'F' | 'E'
  /** Total characters, sign included. */
  width: number
  decimals: number
}

export interface ExportColumn {
  /** Label: a letter, then letters, digits and underscores (≤ 16 characters, so FITS and CDS take it as is). */
  name: string
  description: string
  /** IVOA VOUnit; '' when dimensionless. */
  unit: string
  /** IVOA UCD1+. */
  ucd: string
  type: ColumnType
  /** Doubles: display format. */
  format?: NumberFormat
  /** Ints: digits shown (sign included); strings: the least width of the fixed-width column. @default ints 6, strings 1 */
  width?: number
  /** Whether a value may be missing (null). */
  nullable: boolean
}

export type CellValue = number | string | boolean | null
export type ExportRow = Record<string, CellValue>

/** A descriptive keyword of the whole table (VOTable PARAM, FITS header keyword, ECSV meta, ReadMe line). */
export interface TableParam {
  /** ≤ 8 characters, upper case (the FITS keyword); the other writers use it too. */
  key: string
  /** The VOTable PARAM name. */
  name: string
  value: string | number
  description: string
  ucd: string
  unit?: string
}

/** csv: plain, one header line; ecsv: with units; mrt: the fixed-width table and its ReadMe in a zip. */
export type ExportFormat = 'csv' | 'ecsv' | 'votable' | 'fits' | 'mrt'

export interface ReleaseSummary {
  id: number
  campaign: { id: number; code: string; name: string }
  /** 1, 2, … within the campaign. */
  version: number
  title: string
  description: string
  authors: string
  rows: number
  createdBy: { id: number; name: string }
  createdAt: string
  /** Id of the release that replaced this one. */
  supersededBy: number | null
  /** A download link for each format. */
  downloads: Record<ExportFormat, string>
}

/** One page of a release's rows, with its column table. */
export interface ReleaseDetail {
  release: ReleaseSummary
  columns: ExportColumn[]
  params: TableParam[]
  notes: string[]
  rows: ExportRow[]
  total: number
  page: number
  pageSize: number
}

/** What freezing a campaign now would give, shown before a lead confirms. */
export interface ReleasePreview {
  campaign: { id: number; code: string; name: string }
  /** The version number the release would get. */
  version: number
  /** Agreed or settled spectra: the rows. */
  rows: number
  /** Spectra of the campaign still being processed or waiting for calls. */
  waiting: number
  disputed: number
  failed: number
  columns: { name: string; unit: string; description: string }[]
}
