import { describe, expect, it } from 'vitest'
import {
  cdsUnit,
  commentCards,
  csvNumber,
  FITS_BLOCK,
  FITS_INT_NULL,
  formatDouble,
  headerCards,
  toAscii,
  writeCsv,
  writeEcsv,
  writeFits,
  writeFixedWidth,
  writeVotable,
  xmlEscape,
  type ExportTable,
} from '../../../server/exports'
import { sampleCatalogue, sampleTypes } from './samples'

/** A minimal RFC 4180 reader for the round trips (quoted fields, doubled quotes, CRLF). */
function parseCsv(text: string): string[][] {
  const rows: string[][] = []
  let row: string[] = []
  let field = ''
  let quoted = false
  for (let i = 0; i < text.length; i++) {
    const ch = text[i]!
    if (quoted) {
      if (ch === '"' && text[i + 1] === '"') {
        field += '"'
        i++
      } else if (ch === '"') quoted = false
      else field += ch
    } else if (ch === '"') quoted = true
    else if (ch === ',') {
      row.push(field)
      field = ''
    } else if (ch === '\r' && text[i + 1] === '\n') {
      row.push(field)
      rows.push(row)
      row = []
      field = ''
      i++
    } else field += ch
  }
  return rows
}

/** Header cards of the HDU starting at `offset`, and where its data start. */
function readHeader(buf: Buffer, offset: number): { cards: string[]; values: Map<string, string>; dataStart: number } {
  const cards: string[] = []
  const values = new Map<string, string>()
  let at = offset
  for (;;) {
    const card = buf.toString('ascii', at, at + 80)
    at += 80
    cards.push(card)
    if (card.startsWith('END     ')) break
    if (card[8] === '=') {
      const raw = card.slice(10)
      const m = raw.startsWith("'") ? /^'((?:[^']|'')*)'/.exec(raw) : /^\s*([^/]*)/.exec(raw)
      values.set(card.slice(0, 8).trim(), raw.startsWith("'") ? m![1]!.replace(/''/g, "'").trimEnd() : m![1]!.trim())
    }
  }
  return { cards, values, dataStart: Math.ceil(at / FITS_BLOCK) * FITS_BLOCK }
}

describe('headerCards', () => {
  it('writes fixed-format cards: keyword in 1–8, "= " in 9–10, strings from column 11, numbers right-justified to column 30', () => {
    const [s] = headerCards('EXTNAME', 'CAT', 'table name')
    expect(s).toHaveLength(80)
    expect(s!.slice(0, 10)).toBe('EXTNAME = ')
    expect(s!.slice(10, 20)).toBe("'CAT     '") // padded to 8 characters inside the quotes
    expect(s!.slice(20)).toBe(' / table name'.padEnd(60))
    const [n] = headerCards('NAXIS2', 1234)
    expect(n!.slice(10, 30)).toBe('1234'.padStart(20))
    expect(headerCards('SIMPLE', true)[0]!.slice(29, 30)).toBe('T')
    expect(headerCards('SCALE', { real: 2 })[0]!.slice(10, 30).trim()).toBe('2.0')
    expect(headerCards('TINY', { real: 1.5e-300 })[0]!.slice(10, 30).trim()).toBe('1.5E-300')
  })

  it('doubles quotes and continues a long string with & and CONTINUE cards, never splitting a doubled quote', () => {
    const text = 'a'.repeat(66) + "'" + 'b'.repeat(100)
    const cards = headerCards('TITLE', text, 'the title')
    expect(cards.length).toBe(3)
    for (const c of cards) expect(c).toHaveLength(80)
    expect(cards[0]!.startsWith("TITLE   = '" + 'a'.repeat(66) + "&'")).toBe(true)
    expect(cards[1]!.startsWith("CONTINUE  '''" + 'b'.repeat(65))).toBe(true)
    expect(cards[2]!).toContain(' / the title')
    const joined = cards.map((c) => /'((?:[^']|'')*)'/.exec(c.slice(10))![1]!.replace(/&$/, '')).join('')
    expect(joined.replace(/''/g, "'")).toBe(text)
  })

  it('refuses a keyword that FITS does not allow', () => {
    expect(() => headerCards('toolongkey', 1)).toThrow('"toolongkey" is not a FITS keyword (1–8 of A–Z, 0–9, -, _)')
    expect(() => headerCards('N', 1.5)).toThrow('1.5 is not an integer; pass { real } for a real value')
  })

  it('wraps COMMENT text into columns 9–80 and reduces it to ASCII', () => {
    const cards = commentCards('L☉ and R☉ are the IAU 2015 nominal solar values, used for every derived luminosity and radius in the release.')
    expect(cards.length).toBe(2)
    for (const c of cards) {
      expect(c).toHaveLength(80)
      expect(c.startsWith('COMMENT ')).toBe(true)
      expect(/^[\x20-\x7e]*$/.test(c)).toBe(true)
    }
    expect(cards[0]).toContain('L? and R?')
  })
})

describe('writeFits', () => {
  const table = sampleTypes()
  const buf = writeFits(table)

  it('pads every HDU to 2880-byte blocks and ends each header with END', () => {
    expect(buf.length % FITS_BLOCK).toBe(0)
    const primary = readHeader(buf, 0)
    expect(primary.cards[0]!.startsWith('SIMPLE  =                    T')).toBe(true)
    expect(primary.values.get('NAXIS')).toBe('0')
    const ext = readHeader(buf, primary.dataStart)
    expect(ext.values.get('XTENSION')).toBe('BINTABLE')
    expect(ext.values.get('TFORM2')).toBe('J')
    expect(ext.values.get('TNULL2')).toBe(String(FITS_INT_NULL))
    expect(ext.values.get('TFORM3')).toBe('L')
    expect(ext.values.get('TUNIT4')).toBe('km/s')
    expect(ext.values.get('TUCD4')).toBe('phys.veloc')
    expect(ext.values.get('TFORM6')).toBe('14A')
    expect(ext.values.get('SCALE')).toBe('1.5')
    // header blocks are filled with spaces, the data block with zeros
    const headerEnd = ext.dataStart
    expect(buf.subarray(headerEnd - 10, headerEnd).toString('ascii')).toBe(' '.repeat(10))
    expect(buf[buf.length - 1]).toBe(0)
  })

  it('round-trips rows as big-endian values, with TNULL, NaN, 0x00 and empty text for the missing ones', () => {
    const ext = readHeader(buf, readHeader(buf, 0).dataStart)
    const rowBytes = Number(ext.values.get('NAXIS1'))
    expect(rowBytes).toBe(4 + 4 + 1 + 8 + 23 + 14)
    expect(Number(ext.values.get('NAXIS2'))).toBe(3)
    const view = new DataView(buf.buffer, buf.byteOffset + ext.dataStart)
    const row = (r: number) => {
      const o = r * rowBytes
      return {
        n: view.getInt32(o, false),
        count: view.getInt32(o + 4, false),
        flag: view.getUint8(o + 8),
        speed: view.getFloat64(o + 9, false),
        when: buf.toString('ascii', ext.dataStart + o + 17, ext.dataStart + o + 40).replace(/\0+$/, ''),
        label: buf.toString('ascii', ext.dataStart + o + 40, ext.dataStart + o + 54).replace(/\0+$/, ''),
      }
    }
    expect(row(0)).toEqual({ n: 1, count: 2147483647, flag: 0x54, speed: 299792.458, when: '2000-01-01T12:00:00.000', label: 'comma, "quote"' })
    const missing = row(1)
    expect(missing).toMatchObject({ n: 2, count: FITS_INT_NULL, flag: 0, when: '', label: '' })
    expect(Number.isNaN(missing.speed)).toBe(true)
    expect(row(2)).toMatchObject({ count: -2147483647, flag: 0x46, speed: -1.5e-300, label: "it's  spaced" })
  })

  it('refuses an int that does not fit 32 bits and text columns get ASCII', () => {
    const t = sampleTypes()
    t.rows[0]!.count = 2 ** 31
    expect(() => writeFits(t)).toThrow('column count: 2147483648 does not fit a 32-bit integer')
    const c = writeFits(sampleCatalogue())
    expect(c.includes(Buffer.from('Renee Lead'))).toBe(true)
  })
})

describe('writeCsv', () => {
  const text = writeCsv(sampleCatalogue()).toString('utf8')
  const table = sampleCatalogue()

  it('has exactly one header line of column labels, and no comment lines', () => {
    const lines = text.split('\r\n')
    expect(lines[0]).toBe(table.columns.map((c) => c.name).join(','))
    expect(lines.filter((l) => l.startsWith('#'))).toEqual([])
    expect(lines).toHaveLength(1 + table.rows.length + 1)
    expect(lines[lines.length - 1]).toBe('')
  })

  it('writes RFC 4180 rows: CRLF, quoted commas and quotes, empty fields for missing values', () => {
    const rows = parseCsv(text)
    const col = (name: string) => rows[0]!.indexOf(name)
    expect(rows[2]![col('Object')]).toBe('Cluster member, "bright" #4')
    expect(text).toContain('"Cluster member, ""bright"" #4"')
    expect(rows[2]![col('Pec')]).toBe('n, (Si)')
    expect(rows[2]![col('DecidedBy')]).toBe('Renée Lead')
    expect(rows[2]![col('RV')]).toBe('')
    expect(rows[2]![col('ObsDate')]).toBe('')
    expect(rows[3]![col('TypeCode')]).toBe('')
  })

  it('writes numbers at their column’s display precision, as short as they read', () => {
    const rows = parseCsv(text)
    const col = (name: string) => rows[0]!.indexOf(name)
    // RAdeg is F10.6: 359.9999991 → 359.999999; Lum is E10.3: 4 significant digits.
    expect(rows[2]![col('RAdeg')]).toBe('359.999999')
    expect(rows[1]![col('Teff')]).toBe('11912')
    expect(rows[1]![col('SNR')]).toBe('84.3')
    expect(csvNumber(0.30000000000000004, { notation: 'F', width: 6, decimals: 2 })).toBe('0.3')
    expect(csvNumber(-0.0001, { notation: 'F', width: 6, decimals: 2 })).toBe('0')
    expect(csvNumber(389.04, { notation: 'E', width: 10, decimals: 3 })).toBe('389')
  })

  it('writes booleans as True/False and quotes text that starts with # or a blank', () => {
    const t = sampleTypes()
    t.rows[0]!.label = '# not a comment'
    t.rows[2]!.label = ' leading'
    const body = writeCsv(t).toString('utf8').split('\r\n')
    expect(body[1]!.startsWith('1,2147483647,True,')).toBe(true)
    expect(body[1]!.endsWith(',2000-01-01T12:00:00.000,"# not a comment"')).toBe(true)
    expect(body[2]).toBe('2,,,,,')
    expect(body[3]).toContain('False')
    expect(body[3]!.endsWith('," leading"')).toBe(true)
  })
})

describe('writeEcsv', () => {
  const text = writeEcsv(sampleCatalogue()).toString('utf8')
  const table = sampleCatalogue()

  it('starts with an ECSV 1.0 header in # comments that names each column, unit and UCD', () => {
    expect(text.startsWith('# %ECSV 1.0\r\n# ---\r\n')).toBe(true)
    expect(text).toContain('# - {name: "RAdeg", unit: "deg", datatype: float64, description: "Right ascension (ICRS)", meta: {ucd: "pos.eq.ra;meta.main"}}')
    expect(text).toContain('# - {name: "Rad", unit: "solRad", datatype: float64')
    expect(text).toContain('#   release: 2')
    expect(text).toContain('#   authors: "Test, A.; Test, B. (Kestrel Ridge)"')
  })

  it('keeps every digit of the numbers', () => {
    const rows = parseCsv(
      text
        .split('\r\n')
        .filter((l) => !l.startsWith('#'))
        .join('\r\n'),
    )
    expect(rows[0]).toEqual(table.columns.map((c) => c.name))
    const col = (name: string) => rows[0]!.indexOf(name)
    expect(Number(rows[2]![col('RAdeg')])).toBe(359.9999991)
    expect(Number(rows[2]![col('e_Lum')])).toBe(0.0000456)
  })
})

describe('writeVotable', () => {
  const xml = writeVotable(sampleCatalogue()).toString('utf8')

  it('declares VOTable 1.4 and describes each FIELD with datatype, unit, UCD and DESCRIPTION', () => {
    expect(xml).toContain('<VOTABLE version="1.4" xmlns="http://www.ivoa.net/xml/VOTable/v1.3"')
    expect(xml).toContain('<FIELD name="Teff" datatype="double" unit="K" ucd="phys.temperature.effective" width="7" precision="0">')
    expect(xml).toContain('<FIELD name="Lum" datatype="double" unit="solLum" ucd="phys.luminosity" width="10" precision="E4">')
    expect(xml).toContain('<FIELD name="ObsDate" datatype="char" arraysize="*" xtype="timestamp" ucd="time.epoch;obs">')
    expect(xml).toContain('<FIELD name="RAdeg" datatype="double" unit="deg" ucd="pos.eq.ra;meta.main" width="10" precision="6" ref="icrs">')
    expect(xml).toContain('<PARAM name="release" datatype="int" ucd="meta.version" value="2">')
    expect(xml).toContain('<TABLE name="catalogue" nrows="3">')
  })

  it('uses unicodeChar only for text columns that hold non-ASCII characters', () => {
    expect(xml).toContain('<FIELD name="DecidedBy" datatype="unicodeChar" arraysize="*"')
    expect(xml).toContain('<FIELD name="Object" datatype="char" arraysize="*"')
    expect(xml).toContain('<TD>Renée Lead</TD>')
  })

  it('escapes markup and writes missing values as empty cells', () => {
    expect(xml).toContain('<TD>Cluster member, &quot;bright&quot; #4</TD>')
    const rows = xml.split('\n').filter((l) => l.trim().startsWith('<TR>'))
    expect(rows).toHaveLength(3)
    expect(rows[2]!.match(/<TD\/>/g)!.length).toBe(sampleCatalogue().columns.filter((c) => sampleCatalogue().rows[2]![c.name] === null).length)
    expect(xmlEscape('a < b & "c" \u0001')).toBe('a &lt; b &amp; &quot;c&quot; ')
  })

  it('declares VALUES null for nullable ints', () => {
    const types = writeVotable(sampleTypes()).toString('utf8')
    expect(types).toContain('<FIELD name="count" datatype="int" ucd="meta.number">\n        <DESCRIPTION>A count that may be missing</DESCRIPTION>\n        <VALUES null="-2147483648"/>')
    expect(types).toContain('<TR><TD>2</TD><TD/><TD/><TD/><TD/><TD/></TR>')
    expect(types).toContain('<TD>T</TD>')
  })
})

describe('writeFixedWidth', () => {
  const table = sampleCatalogue()
  const out = writeFixedWidth(table, 'catalogue.dat')
  const data = out.data.toString('ascii').split('\n').filter(Boolean)
  const readme = out.readme.toString('ascii')

  it('writes records of one length and a byte-by-byte description whose byte ranges match them', () => {
    expect(new Set(data.map((l) => l.length))).toEqual(new Set([out.recordLength]))
    const spec = readme.split('\n').filter((l) => /^\s*\d+(-\s*\d+)?\s+[AIFE]\d/.test(l))
    expect(spec).toHaveLength(table.columns.length)
    const ra = spec.find((l) => / RAdeg /.test(l))!
    const [, from, to] = /^\s*(\d+)-\s*(\d+)\s+F10\.6\s+deg\s+RAdeg\s+\? Right ascension/.exec(ra)!
    expect(Number(data[1]!.slice(Number(from) - 1, Number(to)))).toBeCloseTo(359.9999991, 6)
    expect(data[0]!.slice(Number(from) - 1, Number(to))).toBe(' 10.684708')
  })

  it('uses CDS units, marks nullable columns with ?, and leaves missing values blank', () => {
    expect(readme).toMatch(/ E10\.3\s+Rsun\s+Rad\s+\? Radius/)
    expect(readme).toMatch(/ E10\.3\s+Lsun\s+Lum\s+\? Luminosity/)
    expect(readme).toMatch(/ I7\s+---\s+SpId\s+Lineweight spectrum identifier/)
    expect(readme).toContain('Byte-by-byte Description of file: catalogue.dat')
    expect(cdsUnit('km/s')).toBe('km/s')
    const spec = readme.split('\n').find((l) => / RV /.test(l))!
    const [, from, to] = /^\s*(\d+)-\s*(\d+)/.exec(spec)!
    expect(data[1]!.slice(Number(from) - 1, Number(to)).trim()).toBe('')
  })

  it('writes E formats with a two-digit exponent and text reduced to ASCII', () => {
    expect(formatDouble(0.000123, { notation: 'E', width: 10, decimals: 3 })).toBe('1.230E-04')
    expect(formatDouble(1234.5, { notation: 'E', width: 10, decimals: 3 })).toBe('1.235E+03')
    expect(formatDouble(-0.5, { notation: 'F', width: 6, decimals: 2 })).toBe('-0.50')
    expect(data[1]).toContain('Renee Lead')
    expect(toAscii('Renée L☉')).toBe('Renee L?')
  })

  it('puts the description before the data in the single-file form, the data after the last rule', () => {
    const combined = out.combined.toString('ascii').split('\n')
    const lastRule = combined
      .map((l, i) => (/^-{20}/.test(l) ? i : -1))
      .filter((i) => i >= 0)
      .pop()!
    expect(combined.slice(lastRule + 1).filter(Boolean)).toEqual(data)
    expect(combined[0]).toBe(`Title: ${toAscii(table.title)}`)
  })
})

describe('checkColumns', () => {
  it('refuses labels the formats cannot carry and doubles without a format', () => {
    const t: ExportTable = { ...sampleTypes(), columns: [{ name: 'bad label', description: '', unit: '', ucd: 'meta.id', type: 'int', nullable: false }] }
    expect(() => writeCsv(t)).toThrow('column label "bad label" is not a letter followed by ≤ 15 letters, digits or underscores')
    const d: ExportTable = { ...sampleTypes(), columns: [{ name: 'x', description: '', unit: '', ucd: 'meta.id', type: 'double', nullable: false }] }
    expect(() => writeFits(d)).toThrow('column "x" is a double without a display format')
  })

  it('refuses a value of the wrong type', () => {
    const t = sampleTypes()
    t.rows[0]!.n = 'one'
    expect(() => writeVotable(t)).toThrow('column n: one is not an integer')
  })
})
