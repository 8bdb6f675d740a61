import { cellOf, checkColumns, exactNumber, type ExportColumn, type ExportTable } from './table'

const ECSV_TYPE: Record<ExportColumn['type'], string> = { int: 'int32', double: 'float64', string: 'string', datetime: 'string', boolean: 'bool' }

/** A YAML flow scalar: JSON strings are valid YAML 1.1/1.2 double-quoted scalars. */
const y = (v: string | number) => JSON.stringify(v)

/** One CSV field per RFC 4180: quoted when it holds a comma, a quote, CR or LF (or would be read as a comment or trimmed). */
export function csvField(text: string): string {
  return /[",\r\n]|^[\s#]|\s$/.test(text) ? `"${text.replace(/"/g, '""')}"` : text
}

/**
 * Writes the table as CSV (RFC 4180: comma-separated, CRLF line ends, fields with commas, quotes or
 * line breaks in double quotes, quotes doubled; one header row of column labels), preceded by a
 * block of '#' comment lines that is an ECSV 1.0 header (the Enhanced Character-Separated Values
 * format of astropy APE 6: a YAML description of every column's type, unit, UCD and description,
 * and of the release). Readers that take '#' comments (astropy, pandas `comment='#'`, TOPCAT's ECSV
 * handler) get the units; others can drop every line that starts with '#'.
 * Missing values are empty fields; booleans are True/False; times are ISO 8601 UTC strings.
 */
export function writeCsv(table: ExportTable): Buffer {
  checkColumns(table.columns)
  const out: string[] = ['# %ECSV 1.0', '# ---', '# delimiter: \',\'', '# datatype:']
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
