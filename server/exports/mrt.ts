import { cellOf, checkColumns, formatDouble, toAscii, type ExportColumn, type ExportTable } from './table'

const RULE = '-'.repeat(80)
const DOUBLE_RULE = '='.repeat(80)

/** VOUnit → CDS unit ("Standards for Astronomical Catalogues" 2.0, §3.2): solar units and the no-unit mark differ. */
const CDS_UNIT: Record<string, string> = { '': '---', solRad: 'Rsun', solLum: 'Lsun', solMass: 'Msun' }
export const cdsUnit = (voUnit: string) => CDS_UNIT[voUnit] ?? voUnit

interface FixedColumn {
  column: ExportColumn
  format: string
  width: number
  start: number
  text(row: ExportTable['rows'][number]): string
}

function layout(table: ExportTable): FixedColumn[] {
  let start = 1
  return table.columns.map((column) => {
    const cells = table.rows.map((r) => cellOf(column, r))
    let width: number
    let format: string
    let text: (v: ReturnType<typeof cellOf>) => string
    switch (column.type) {
      case 'int':
        width = Math.max(column.width ?? 6, ...cells.map((v) => (v === null ? 0 : String(v).length)))
        format = `I${width}`
        text = (v) => (v === null ? '' : String(v))
        break
      case 'double': {
        const f = column.format!
        text = (v) => (v === null ? '' : formatDouble(v as number, f))
        width = Math.max(f.width, ...cells.map((v) => text(v).length))
        format = `${f.notation}${width}.${f.decimals}`
        break
      }
      case 'boolean':
        width = 1
        format = 'A1'
        text = (v) => (v === null ? '' : v ? 'T' : 'F')
        break
      case 'datetime':
      case 'string':
        text = (v) => (v === null ? '' : toAscii(String(v)).trim())
        width = Math.max(column.type === 'datetime' ? 23 : (column.width ?? 1), ...cells.map((v) => text(v).length))
        format = `A${width}`
        break
    }
    const fixed: FixedColumn = {
      column,
      format,
      width,
      start,
      text: (row) => {
        const t = text(cellOf(column, row))
        // Numbers right-justified, text left-justified, as in CDS tables.
        return column.type === 'string' || column.type === 'datetime' || column.type === 'boolean' ? t.padEnd(width) : t.padStart(width)
      },
    }
    start += width + 1
    return fixed
  })
}

function bytesText(c: FixedColumn): string {
  const end = c.start + c.width - 1
  return c.width === 1 ? String(end).padStart(8) : `${String(c.start).padStart(4)}-${String(end).padStart(3)}`
}

function wrap(text: string, indent: string, width = 80): string[] {
  const words = toAscii(text).split(/\s+/).filter(Boolean)
  const lines: string[] = []
  let line = ''
  for (const w of words) {
    if (line && indent.length + line.length + 1 + w.length > width) {
      lines.push(indent + line)
      line = w
    } else line = line ? `${line} ${w}` : w
  }
  if (line) lines.push(indent + line)
  return lines
}

function byteByByte(table: ExportTable, columns: FixedColumn[], dataName: string): string[] {
  const labelWidth = Math.max(5, ...columns.map((c) => c.column.name.length))
  const formatWidth = Math.max(6, ...columns.map((c) => c.format.length))
  const unitWidth = Math.max(5, ...columns.map((c) => cdsUnit(c.column.unit).length))
  const out = [`Byte-by-byte Description of file: ${dataName}`, RULE]
  out.push(`   Bytes ${'Format'.padEnd(formatWidth)} ${'Units'.padEnd(unitWidth)} ${'Label'.padEnd(labelWidth)} Explanations`)
  out.push(RULE)
  for (const c of columns) {
    const explanation = `${c.column.nullable ? '? ' : ''}${toAscii(c.column.description)}`
    out.push(`${bytesText(c)} ${c.format.padEnd(formatWidth)} ${cdsUnit(c.column.unit).padEnd(unitWidth)} ${c.column.name.padEnd(labelWidth)} ${explanation}`)
  }
  out.push(RULE)
  table.notes.forEach((n, i) => out.push(...wrap(n, '', 80).map((l, k) => (k === 0 ? `Note (${i + 1}): ${l}` : `    ${l}`))))
  if (table.notes.length) out.push(RULE)
  return out
}

export interface FixedWidthOutput {
  /** The data file name the description refers to. */
  dataName: string
  /** The CDS-style ReadMe: title, description, file summary, byte-by-byte description, release keywords. */
  readme: Buffer
  /** The fixed-width data, one record per line, every line the full record length. */
  data: Buffer
  /** The description and the data in one file, as the AAS journals' machine-readable tables (MRT) are. */
  combined: Buffer
  recordLength: number
}

/**
 * Writes the table as fixed-width ASCII text with a byte-by-byte description in the form of the
 * CDS "Standards for Astronomical Catalogues" 2.0 (Ochsenbein et al.; the ReadMe of VizieR) and
 * the AAS machine-readable table: for each column its bytes, Fortran-style format (Iw, Fw.d, Ew.d,
 * Aw), CDS unit ('---' for none), label and explanation; '?' at the start of an explanation marks
 * a column whose blank fields are missing values. Columns are separated by one blank; numbers are
 * right-justified and text left-justified. Text is reduced to ASCII.
 */
export function writeFixedWidth(table: ExportTable, dataName = `${table.name}.dat`): FixedWidthOutput {
  checkColumns(table.columns)
  const columns = layout(table)
  const recordLength = columns.length ? columns[columns.length - 1]!.start + columns[columns.length - 1]!.width - 1 : 0
  const records = table.rows.map((row) => columns.map((c) => c.text(row)).join(' '))
  const data = records.map((r) => r + '\n').join('')
  const description = byteByByte(table, columns, dataName)
  const keywords = table.params.map((p) => `    ${p.name}: ${toAscii(String(p.value))}${p.unit ? ` ${p.unit}` : ''}`)

  const readme = [
    `${table.name.padEnd(20)} ${toAscii(table.title)}`.slice(0, 80).trimEnd(),
    DOUBLE_RULE,
    ...wrap(table.title, ''),
    ...(table.authors ? wrap(table.authors, '    ') : []),
    `    Lineweight catalogue release, frozen ${table.date} UTC`,
    DOUBLE_RULE,
    'Description:',
    ...wrap(table.description || table.title, '    '),
    '',
    'Release keywords:',
    ...keywords,
    '',
    'File Summary:',
    RULE,
    ` ${'FileName'.padEnd(20)} Lrecl  Records  Explanations`,
    RULE,
    ` ${'ReadMe'.padEnd(20)} ${'80'.padStart(5)} ${'.'.padStart(8)}  This file`,
    ` ${dataName.padEnd(20)} ${String(recordLength).padStart(5)} ${String(records.length).padStart(8)}  ${toAscii(table.title)}`,
    RULE,
    '',
    ...description,
    '',
    DOUBLE_RULE,
    `(End)${'Lineweight'.padStart(40)}${table.date.slice(0, 10).padStart(35)}`,
    '',
  ].join('\n')

  const combined = [
    `Title: ${toAscii(table.title)}`,
    `Authors: ${toAscii(table.authors || 'Lineweight catalogue release')}`,
    `Table: ${toAscii(table.description || table.title)}`.slice(0, 400),
    ...keywords.map((k) => k.replace(/^ {4}/, 'Keyword: ')),
    DOUBLE_RULE,
    // The description ends with a rule; the data start after the last rule of the file.
    ...description,
    data,
  ].join('\n')

  return { dataName, readme: Buffer.from(readme, 'ascii'), data: Buffer.from(data, 'ascii'), combined: Buffer.from(combined, 'ascii'), recordLength }
}
