import { cellOf, checkColumns, exactNumber, type ExportColumn, type ExportTable, type NumberFormat } from './table'

const ECSV_TYPE: Record<ExportColumn['type'], string> = { int: 'int32', double: 'float64', string: 'string', datetime: 'string', boolean: 'bool' }

/** A YAML flow scalar: JSON strings are valid YAML 1.1/1.2 double-quoted scalars. */
const y = (v: string | number) => JSON.stringify(v)

/** One CSV field per RFC 4180: quoted when it holds a comma, a quote, CR or LF (or would be read as a comment or trimmed). */
export function csvField(text: string): string {
  return /[",\r\n]|^[\s#]|\s$/.test(text) ? `"${text.replace(/"/g, '""')}"` : text
}

/** A double at its column's display precision, as short as it reads: 12.30 → "12.3", 3.890E+02 → "389". */
export function csvNumber(value: number, format: NumberFormat | undefined): string {
  if (!format) return exactNumber(value)
  const rounded = format.notation === 'F' ? Number(value.toFixed(format.decimals)) : Number(value.toPrecision(format.decimals + 1))
  return exactNumber(Object.is(rounded, -0) ? 0 : rounded)
}

/**
 * Writes the table as plain CSV (RFC 4180: comma-separated, CRLF line ends, fields with commas,
 * quotes or line breaks in double quotes, quotes doubled): exactly one header line of column labels,
 * then the rows, numbers at their column's display precision. Units and descriptions are not in
 * this file; the ECSV download ({@link writeEcsv}) carries them.
 * Missing values are empty fields; booleans are True/False; times are ISO 8601 UTC strings.
 */
export function writeCsv(table: ExportTable): Buffer {
  checkColumns(table.columns)
  const out: string[] = [table.columns.map((c) => csvField(c.name)).join(',')]
  for (const row of table.rows) {
    out.push(
      table.columns
        .map((c) => {
          const v = cellOf(c, row)
          if (v === null) return ''
          if (typeof v === 'boolean') return v ? 'True' : 'False'
          if (typeof v === 'number') return c.type === 'double' ? csvNumber(v, c.format) : exactNumber(v)
          return csvField(v)
        })
        .join(','),
    )
  }
  return Buffer.from(out.join('\r\n') + '\r\n', 'utf8')
}

/**
 * Writes the table as ECSV 1.0 (the Enhanced Character-Separated Values format of astropy APE 6):
 * a block of '#' lines holding a YAML description of every column's type, unit, UCD and
 * description and of the release, then the same RFC 4180 CSV with one header row. Readers that
 * take '#' comments (astropy, pandas `comment='#'`, TOPCAT's ECSV handler) get the units.
 * Numbers are written exactly, so the values read back bit for bit.
 */
export function writeEcsv(table: ExportTable): Buffer {
  checkColumns(table.columns)
  const out: string[] = ['# %ECSV 1.0', '# ---', "# delimiter: ','", '# datatype:']
  for (const c of table.columns) {
    const parts = [`name: ${y(c.name)}`]
    if (c.unit) parts.push(`unit: ${y(c.unit)}`)
    parts.push(`datatype: ${ECSV_TYPE[c.type]}`)
    parts.push(`description: ${y(c.description)}`)
    parts.push(`meta: {ucd: ${y(c.ucd)}${c.type === 'datetime' ? ', xtype: "timestamp"' : ''}}`)
    out.push(`# - {${parts.join(', ')}}`)
  }
  out.push('# meta:')
  out.push(`#   name: ${y(table.name)}`)
  out.push(`#   title: ${y(table.title)}`)
  out.push(`#   description: ${y(table.description)}`)
  out.push(`#   date: ${y(table.date)}`)
  if (table.authors) out.push(`#   authors: ${y(table.authors)}`)
  for (const p of table.params) out.push(`#   ${p.name}: ${y(p.value)}`)
  if (table.notes.length) {
    out.push('#   notes:')
    for (const n of table.notes) out.push(`#   - ${y(n)}`)
  }
  out.push('# schema: astropy-2.0')
  out.push(table.columns.map((c) => csvField(c.name)).join(','))
  for (const row of table.rows) {
    out.push(
      table.columns
        .map((c) => {
          const v = cellOf(c, row)
          if (v === null) return ''
          if (typeof v === 'boolean') return v ? 'True' : 'False'
          if (typeof v === 'number') return exactNumber(v)
          return csvField(v)
        })
        .join(','),
    )
  }
  return Buffer.from(out.join('\r\n') + '\r\n', 'utf8')
}
