/**
 * MK spectral-classification notation: a parser that turns catalogue strings ("K1.5IIIbCN0.5",
 * "G8/K0III", "kA2hA5mA7V", "A0V+G5III", "DA3.4", "C-N5", "WN7h") into one structured value,
 * and a formatter that writes that value back as canonical text ("K1.5 IIIb CN0.5").
 *
 * Shared by client and server: no Node imports.
 *
 * Conventions this module follows (and documents where the notation itself is silent):
 * - Type codes: O0 = 0 … O9 = 9, B0 = 10, A0 = 20, F0 = 30, G0 = 40, K0 = 50, M0 = 60, and for the
 *   cool extensions L0 = 70, T0 = 80, Y0 = 90; so B8 = 18 and K1.5 = 51.5. The late Mira type
 *   M10 gets 70, the same code as L0. Only the MK kind
 *   (including subdwarf and other prefixes) carries a type code: white dwarfs, carbon and S stars,
 *   Wolf–Rayet stars and named oddities sit outside the MK grid.
 * - A range or intermediate type ("G8/K0", "A0-A2", "O9.5/B0") gets the mean of its ends as its
 *   code and both ends in `typeRange`.
 * - Luminosity-class codes: 0 → 0, Ia+ (= Ia0) → 0.5, Ia → 1, Iab → 1.5, Ib → 2, a bare I → 1.5,
 *   II → 3, III → 4, IV → 5, V → 6, VI → 7, and VII → 8, VIII → 9 (the extension used for hot
 *   subdwarfs). Keenan's subclasses of II–V move a quarter class: IIIa = 3.75, IIIab = 4,
 *   IIIb = 4.25. An intermediate class ("IV-V", "II/III", "Ia-0") gets the mean of its ends.
 * - ':' and '?' mark the preceding part uncertain (both are written back as ':'); a type or class
 *   in parentheses, as catalogues write "A(3)(V)", is read as uncertain too. Notes keep their
 *   parentheses and brackets, because "(n)", "(f)", "((f*))" and "[e]" mean something of their own.
 * - In a composite ("A0V+G5III") the value describes the first star; the others are in `composite`.
 * - A '+' or '-' right after a subtype (Keenan's "K0+", "K3-") is kept as `shift` on that end and
 *   does not move the type code.
 * - Metallic-line (Am) notation keeps each line type ("kA2", "hA5", "mA7") in `lineTypes`. When the
 *   string gives no bare type, the hydrogen type stands for the star (else the first line type), as
 *   is common practice for Am stars.
 */

/** What family of notation a spectral type belongs to. */
export type MKKind = 'mk' | 'white-dwarf' | 'carbon' | 's-type' | 'wolf-rayet' | 'other'

/** Prefixes written before an MK type: subdwarfs (sd, esd, usd), dwarf (d), giant (g), subgiant-giant (sg), supergiant (c). */
export type MKPrefix = 'esd' | 'usd' | 'sd' | 'sg' | 'd' | 'g' | 'c'

/** One end of a spectral type: a letter (or letter group such as "C-N", "DA", "WN") and an optional subtype. */
export interface TypePoint {
  letter: string
  subtype?: number
  /** Keenan's "a little later" (+) or "a little earlier" (−) after the subtype. */
  shift?: '+' | '-'
}

/** A spectral type, possibly a range or intermediate type ("G8/K0", "A0-A2", "B2-5"). */
export interface TypeExpr {
  points: TypePoint[]
  /** Separators between consecutive points ('/' = intermediate, '-' = range). */
  separators: Array<'/' | '-'>
  /** Secondary index of carbon and S types ("C5,4" → "4", "S4/2" → "2"), as written. */
  index?: string
  /** Separator written before the index (',' or '/'). */
  indexSeparator?: ',' | '/'
}

/** A metallic-line or other feature-specific type: "kA2" (Ca II K), "hA5" (hydrogen), "mA7" (metals), "gF5" (G band), "wF3" (weak lines), "HeA0" (helium). */
export interface LineType {
  feature: 'k' | 'h' | 'm' | 'g' | 'w' | 'He'
  type: TypeExpr
  uncertain: boolean
  /** A luminosity class written after this line type when the star's own class is already given. */
  luminosityClass?: string
}

/** The structured form of one spectral classification. */
export interface MKValue {
  kind: MKKind
  prefix?: MKPrefix
  /** Letter of the (first end of the) type: 'O'…'M', 'L', 'T', 'Y', 'OB', 'DA', 'C-N', 'S', 'WN', … */
  letter: string
  subtype?: number
  /** The full type, with range ends. */
  type: TypeExpr
  /** Walborn's nitrogen/carbon qualifier of O and B stars ("ON9.2", "OC9.5"). */
  cnType?: 'N' | 'C'
  /** Numeric type (see the module notes); present for the MK kind when a subtype is given. */
  typeCode?: number
  /** [earliest, latest] type code of a range. */
  typeRange?: readonly [number, number]
  /** Canonical luminosity-class text, e.g. "IV-V", "Iab", "IIIb". */
  luminosityClass?: string
  classCode?: number
  classRange?: readonly [number, number]
  uncertain: { prefix: boolean; type: boolean; class: boolean }
  /** Where the type came from when it is taken from a line type. */
  typeSource?: LineType['feature']
  lineTypes: LineType[]
  /** Notes in order, as canonical tokens: "e", "n", "p", "Si", "(n)", "((f*))", "[e]", "Fe-1", "CN0.5", "e:" … */
  peculiarities: string[]
  /** The other stars of a composite spectrum. */
  composite?: MKValue[]
}

/** Result of {@link parseMK}. */
export type MKParseResult = { ok: true; value: MKValue } | { ok: false; reason: string }

/** The MK letters in temperature order, with the type code of subtype 0. */
export const MK_LETTERS: ReadonlyArray<{ letter: string; code: number }> = [
  { letter: 'O', code: 0 },
  { letter: 'B', code: 10 },
  { letter: 'A', code: 20 },
  { letter: 'F', code: 30 },
  { letter: 'G', code: 40 },
  { letter: 'K', code: 50 },
  { letter: 'M', code: 60 },
  { letter: 'L', code: 70 },
  { letter: 'T', code: 80 },
  { letter: 'Y', code: 90 },
]

/** The luminosity classes offered for a call, from most to least luminous, with their codes. */
export const LUMINOSITY_CLASSES: ReadonlyArray<{ text: string; code: number }> = [
  { text: '0', code: 0 },
  { text: 'Ia+', code: 0.5 },
  { text: 'Ia', code: 1 },
  { text: 'Iab', code: 1.5 },
  { text: 'Ib', code: 2 },
  { text: 'II', code: 3 },
  { text: 'III', code: 4 },
  { text: 'IV', code: 5 },
  { text: 'V', code: 6 },
  { text: 'VI', code: 7 },
]

const ROMAN_CODE: Record<string, number> = { '0': 0, I: 1.5, II: 3, III: 4, IV: 5, V: 6, VI: 7, VII: 8, VIII: 9 }

/** Type code of an MK letter and subtype (O0 = 0 … M0 = 60); undefined for letters off the MK grid. */
export function typeCodeOf(letter: string, subtype: number): number | undefined {
  const entry = MK_LETTERS.find((l) => l.letter === letter)
  return entry === undefined ? undefined : entry.code + subtype
}

/** Letter and subtype of a type code (51.5 → { letter: 'K', subtype: 1.5 }). Throws outside 0 ≤ code < 100. */
export function typeFromCode(code: number): { letter: string; subtype: number } {
  if (!Number.isFinite(code) || code < 0 || code >= 100) throw new RangeError(`type code ${code} is outside 0–99.99`)
  const entry = MK_LETTERS[Math.floor(code / 10)]!
  return { letter: entry.letter, subtype: roundSubtype(code - entry.code) }
}

/** Canonical text of a type code (18 → "B8", 51.5 → "K1.5"). */
export function formatTypeCode(code: number): string {
  const { letter, subtype } = typeFromCode(code)
  return `${letter}${formatNumber(subtype)}`
}

/**
 * The type `steps` subtypes away from `code` (−1 = one subtype earlier), kept within [min, max].
 * @default options.min 0 (O0), options.max 69 (M9), options.step 1 subtype
 */
export function neighbourType(code: number, steps: number, options: { min?: number; max?: number; step?: number } = {}): number {
  const { min = 0, max = 69, step = 1 } = options
  return Math.min(max, Math.max(min, roundSubtype(code + steps * step)))
}

/** Code of a luminosity-class text ("IV-V" → 5.5, "Iab" → 1.5, "IIIb" → 4.25); undefined when not a class. */
export function classCodeOf(text: string): number | undefined {
  const r = parseClassAt(text.replace(/\s+/g, ''), 0)
  return r !== undefined && r.end === text.replace(/\s+/g, '').length ? r.code : undefined
}

/** The luminosity class `steps` places away in {@link LUMINOSITY_CLASSES} (+1 = one class fainter), clamped to the list. */
export function neighbourClass(text: string, steps: number): string {
  const code = classCodeOf(text)
  if (code === undefined) throw new RangeError(`"${text}" is not a luminosity class`)
  let i = 0
  let best = Infinity
  LUMINOSITY_CLASSES.forEach((c, k) => {
    const d = Math.abs(c.code - code)
    if (d < best) {
      best = d
      i = k
    }
  })
  const j = Math.min(LUMINOSITY_CLASSES.length - 1, Math.max(0, i + steps))
  return LUMINOSITY_CLASSES[j]!.text
}

function roundSubtype(x: number): number {
  return Math.round(x * 1000) / 1000
}

function formatNumber(x: number): string {
  return String(roundSubtype(x))
}

// ---------------------------------------------------------------------------------------------
// Parsing
// ---------------------------------------------------------------------------------------------

/** Notes that are words of their own, longest first so that "shell" wins over "s". */
// prettier-ignore
const WORD_NOTES = [
  'shell', 'comp', 'var', 'pec', 'nne', 'nn', 'wk', 'wl', 'lB', 'Am', 'Ap', 'ha', 'f*', 'f+', 'fc',
  'lambdaBoo', 'metalweak', 'Ksn', 'Nstr', '...', 'n', 'e', 'p', 's', 'k', 'w', 'm', 'v', 'f', 'h', 'z', 'q', 'd', 'b', 'o', 'c', 'J', 'S',
]
/** Elements and molecules that appear as abundance or peculiarity notes, optionally with a signed strength. */
// prettier-ignore
const ABUNDANCE_NOTES = [
  'Hdel', 'CaII', 'CaI', 'HK', 'HI', 'CN', 'CH', 'C2', 'He', 'Si', 'Sr', 'Cr', 'Eu', 'Hg', 'Mn', 'Ca', 'Ti', 'Ba', 'Fe', 'Tc', 'Mg', 'Ho', 'Gd', 'Ce', 'Nd', 'Zr', 'Ga', 'Pt', 'Am', 'MS',
]
const LINE_FEATURES: ReadonlyArray<LineType['feature']> = ['He', 'k', 'h', 'm', 'g', 'w']
const PREFIXES: readonly MKPrefix[] = ['esd', 'usd', 'sd', 'sg', 'd', 'g', 'c']
/** Whole strings that name a class of object rather than a type. */
const NAMED_OBJECTS = ['CEMP-no', 'CEMP-s', 'CEMP', 'LBV', 'PG1159', 'em']

interface Letter {
  letter: string
  kind: MKKind
  cnType?: 'N' | 'C'
  end: number
}

class Failure extends Error {}

/**
 * Reads an MK spectral-type string into a structured value.
 *
 * Follows the MK system as written in catalogues (Morgan, Keenan & Kellman 1943; Keenan &
 * McNeil 1989 for half classes and the a/b subclasses; Gray & Garrison's metallic-line notation;
 * Keenan & Morgan / Keenan 1993 carbon types; Keenan & Boeshaar 1980 S types; Sion et al. 1983
 * white dwarfs; Walborn's O-star qualifiers). Whitespace is ignored. See the module notes for the
 * codes and conventions.
 *
 * @returns `{ ok: true, value }`, or `{ ok: false, reason }` naming what could not be read.
 */
export function parseMK(text: string): MKParseResult {
  const compact = text.replace(/\s+/g, '')
  if (compact === '') return { ok: false, reason: 'empty spectral type' }
  const named = NAMED_OBJECTS.find((n) => n === compact)
  if (named !== undefined) return { ok: true, value: namedObject(named) }
  let flat: Flat
  try {
    flat = flatten(compact)
  } catch (e) {
    return { ok: false, reason: (e as Error).message }
  }
  const parser = new Parser(flat)
  try {
    const value = parser.parseAll()
    return { ok: true, value }
  } catch (e) {
    if (e instanceof Failure) return { ok: false, reason: e.message }
    throw e
  }
}

function namedObject(name: string): MKValue {
  return {
    kind: 'other',
    letter: name,
    type: { points: [{ letter: name }], separators: [] },
    uncertain: { prefix: false, type: false, class: false },
    lineTypes: [],
    peculiarities: [],
  }
}

/** The string without parentheses and brackets, and for each character the wrapping it had. */
interface Flat {
  s: string
  paren: number[]
  bracket: boolean[]
}

function flatten(text: string): Flat {
  let s = ''
  const paren: number[] = []
  const bracket: boolean[] = []
  let depth = 0
  let inBracket = false
  for (const ch of text) {
    if (ch === '(') depth++
    else if (ch === ')') {
      depth--
      if (depth < 0) throw new Error('a closing parenthesis without an opening one')
    } else if (ch === '[') {
      if (inBracket) throw new Error('nested brackets')
      inBracket = true
    } else if (ch === ']') {
      if (!inBracket) throw new Error('a closing bracket without an opening one')
      inBracket = false
    } else {
      s += ch
      paren.push(depth)
      bracket.push(inBracket)
    }
  }
  if (depth !== 0) throw new Error('an unclosed parenthesis')
  if (inBracket) throw new Error('an unclosed bracket')
  return { s, paren, bracket }
}

class Parser {
  private pos = 0
  private readonly s: string

  constructor(private readonly flat: Flat) {
    this.s = flat.s
  }

  parseAll(): MKValue {
    const first = this.parseComponent(true)
    const others: MKValue[] = []
    while (this.pos < this.s.length && this.s[this.pos] === '+' && this.companionFollows(this.pos + 1)) {
      this.pos++
      others.push(this.parseComponent(false))
    }
    if (this.pos < this.s.length) throw new Failure(`cannot read "${this.s.slice(this.pos)}" at character ${this.pos + 1}`)
    if (others.length > 0) first.composite = others
    return first
  }

  /** Whether the rest of the string, from `at`, reads as one or more components. */
  private companionFollows(at: number): boolean {
    if (at >= this.s.length) return false
    const sub = new Parser(this.flat)
    sub.pos = at
    try {
      sub.parseComponent(false)
      while (sub.pos < sub.s.length && sub.s[sub.pos] === '+' && sub.companionFollows(sub.pos + 1)) {
        sub.pos++
        sub.parseComponent(false)
      }
      return sub.pos === sub.s.length
    } catch (e) {
      if (e instanceof Failure) return false
      throw e
    }
  }

  private peek(k = 0): string {
    return this.s[this.pos + k] ?? ''
  }

  private startsWith(word: string, at = this.pos): boolean {
    return this.s.startsWith(word, at)
  }

  /** Whether the characters [from, to) are inside parentheses (read as uncertain). */
  private inParens(from: number, to: number): boolean {
    for (let i = from; i < to; i++) if ((this.flat.paren[i] ?? 0) > 0) return true
    return false
  }

  private takeUncertainMark(): boolean {
    let marked = false
    while (this.peek() === ':' || this.peek() === '?') {
      this.pos++
      marked = true
    }
    return marked
  }

  private parseComponent(first: boolean): MKValue {
    const start = this.pos
    const value: MKValue = {
      kind: 'mk',
      letter: '',
      type: { points: [], separators: [] },
      uncertain: { prefix: false, type: false, class: false },
      lineTypes: [],
      peculiarities: [],
    }
    // Prefix (only when a type letter follows it).
    for (const p of PREFIXES) {
      if (!this.startsWith(p)) continue
      let after = this.pos + p.length
      while (this.s[after] === ':' || this.s[after] === '?') after++
      const letter = this.readLetter(after)
      if (letter !== undefined && letter.kind === 'mk') {
        value.prefix = p
        const from = this.pos
        this.pos += p.length
        value.uncertain.prefix = this.takeUncertainMark() || this.inParens(from, from + p.length)
        break
      }
    }
    // Type: a bare type, or metallic-line types.
    const letter = this.readLetter(this.pos)
    if (letter !== undefined) {
      const from = this.pos
      value.kind = letter.kind
      if (letter.cnType !== undefined) value.cnType = letter.cnType
      value.type = this.parseTypeExpr(letter)
      const between = this.pendingUncertain
      value.uncertain.type = this.takeUncertainMark() || between || this.inParens(from, this.pos)
    } else if (this.lineTypeAt(this.pos) === undefined) {
      throw new Failure(this.pos >= this.s.length ? 'no spectral type' : `no spectral type at "${this.s.slice(this.pos)}"` + (first ? '' : ' after "+"'))
    }
    // Luminosity class, line types and notes, in any order.
    for (;;) {
      if (this.pos >= this.s.length) break
      const ch = this.peek()
      if (ch === '+' && this.companionFollows(this.pos + 1)) break
      if (this.tryClass(value)) continue
      if (this.tryLineType(value)) continue
      if (this.tryNote(value)) continue
      if (ch === '+' || ch === '-') {
        // A lone '+' marks an unidentified companion.
        if (ch === '+' && /^\+([:?]*|\.\.\.)$/.test(this.s.slice(this.pos))) {
          this.pos++
          value.peculiarities.push(this.takeUncertainMark() ? '+:' : '+')
          continue
        }
      }
      throw new Failure(`cannot read "${this.s.slice(this.pos)}" at character ${this.pos + 1}`)
    }
    if (value.type.points.length === 0) {
      const source = value.lineTypes.find((l) => l.feature === 'h') ?? value.lineTypes[0]
      if (source === undefined) throw new Failure('no spectral type')
      value.type = source.type
      value.typeSource = source.feature
      value.uncertain.type = source.uncertain
      const k = this.readLetter(0, source.type.points[0]!.letter)
      value.kind = k?.kind ?? 'mk'
    }
    const p0 = value.type.points[0]!
    value.letter = p0.letter
    if (p0.subtype !== undefined) value.subtype = p0.subtype
    if (value.kind === 'mk') {
      const codes = value.type.points.map((p) => (p.subtype === undefined ? undefined : typeCodeOf(p.letter, p.subtype)))
      if (codes.length > 0 && codes.every((c) => c !== undefined)) {
        const cs = codes as number[]
        const lo = Math.min(...cs)
        const hi = Math.max(...cs)
        value.typeCode = roundSubtype((cs[0]! + cs[cs.length - 1]!) / 2)
        if (cs.length > 1) value.typeRange = [lo, hi]
      }
    }
    if (this.pos === start) throw new Failure('no spectral type')
    return value
  }

  /** Reads a type letter (or letter group) at `at`, or checks a given string when `only` is set. */
  private readLetter(at: number, only?: string): Letter | undefined {
    const s = only ?? this.s
    const digitAt = (i: number) => /[0-9.]/.test(s[i] ?? '') && (s[i] !== '.' || /[0-9]/.test(s[i + 1] ?? ''))
    const c0 = s[at] ?? ''
    const c1 = s[at + 1] ?? ''
    // Wolf–Rayet
    if (c0 === 'W' && /[NCOR]/.test(c1)) return { letter: `W${c1}`, kind: 'wolf-rayet', end: at + 2 }
    // White dwarfs: D followed by one or more of the spectral letters.
    if (c0 === 'D') {
      const m = /^D[ABOQZCX]+/.exec(s.slice(at))
      if (m !== null) return { letter: m[0], kind: 'white-dwarf', end: at + m[0].length }
      // A bare "D" (an unspecified white dwarf), as companions are written.
      if (c1 === '' || /[+:?]/.test(c1)) return { letter: 'D', kind: 'white-dwarf', end: at + 1 }
      return undefined
    }
    // Carbon stars, revised MK (C-R, C-N, C-J, C-H, C-Hd) and the older C, R and N classes.
    if (c0 === 'C') {
      const m = /^C-(Hd|R|N|J|H)/.exec(s.slice(at))
      if (m !== null) return { letter: m[0], kind: 'carbon', end: at + m[0].length }
      if (/[A-Za-z]/.test(c1) && c1 !== 'e' && c1 !== 'p' && c1 !== 'm') return undefined
      return { letter: 'C', kind: 'carbon', end: at + 1 }
    }
    if (c0 === 'R' || c0 === 'N') {
      if (/[a-z]/.test(c1) && c1 !== 'e' && c1 !== 'p') return undefined
      if (/[A-Z]/.test(c1)) return undefined
      return { letter: c0, kind: 'carbon', end: at + 1 }
    }
    // S stars and the transition classes MS and SC.
    if (c0 === 'S' && c1 === 'C') return { letter: 'SC', kind: 's-type', end: at + 2 }
    if (c0 === 'S') {
      if (/[a-z]/.test(c1) && c1 !== 'e' && c1 !== 'w') return undefined
      if (/[A-Z]/.test(c1)) return undefined
      return { letter: 'S', kind: 's-type', end: at + 1 }
    }
    if (c0 === 'M' && c1 === 'S' && (digitAt(at + 2) || at + 2 >= s.length)) return { letter: 'MS', kind: 's-type', end: at + 2 }
    // O and B stars with Walborn's N/C qualifier, and the OB group.
    if ((c0 === 'O' || c0 === 'B') && (c1 === 'N' || c1 === 'C') && digitAt(at + 2)) {
      return { letter: c0, kind: 'mk', cnType: c1, end: at + 2 }
    }
    if (c0 === 'O' && c1 === 'B') return { letter: 'OB', kind: 'mk', end: at + 2 }
    if (MK_LETTERS.some((l) => l.letter === c0) && c0 !== '') {
      if (only === undefined && this.elementAt(at)) return undefined
      // A lone letter must not be the start of an element name ("Ba", "Ti", "Mn").
      if (/[a-df-z]/.test(c1) && !(c1 === 'p' || c1 === 'm' || c1 === 'n' || c1 === 'w' || c1 === 's' || c1 === 'k')) return undefined
      if (c0 === 'B' && c1 === 'a') return undefined
      if ((c0 === 'M' && c1 === 'n') || (c0 === 'M' && c1 === 'g')) return undefined
      return { letter: c0, kind: 'mk', end: at + 1 }
    }
    return undefined
  }

  /** Whether an element note such as "Fe-1" or "Ba3" starts at `at` (so "Fe" is not F + e there). */
  private elementAt(at: number): boolean {
    return ABUNDANCE_NOTES.some((a) => a.length === 2 && this.s.startsWith(a, at) && /^[+-]?[0-9]/.test(this.s.slice(at + 2)))
  }

  /** Reads a subtype; MK subtypes have one digit ("G30-Ia" is G3 0-Ia), except the late Mira type M10. */
  private readNumber(mkLetter?: string): number | undefined {
    const rest = this.s.slice(this.pos)
    const pattern = mkLetter === undefined ? /^(\d+(\.\d+)?|\.\d+)/ : mkLetter === 'M' && /^10(?![-/0-9IV.])/.test(rest) ? /^10/ : /^(\d(\.\d+)?|\.\d+)/
    const m = pattern.exec(rest)
    if (m === null) return undefined
    this.pos += m[0].length
    return Number(m[0])
  }

  private parsePoint(letter: Letter): TypePoint {
    this.pos = letter.end
    const point: TypePoint = { letter: letter.letter }
    // "C-J:4": an uncertainty mark may sit between letter and subtype; the caller reads pendingUncertain.
    const save = this.pos
    const marked = this.takeUncertainMark()
    const sub = this.readNumber(letter.kind === 'mk' ? letter.letter : undefined)
    if (sub === undefined) this.pos = save
    else {
      point.subtype = sub
      if (marked) this.pendingUncertain = true
    }
    if ((point.subtype !== undefined || point.letter === 'OB') && (this.peek() === '+' || this.peek() === '-')) {
      const sign = this.peek() as '+' | '-'
      const next = this.peek(1)
      // '-' followed by a digit or a letter that starts a type is a range, not a shift.
      const rangeFollows = sign === '-' && (/[0-9]/.test(next) || this.readLetter(this.pos + 1) !== undefined)
      const companion = sign === '+' && this.companionFollows(this.pos + 1)
      const wrSuffix = sign === '-' && /[ws]/.test(next) && letter.kind === 'wolf-rayet'
      if (!rangeFollows && !companion && !wrSuffix) {
        point.shift = sign
        this.pos++
      }
    }
    return point
  }

  private pendingUncertain = false

  private parseTypeExpr(first: Letter): TypeExpr {
    this.pendingUncertain = false
    const expr: TypeExpr = { points: [this.parsePoint(first)], separators: [] }
    for (;;) {
      const sep = this.peek()
      if (sep !== '/' && sep !== '-') break
      const after = this.pos + 1
      const prev = expr.points[expr.points.length - 1]!
      // S-star abundance index after '/': "S4/2", "S3+/1-".
      if (sep === '/' && first.kind === 's-type' && expr.index === undefined && /[0-9]/.test(this.s[after] ?? '')) {
        this.pos = after
        expr.index = this.readIndex()
        expr.indexSeparator = '/'
        continue
      }
      if (/[0-9.]/.test(this.s[after] ?? '') && prev.subtype !== undefined) {
        this.pos = after
        const sub = this.readNumber(first.kind === 'mk' ? prev.letter : undefined)
        if (sub === undefined) break
        const point: TypePoint = { letter: prev.letter, subtype: sub }
        this.maybeShift(point)
        expr.points.push(point)
        expr.separators.push(sep)
        continue
      }
      const l = this.readLetter(after)
      if (l !== undefined && (l.kind === first.kind || (first.kind === 'mk' && l.kind === 'mk'))) {
        // "B9/A0", "O/Be", "WN6/WC4"; a lone letter after '-' must be followed by a subtype.
        const point = this.parsePoint(l)
        expr.points.push(point)
        expr.separators.push(sep)
        continue
      }
      break
    }
    if ((first.kind === 'carbon' || first.kind === 's-type') && /^[:?]*,[0-9]/.test(this.s.slice(this.pos))) {
      if (this.takeUncertainMark()) this.pendingUncertain = true
      this.pos++
      expr.index = this.readIndex()
      expr.indexSeparator = ','
    }
    return expr
  }

  private maybeShift(point: TypePoint): void {
    const sign = this.peek()
    if (sign !== '+' && sign !== '-') return
    const next = this.peek(1)
    if (sign === '-' && (/[0-9]/.test(next) || this.readLetter(this.pos + 1) !== undefined)) return
    if (sign === '+' && this.companionFollows(this.pos + 1)) return
    point.shift = sign
    this.pos++
  }

  private readIndex(): string {
    const m = /^\d+(\.\d+)?(-\d+(\.\d+)?)?[+-]?/.exec(this.s.slice(this.pos))
    if (m === null) throw new Failure('an index without a number')
    let text = m[0]
    if (text.endsWith('+') && this.companionFollows(this.pos + text.length)) text = text.slice(0, -1)
    this.pos += text.length
    return text
  }

  // -- luminosity class ------------------------------------------------------------------------

  private tryClass(value: MKValue): boolean {
    const r = parseClassAt(this.s, this.pos)
    if (r === undefined) return false
    const from = this.pos
    if (r.range === undefined && r.text.endsWith('+') && this.companionFollows(r.end)) {
      // "K9Ia+B2V": the '+' starts a companion.
      r.text = r.text.slice(0, -1)
      r.code = classCodeOf(r.text) ?? r.code
      r.end--
    }
    this.pos = r.end
    const uncertain = this.takeUncertainMark() || this.inParens(from, r.end)
    if (value.luminosityClass === undefined) {
      value.luminosityClass = r.text
      value.classCode = r.code
      if (r.range !== undefined) value.classRange = r.range
      value.uncertain.class = uncertain
      return true
    }
    const last = value.lineTypes[value.lineTypes.length - 1]
    if (last === undefined || last.luminosityClass !== undefined) throw new Failure(`a second luminosity class "${r.text}"`)
    last.luminosityClass = r.text + (uncertain ? ':' : '')
    return true
  }

  // -- line types ----------------------------------------------------------------------------------

  private lineTypeAt(at: number): { feature: LineType['feature']; letter: Letter } | undefined {
    for (const f of LINE_FEATURES) {
      if (!this.startsWith(f, at)) continue
      let after = at + f.length
      while (this.s[after] === ':' || this.s[after] === '?') after++
      const letter = this.readLetter(after)
      if (letter === undefined || letter.kind !== 'mk' || letter.letter === 'OB') continue
      return { feature: f, letter }
    }
    return undefined
  }

  private tryLineType(value: MKValue): boolean {
    const found = this.lineTypeAt(this.pos)
    if (found === undefined) return false
    const from = this.pos
    this.pos += found.feature.length
    const featureMark = this.takeUncertainMark()
    const type = this.parseTypeExpr(found.letter)
    const between = this.pendingUncertain
    const uncertain = this.takeUncertainMark() || featureMark || between || this.inParens(from + found.feature.length, this.pos)
    value.lineTypes.push({ feature: found.feature, type, uncertain })
    return true
  }

  // -- notes -----------------------------------------------------------------------------------------

  private wrap(token: string, from: number, to: number): string {
    let depth = 0
    let bracket = false
    for (let i = from; i < to; i++) {
      depth = Math.max(depth, this.flat.paren[i] ?? 0)
      bracket = bracket || (this.flat.bracket[i] ?? false)
    }
    let out = bracket ? `[${token}]` : token
    for (let d = 0; d < depth; d++) out = `(${out})`
    return out
  }

  private tryNote(value: MKValue): boolean {
    const from = this.pos
    let token: string | undefined
    // Abundance notes: element or molecule, then an optional signed strength or, for CN, a class.
    for (const a of ABUNDANCE_NOTES) {
      if (!this.startsWith(a)) continue
      const rest = this.s.slice(this.pos + a.length)
      const num = /^[+-]?(\d+(\.\d+)?|\.\d+)[+-]?/.exec(rest)
      if (num !== null) {
        let n = num[0]
        if (n.length > 1 && n.endsWith('+') && this.companionFollows(this.pos + a.length + n.length)) n = n.slice(0, -1)
        token = a + n
        break
      }
      if (a === 'CN') {
        const cls = parseClassAt(this.s, this.pos + 2)
        if (cls !== undefined) {
          token = 'CN' + this.s.slice(this.pos + 2, cls.end)
          break
        }
      }
      token = a
      break
    }
    if (token === undefined) {
      // "Fe-1" and friends are handled above; WR width suffixes "-w", "-s".
      if ((this.startsWith('-w') || this.startsWith('-s')) && value.kind === 'wolf-rayet') token = this.s.slice(this.pos, this.pos + 2)
      else if (this.startsWith('m') && /^m[+-]\d/.test(this.s.slice(this.pos))) token = /^m[+-]\d+(\.\d+)?/.exec(this.s.slice(this.pos))![0]
      else token = WORD_NOTES.find((w) => this.startsWith(w))
      if (token === 'f+' && this.companionFollows(this.pos + 2)) token = 'f'
    }
    if (token === undefined) return false
    this.pos += token.length
    // Wrap each note in its own parentheses/brackets, as written.
    let text = this.wrap(token, from, this.pos)
    if (this.takeUncertainMark()) text += ':'
    value.peculiarities.push(text)
    return true
  }
}

interface ClassRead {
  text: string
  code: number
  range?: readonly [number, number]
  end: number
}

/** Reads one luminosity class ("Iab", "IIIb", "Ia+", "0") at `at`. */
function readOneClass(s: string, at: number, previousRoman?: string): { text: string; code: number; end: number } | undefined {
  let roman = /^(VIII|VII|VI|IV|V|III|II|I|0)/.exec(s.slice(at))?.[0]
  let i = at
  if (roman === undefined) {
    // Abbreviated second end: "Ia/ab", "Iab/b", "IIIa/b".
    if (previousRoman === undefined || !/^(ab|a|b)/.test(s.slice(at))) return undefined
    roman = previousRoman
  } else i += roman.length
  let sub = ''
  if (roman !== '0') {
    if (s.startsWith('ab', i)) sub = 'ab'
    else if (s.startsWith('a', i)) sub = 'a'
    else if (s.startsWith('b', i)) sub = 'b'
  }
  i += sub.length
  if (i === at) return undefined
  let text = roman + sub
  // Ia+ and Ia0, the hypergiants.
  if (roman === 'I' && sub === 'a' && (s[i] === '+' || s[i] === '0')) {
    text = 'Ia+'
    i++
  }
  // "II++B6": a '+' after the class, then the companion.
  if (s[i] === '+' && s[i + 1] === '+' && text !== 'Ia+') {
    text += '+'
    i++
  }
  // Keenan's "a little more/less luminous" after a class: keep it in the text.
  if (s[i] === '-' && roman !== '0' && !/^-(VIII|VII|VI|IV|V|III|II|I|0|ab|a|b)/.test(s.slice(i)) && !/^-[0-9]/.test(s.slice(i)) && (s[i + 1] === undefined || /[:?+]/.test(s[i + 1]!))) {
    text += '-'
    i++
  }
  return { text, code: classCodeFor(roman, sub, text), end: i }
}

function classCodeFor(roman: string, sub: string, text: string): number {
  if (text.startsWith('Ia+')) return 0.5
  if (roman === 'I') return sub === 'a' ? 1 : sub === 'ab' ? 1.5 : sub === 'b' ? 2 : 1.5
  const base = ROMAN_CODE[roman]!
  return base + (sub === 'a' ? -0.25 : sub === 'b' ? 0.25 : 0)
}

function parseClassAt(s: string, at: number): ClassRead | undefined {
  const first = readOneClass(s, at)
  if (first === undefined) return undefined
  const ends = [first]
  let end = first.end
  let text = first.text
  for (;;) {
    const sep = s[end]
    if (sep !== '/' && sep !== '-') break
    const prevRoman = /^(VIII|VII|VI|IV|V|III|II|I|0)/.exec(ends[ends.length - 1]!.text)?.[0]
    const next = readOneClass(s, end + 1, prevRoman)
    if (next === undefined) break
    ends.push(next)
    text += sep + next.text
    end = next.end
  }
  if (ends.length === 1) return { text, code: first.code, end }
  const codes = ends.map((e) => e.code)
  const code = (codes[0]! + codes[codes.length - 1]!) / 2
  return { text, code, range: [Math.min(...codes), Math.max(...codes)], end }
}

// ---------------------------------------------------------------------------------------------
// Formatting
// ---------------------------------------------------------------------------------------------

function formatPoint(p: TypePoint, previousLetter: string | undefined): string {
  const letter = previousLetter === p.letter && p.subtype !== undefined ? '' : p.letter
  return letter + (p.subtype === undefined ? '' : formatNumber(p.subtype)) + (p.shift ?? '')
}

/** Canonical text of a type expression ("G8/K0", "B2-5", "C5,4", "S4/2"). */
export function formatTypeExpr(expr: TypeExpr): string {
  let out = ''
  expr.points.forEach((p, i) => {
    const prev = i === 0 ? undefined : expr.points[i - 1]
    const sameLetterShort = prev !== undefined && prev.letter === p.letter && prev.subtype !== undefined
    out += (i === 0 ? '' : expr.separators[i - 1]!) + formatPoint(p, sameLetterShort ? prev.letter : undefined)
  })
  if (expr.index !== undefined) out += (expr.indexSeparator ?? ',') + expr.index
  return out
}

function isWordNote(note: string): boolean {
  return !/[0-9]/.test(note) && !note.startsWith('CN')
}

/**
 * Writes a structured value back as canonical text: type, a space, the luminosity class, then the
 * line types and notes ("K1.5 IIIb", "B8 III", "A0 V", "kA2hA5 V mA7", "G8 III Ba0.5", "A0 V + G5 III").
 * `formatMK(parseMK(s).value)` parses back to the same value.
 */
export function formatMK(value: MKValue): string {
  let out = formatComponent(value)
  for (const c of value.composite ?? []) out += ' + ' + formatComponent(c)
  return out
}

function formatComponent(v: MKValue): string {
  const parts: string[] = []
  let head = ''
  if (v.prefix !== undefined) head += v.prefix + (v.uncertain.prefix ? ':' : '')
  const cls = v.luminosityClass === undefined ? undefined : v.luminosityClass + (v.uncertain.class ? ':' : '')
  if (v.typeSource === undefined) {
    head += (v.cnType !== undefined ? v.letter + v.cnType + formatTypeExpr(v.type).slice(v.letter.length) : formatTypeExpr(v.type)) + (v.uncertain.type ? ':' : '')
    parts.push(head)
    if (cls !== undefined) parts.push(cls)
    let lt = ''
    for (const l of v.lineTypes) lt += formatLineType(l)
    if (lt !== '') parts.push(lt)
  } else {
    // Types from metallic-line notation: the star's class goes after the line type it followed.
    const sourceIndex = v.lineTypes.findIndex((l) => l.feature === v.typeSource)
    let lt = head
    v.lineTypes.forEach((l, i) => {
      lt += formatLineType(l)
      if (i === sourceIndex && cls !== undefined) lt += ' ' + cls + ' '
    })
    parts.push(lt.trim())
  }
  let notes = ''
  for (const n of v.peculiarities) notes += isWordNote(n) ? n : ` ${n} `
  notes = notes.trim().replace(/\s+/g, ' ')
  if (notes !== '') parts.push(notes)
  return parts.join(' ')
}

function formatLineType(l: LineType): string {
  return l.feature + formatTypeExpr(l.type) + (l.uncertain ? ':' : '') + (l.luminosityClass === undefined ? '' : ' ' + l.luminosityClass + ' ')
}
