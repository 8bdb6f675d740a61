import type { ExportFormat } from '../../shared/api/releases'
import type { ExportTable } from './table'

/**
 * Cells a spreadsheet would run as a formula: those starting with = + - @ (and tab or carriage
 * return, which some programs skip before looking). OWASP's advice on CSV injection: prefix a single
 * quote, which spreadsheets show as text and hide.
 */
const FORMULA_START = /^[=+\-@\t\r]/

/** The text as a spreadsheet will show it and never run it: a leading `'` before = + - @ tab CR. */
export function neutraliseFormula(text: string): string {
  return FORMULA_START.test(text) ? `'${text}` : text
}

/**
 * Greek letters as the three-letter abbreviations star catalogues use for Bayer designations
 * (ζ Oph → zet Oph), from memory of the Bright Star Catalogue / CDS convention (two-letter names
 * end in a dot: μ → mu.).
 */
// prettier-ignore
const GREEK: Record<string, string> = {
  α: 'alf', β: 'bet', γ: 'gam', δ: 'del', ε: 'eps', ϵ: 'eps', ζ: 'zet', η: 'eta', θ: 'tet', ϑ: 'tet', ι: 'iot', κ: 'kap', λ: 'lam', μ: 'mu.',
  ν: 'nu.', ξ: 'ksi', ο: 'omi', π: 'pi.', ρ: 'rho', σ: 'sig', ς: 'sig', τ: 'tau', υ: 'ups', φ: 'phi', ϕ: 'phi', χ: 'chi', ψ: 'psi', ω: 'ome',
}
/** Letters that carry no combining accent, so Unicode decomposition alone would lose them. */
// prettier-ignore
const LETTERS: Record<string, string> = {
  Ø: 'O', ø: 'o', Æ: 'AE', æ: 'ae', Œ: 'OE', œ: 'oe', ß: 'ss', Ł: 'L', ł: 'l', Đ: 'D', đ: 'd', Ð: 'D', ð: 'd', Þ: 'Th', þ: 'th', ı: 'i', Ħ: 'H', ħ: 'h',
}

/**
 * Text a 7-bit ASCII format can carry (FITS character data, the CDS fixed-width table): Greek
 * letters become their catalogue abbreviations, accents are dropped (NFKD), letters such as Ø and ß
 * get their usual Latin spelling, and whatever is left outside printable ASCII becomes '?'.
 */
export function transliterate(text: string): string {
  let out = ''
  for (const ch of text.normalize('NFC')) {
    const lower = ch.toLowerCase()
    const greek = GREEK[lower]
    if (greek) out += ch === lower ? greek : greek[0]!.toUpperCase() + greek.slice(1)
    else out += LETTERS[ch] ?? ch
  }
  return out
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .replace(/[^\x20-\x7e]/g, '?')
}

export const TRANSLITERATION_NOTE =
  'Names with characters outside ASCII are transliterated in this file: Greek letters as catalogue abbreviations (zeta -> zet), accents dropped, letters such as O-slash and sharp s spelled in Latin letters. The CSV and VOTable downloads keep the names in UTF-8.'
export const FORMULA_NOTE = "Text cells that begin with = + - or @ carry a leading ' so that spreadsheets show them as text instead of running them as formulas."

const hasNonAscii = (table: ExportTable) => table.rows.some((r) => Object.values(r).some((v) => typeof v === 'string' && /[^\x20-\x7e]/.test(v)))

/**
 * The table as a format should receive it: in every text format, string cells that a spreadsheet
 * would run as formulas are neutralised (and a note says so); in the ASCII-only formats (FITS, the
 * fixed-width table) a note says that non-ASCII names were transliterated.
 */
export function prepareForExport(table: ExportTable, format: ExportFormat): ExportTable {
  const notes = [...table.notes]
  let rows = table.rows
  if (format !== 'fits') {
    const strings = table.columns.filter((c) => c.type === 'string').map((c) => c.name)
    let changed = false
    rows = table.rows.map((row) => {
      let copy: typeof row | null = null
      for (const name of strings) {
        const v = row[name]
        if (typeof v !== 'string') continue
        const safe = neutraliseFormula(v)
        if (safe !== v) {
          copy ??= { ...row }
          copy[name] = safe
          changed = true
        }
      }
      return copy ?? row
    })
    if (changed) notes.push(FORMULA_NOTE)
  }
  if ((format === 'fits' || format === 'mrt') && hasNonAscii(table)) notes.push(TRANSLITERATION_NOTE)
  return { ...table, rows, notes }
}
