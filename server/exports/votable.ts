import { cellOf, checkColumns, exactNumber, type ExportColumn, type ExportTable, type TableParam } from './table'

// Characters XML 1.0 cannot carry at all (C0 controls other than tab, LF, CR; lone surrogates; U+FFFE/FFFF).
const XML_INVALID = /[\u{0}-\u{8}\u{b}\u{c}\u{e}-\u{1f}\u{d800}-\u{dfff}\u{fffe}\u{ffff}]/gu

/** Text escaped for an XML 1.0 element or attribute value; characters XML cannot carry are dropped. */
export function xmlEscape(text: string): string {
  return text.replace(XML_INVALID, '').replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&apos;')
}

const isAscii = (s: string) => /^[\x20-\x7e]*$/.test(s)

function attrs(pairs: Array<[string, string | number | undefined]>): string {
  return pairs
    .filter(([, v]) => v !== undefined && v !== '')
    .map(([k, v]) => ` ${k}="${xmlEscape(String(v)).replace(/\r\n?|\n/g, '&#10;')}"`)
    .join('')
}

/** VOTable datatype and arraysize of a column; strings holding non-ASCII text are unicodeChar. */
function fieldType(column: ExportColumn, table: ExportTable): { datatype: string; arraysize?: string; xtype?: string } {
  switch (column.type) {
    case 'int':
      return { datatype: 'int' }
    case 'double':
      return { datatype: 'double' }
    case 'boolean':
      return { datatype: 'boolean' }
    case 'datetime':
      return { datatype: 'char', arraysize: '*', xtype: 'timestamp' }
    case 'string': {
      const ascii = table.rows.every((r) => {
        const v = r[column.name]
        return typeof v !== 'string' || isAscii(v)
      })
      return { datatype: ascii ? 'char' : 'unicodeChar', arraysize: '*' }
    }
  }
}

/** The VOTable precision attribute: "F" + decimals for fixed notation, "E" + significant digits for exponential. */
function precisionOf(column: ExportColumn): string | undefined {
  if (!column.format) return undefined
  return column.format.notation === 'F' ? String(column.format.decimals) : `E${column.format.decimals + 1}`
}

function param(p: TableParam): string {
  const isInt = typeof p.value === 'number' && Number.isInteger(p.value)
  const datatype = typeof p.value === 'number' ? (isInt ? 'int' : 'double') : isAscii(p.value) ? 'char' : 'unicodeChar'
  const a = attrs([
    ['name', p.name],
    ['datatype', datatype],
    ['arraysize', typeof p.value === 'string' ? '*' : undefined],
    ['unit', p.unit],
    ['ucd', p.ucd],
    ['value', typeof p.value === 'number' ? exactNumber(p.value) : p.value],
  ])
  return `    <PARAM${a}>\n      <DESCRIPTION>${xmlEscape(p.description)}</DESCRIPTION>\n    </PARAM>`
}

/** Sentinel for missing ints, declared in VALUES null so that readers older than VOTable 1.3 see the gap too. */
export const VOTABLE_INT_NULL = -2147483648

/**
 * Writes the table as an IVOA VOTable 1.4 document (IVOA Recommendation 2019-10-21, namespace
 * http://www.ivoa.net/xml/VOTable/v1.3 as 1.4 keeps it) with one RESOURCE of type "results": the
 * release described by INFO elements and PARAMs, one TABLE whose FIELDs carry name, datatype,
 * arraysize, unit (VOUnits 1.0), ucd (UCD1+), width, precision and a DESCRIPTION, and the rows in
 * TABLEDATA. Missing values are empty TD cells (VOTable 1.3 §6); ints also declare VALUES null.
 * Times are char columns with xtype "timestamp" (DALI 1.1 §3.3.3). UTF-8.
 */
export function writeVotable(table: ExportTable): Buffer {
  checkColumns(table.columns)
  const out: string[] = []
  out.push('<?xml version="1.0" encoding="UTF-8"?>')
  out.push(
    '<VOTABLE version="1.4" xmlns="http://www.ivoa.net/xml/VOTable/v1.3" xmlns:xsi="http://www.w3.org/2001/XMLSchema-instance"' +
      ' xsi:schemaLocation="http://www.ivoa.net/xml/VOTable/v1.3 http://www.ivoa.net/xml/VOTable/votable-1.4.xsd">',
  )
  out.push(`  <DESCRIPTION>${xmlEscape(table.title)}</DESCRIPTION>`)
  out.push(`  <RESOURCE type="results"${attrs([['name', table.name]])}>`)
  out.push(`    <DESCRIPTION>${xmlEscape(table.description)}</DESCRIPTION>`)
  out.push(
    `    <INFO${attrs([
      ['name', 'title'],
      ['value', table.title],
    ])}/>`,
  )
  out.push(
    `    <INFO${attrs([
      ['name', 'date'],
      ['value', table.date],
    ])}/>`,
  )
  table.notes.forEach((n, i) =>
    out.push(
      `    <INFO${attrs([
        ['name', `note${i + 1}`],
        ['value', n],
      ])}/>`,
    ),
  )
  out.push('    <COOSYS ID="icrs" system="ICRS"/>')
  for (const p of table.params) out.push(param(p))
  out.push(
    `    <TABLE${attrs([
      ['name', table.name],
      ['nrows', table.rows.length],
    ])}>`,
  )
  out.push(`      <DESCRIPTION>${xmlEscape(table.title)}</DESCRIPTION>`)
  for (const c of table.columns) {
    const t = fieldType(c, table)
    const a = attrs([
      ['name', c.name],
      ['datatype', t.datatype],
      ['arraysize', t.arraysize],
      ['xtype', t.xtype],
      ['unit', c.unit],
      ['ucd', c.ucd],
      ['width', c.format?.width],
      ['precision', precisionOf(c)],
      ['ref', c.ucd.startsWith('pos.eq.') ? 'icrs' : undefined],
    ])
    const values = c.type === 'int' && c.nullable ? `\n        <VALUES null="${VOTABLE_INT_NULL}"/>` : ''
    out.push(`      <FIELD${a}>\n        <DESCRIPTION>${xmlEscape(c.description)}</DESCRIPTION>${values}\n      </FIELD>`)
  }
  out.push('      <DATA>')
  out.push('        <TABLEDATA>')
  for (const row of table.rows) {
    const cells = table.columns.map((c) => {
      const v = cellOf(c, row)
      if (v === null) return '<TD/>'
      if (typeof v === 'boolean') return `<TD>${v ? 'T' : 'F'}</TD>`
      if (typeof v === 'number') return `<TD>${exactNumber(v)}</TD>`
      return `<TD>${xmlEscape(v)}</TD>`
    })
    out.push(`          <TR>${cells.join('')}</TR>`)
  }
  out.push('        </TABLEDATA>')
  out.push('      </DATA>')
  out.push('    </TABLE>')
  out.push('  </RESOURCE>')
  out.push('</VOTABLE>')
  return Buffer.from(out.join('\n') + '\n', 'utf8')
}
