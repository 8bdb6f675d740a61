/**
 * How a suggestion is scored against a published classification, and the tables of the accuracy
 * benchmark. Shared by bench/accuracy.ts and the accuracy gate in tests/unit.
 */

/** One classified star: the published values and what the pipeline suggested. */
export interface Scored {
  /** Published type code (O0 = 0 … M0 = 60) and class code (Ia = 1 … V = 6; intermediate classes the mean). */
  truthType: number
  truthClass: number
  /** Class codes the published class spans: [4, 4] for III, [5, 6] for IV-V. */
  truthClassRange: [number, number]
  type: number
  classCode: number
  /** Quoted 1σ uncertainties. */
  sigmaType: number
  sigmaClass: number
  flags: string[]
}

/**
 * The class codes a suggested or published class spans: an intermediate class (a half code such as
 * 5.5 for IV-V) spans both neighbours; Iab (1.5) is a class of its own, and Keenan's subclasses
 * (IIIa = 3.75, IIIb = 4.25) belong to their class.
 */
export function classSpan(code: number): [number, number] {
  if (code === 1.5) return [1.5, 1.5]
  if (Math.abs(code - Math.floor(code) - 0.5) < 1e-9) return [code - 0.5, code + 0.5]
  return [Math.round(code), Math.round(code)]
}

/**
 * Exact class: the suggested class, or one end of a suggested intermediate class, is the published
 * one, or one end of a published intermediate class. "IV-V" suggested for a published V counts, as
 * does V suggested for a published IV-V.
 */
export function exactClass(s: Scored): boolean {
  const [a, b] = classSpan(s.classCode)
  const [c, d] = s.truthClassRange
  return a <= d && c <= b
}

/** Class error in classes, 0 when the spans overlap; positive when the suggestion is fainter (toward V). */
export function classError(s: Scored): number {
  const [a, b] = classSpan(s.classCode)
  const [c, d] = s.truthClassRange
  if (exactClass(s)) return 0
  return a > d ? a - d : b - c
}

export interface Figures {
  n: number
  /** Per cent of stars within ±1 and ±2 subtypes (type codes). */
  within1: number
  within2: number
  /** Per cent with the exact class, and within ±1 class. */
  exactClass: number
  within1Class: number
  /** Mean signed class error (suggested − published, classes; negative = more luminous). */
  meanClassError: number
  /** Per cent of stars whose published type lies inside the quoted ±1σ. */
  typeInSigma: number
  /** Median |Δ type|, subtypes. */
  medianTypeError: number
}

const pct = (k: number, n: number) => (n === 0 ? Number.NaN : Math.round((1000 * k) / n) / 10)

export function figures(rows: readonly Scored[]): Figures {
  const n = rows.length
  const dt = rows.map((r) => Math.abs(r.type - r.truthType)).sort((a, b) => a - b)
  return {
    n,
    within1: pct(rows.filter((r) => Math.abs(r.type - r.truthType) <= 1).length, n),
    within2: pct(rows.filter((r) => Math.abs(r.type - r.truthType) <= 2).length, n),
    exactClass: pct(rows.filter(exactClass).length, n),
    within1Class: pct(rows.filter((r) => Math.abs(classError(r)) <= 1).length, n),
    meanClassError: n === 0 ? Number.NaN : Math.round((100 * rows.reduce((a, r) => a + classError(r), 0)) / n) / 100,
    typeInSigma: pct(rows.filter((r) => Math.abs(r.type - r.truthType) <= r.sigmaType).length, n),
    medianTypeError: n === 0 ? Number.NaN : dt[n >> 1]!,
  }
}

export const TYPE_GROUPS = [
  { name: 'OB', test: (t: number) => t < 20 },
  { name: 'AF', test: (t: number) => t >= 20 && t < 40 },
  { name: 'GK', test: (t: number) => t >= 40 && t < 60 },
  { name: 'M', test: (t: number) => t >= 60 },
] as const

export const CLASS_GROUPS = [
  { name: 'I', test: (c: number) => c < 2.75 },
  { name: 'II–III', test: (c: number) => c >= 2.75 && c < 4.75 },
  { name: 'IV–V', test: (c: number) => c >= 4.75 },
] as const

const cell = (v: number, width: number, digits = 1) => (Number.isFinite(v) ? v.toFixed(digits) : '–').padStart(width)

/** The per-group table: one row per type group × class group, then per type group, then all. */
export function groupTable(rows: readonly Scored[]): string {
  const lines = ['group            n   ±1 sub   ±2 sub   exact cl   ±1 cl   mean Δcl   in ±1σ']
  const line = (name: string, sel: readonly Scored[]) => {
    const f = figures(sel)
    lines.push(
      `${name.padEnd(13)}${String(f.n).padStart(4)}${cell(f.within1, 9)}${cell(f.within2, 9)}${cell(f.exactClass, 11)}${cell(f.within1Class, 8)}${cell(f.meanClassError, 11, 2)}${cell(f.typeInSigma, 9)}`,
    )
  }
  for (const tg of TYPE_GROUPS) {
    for (const cg of CLASS_GROUPS) {
      const sel = rows.filter((r) => tg.test(r.truthType) && cg.test(r.truthClass))
      if (sel.length > 0) line(`${tg.name} ${cg.name}`, sel)
    }
  }
  for (const tg of TYPE_GROUPS) {
    const sel = rows.filter((r) => tg.test(r.truthType))
    if (sel.length > 0) line(`${tg.name} all`, sel)
  }
  line('all', rows)
  return lines.join('\n')
}
