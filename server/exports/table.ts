/**
 * The typed column table that every catalogue writer reads: one description of each column
 * (name, unit, UCD, type, display format) drives CSV, VOTable, FITS and the fixed-width table,
 * so the four files of one release always say the same thing about the same values.
 *
 * Units are IVOA VOUnits 1.0 strings ('' for a dimensionless quantity); UCDs are IVOA UCD1+
 * words (UCD1+ controlled vocabulary 1.4), checked by tests/reference/check_exports.py.
 */

import { transliterate } from './text'
import type { CellValue, ColumnType, ExportColumn, ExportRow, NumberFormat, TableParam } from '../../shared/api/releases'

export type { CellValue, ColumnType, ExportColumn, ExportRow, NumberFormat, TableParam }

export interface ExportTable {
  /** A short machine name, e.g. "catalogue". */
  name: string
  title: string
  description: string
  /** Who to cite for the release, as the lead gave it ('' when not given). */
  authors?: string
  /** ISO 8601 UTC time the table was frozen; writers use it instead of the clock, so bytes repeat. */
  date: string
  params: TableParam[]
  columns: ExportColumn[]
  rows: ExportRow[]
  /** Free-text notes (the caution about derived values, the decision rules). */
  notes: string[]
}

const LABEL = /^[A-Za-z][A-Za-z0-9_]{0,15}$/

/** Throws on a column table the writers cannot represent: bad labels, duplicates, doubles without a format. */
export function checkColumns(columns: readonly ExportColumn[]): void {
  const seen = new Set<string>()
  for (const c of columns) {
    if (!LABEL.test(c.name)) throw new RangeError(`column label "${c.name}" is not a letter followed by ≤ 15 letters, digits or underscores`)
    if (seen.has(c.name.toLowerCase())) throw new RangeError(`column label "${c.name}" is used twice`)
    seen.add(c.name.toLowerCase())
    if (c.type === 'double' && !c.format) throw new RangeError(`column "${c.name}" is a double without a display format`)
  }
}

/** A cell as the column's type expects it, or null; throws on a value of the wrong type. */
export function cellOf(column: ExportColumn, row: ExportRow): CellValue {
  const v = row[column.name]
  if (v === null || v === undefined) return null
  switch (column.type) {
    case 'int':
      if (typeof v !== 'number' || !Number.isInteger(v)) throw new TypeError(`column ${column.name}: ${String(v)} is not an integer`)
      return v
    case 'double':
      if (typeof v !== 'number') throw new TypeError(`column ${column.name}: ${String(v)} is not a number`)
      return Number.isFinite(v) ? v : null
    case 'boolean':
      if (typeof v !== 'boolean') throw new TypeError(`column ${column.name}: ${String(v)} is not a boolean`)
      return v
    case 'string':
      if (typeof v !== 'string') throw new TypeError(`column ${column.name}: ${String(v)} is not a string`)
      return v
    case 'datetime':
      if (typeof v !== 'string' || !/^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d(\.\d{1,3})?$/.test(v)) throw new TypeError(`column ${column.name}: ${String(v)} is not an ISO 8601 UTC time`)
      return v
  }
}

/** ISO 8601 UTC without the zone letter, to the millisecond (the DALI/VOTable timestamp and FITS DATE form). */
export function isoTimestamp(date: Date): string {
  return date.toISOString().replace(/Z$/, '')
}

/** Text a 7-bit ASCII format can carry (FITS headers and character columns, the CDS table): see {@link transliterate}. */
export function toAscii(text: string): string {
  return transliterate(text)
}

/** Fixed-width text of a double in its column format (Fortran Fw.d / Ew.d, as CDS and FITS TDISP read them). */
export function formatDouble(value: number, format: NumberFormat): string {
  if (format.notation === 'F') return value.toFixed(format.decimals)
  // JavaScript writes 1.234e+5; Fortran readers want 1.234E+05.
  const [mantissa, exponent] = value.toExponential(format.decimals).split('e') as [string, string]
  const sign = exponent.startsWith('-') ? '-' : '+'
  const digits = exponent.replace(/^[+-]/, '').padStart(2, '0')
  return `${mantissa}E${sign}${digits}`
}

/** Shortest text that reads back as the same double (for CSV and VOTable cells). */
export function exactNumber(value: number): string {
  return String(value)
}
