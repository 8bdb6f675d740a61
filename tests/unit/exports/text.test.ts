import { describe, expect, it } from 'vitest'
import { neutraliseFormula, prepareForExport, transliterate, type ExportTable } from '../../../server/exports'

describe('neutraliseFormula', () => {
  // The characters and the quote prefix: OWASP, "CSV Injection" (common practice).
  it('puts a quote before text a spreadsheet would run as a formula', () => {
    for (const text of ['=HYPERLINK("http://x.example","click")', '+1+1', '-2+3', '@SUM(A1)', '\t=1', '\r=1']) expect(neutraliseFormula(text)).toBe(`'${text}`)
  })
  it('leaves other text alone', () => {
    for (const text of ['HD 1', 'BD+12 345', '', "'quoted", 'a=b']) expect(neutraliseFormula(text)).toBe(text)
  })
})

describe('transliterate', () => {
  // Bayer-letter abbreviations as star catalogues write them (from memory: BSC / CDS usage).
  it('writes Greek letters as catalogue abbreviations', () => {
    expect(transliterate('ζ Oph')).toBe('zet Oph')
    expect(transliterate('α1 Cen')).toBe('alf1 Cen')
    expect(transliterate('μ Cep')).toBe('mu. Cep')
    expect(transliterate('Ω')).toBe('Ome')
  })
  it('drops accents and spells letters that have none in Latin', () => {
    expect(transliterate('Zoë Ødegaard')).toBe('Zoe Odegaard')
    expect(transliterate('Renée Łukasz Straße')).toBe('Renee Lukasz Strasse')
  })
  it('leaves only printable ASCII', () => {
    expect(transliterate('a\u0000b 星')).toBe('a?b ?')
  })
})

describe('prepareForExport', () => {
  const table: ExportTable = {
    name: 'catalogue',
    title: 't',
    description: '',
    date: '2026-01-01T00:00:00',
    params: [],
    notes: ['first'],
    columns: [
      { name: 'Object', description: 'name', unit: '', ucd: 'meta.id', type: 'string', nullable: true },
      { name: 'Vmag', description: 'V', unit: 'mag', ucd: 'phot.mag', type: 'double', format: { notation: 'F', width: 6, decimals: 2 }, nullable: true },
    ],
    rows: [
      { Object: '=HYPERLINK("x")', Vmag: -1.5 },
      { Object: 'ζ Oph', Vmag: 2.5 },
    ],
  }
  it('neutralises text cells in text formats, not numbers, and says so', () => {
    for (const format of ['csv', 'votable', 'mrt'] as const) {
      const out = prepareForExport(table, format)
      expect(out.rows[0]).toEqual({ Object: '\'=HYPERLINK("x")', Vmag: -1.5 })
      expect(out.notes.some((n) => n.includes("leading '"))).toBe(true)
    }
    expect(prepareForExport(table, 'fits').rows[0]!.Object).toBe('=HYPERLINK("x")')
  })
  it('notes the transliteration in the ASCII formats only', () => {
    expect(prepareForExport(table, 'fits').notes.some((n) => n.includes('transliterated'))).toBe(true)
    expect(prepareForExport(table, 'mrt').notes.some((n) => n.includes('transliterated'))).toBe(true)
    expect(prepareForExport(table, 'csv').notes.some((n) => n.includes('transliterated'))).toBe(false)
    expect(table.notes).toEqual(['first'])
  })
})
