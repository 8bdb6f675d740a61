import { createHash } from 'node:crypto'
import { ConnectionError, Op, QueryTypes } from 'sequelize'
import { agreementFraction, classAgreementFraction, classesAgree, codesWithin, cohenKappa, fleissKappa, reconcileClasses, weightedKappaOfCounts, confusionMatrix } from '../../shared/agreement'
import { LUMINOSITY_CLASSES, MK_LETTERS } from '../../shared/mk'
import { notFound } from '../lib/http-error'
import { onPooledConnection } from '../db/execute'
import { sqlTime } from '../lib/sql-time'
import { Campaign, Instrument, LibraryVersion, ReviewCall, User } from '../models'
import type {
  AccuracyFigures,
  AgreementFigures,
  AuditFigures,
  AuditQuery,
  AuditReport,
  BlindFigures,
  ClassifierFigures,
  ConfusionMatrix,
  Figure,
  GroupFigures,
  InstrumentAccuracy,
  MatrixCell,
  PairFigures,
  RaterRef,
  SuggestionAccuracy,
  VersionAccuracy,
} from '../../shared/api/audit'

export type { AgreementFigures, AuditFigures, AuditReport, BlindFigures, ClassifierFigures, ConfusionMatrix, Figure, GroupFigures, MatrixCell, PairFigures, RaterRef, SuggestionAccuracy }

// ---------------------------------------------------------------------------------------------
// Inputs: plain rows, so the figures can be computed (and tested) without a database.
// ---------------------------------------------------------------------------------------------

/** A classifier's standing call on one spectrum (the latest of their call and its corrections). */
export interface AuditCall {
  spectrumId: number
  classifierId: number
  classifierName: string
  typeCode: number
  classCode: number
  at: Date
  secondsSpent: number | null
  suggestionShown: boolean
  acceptedSuggestion: boolean
}

/** What the audit knows about one spectrum besides its calls. */
export interface AuditSpectrum {
  spectrumId: number
  /** The suggestion the classifiers saw (or the current one), with its standards-library version. */
  suggestion: { typeCode: number; classCode: number; libraryVersion: string } | null
  /** The decided classification, when there is one. */
  decision: { typeCode: number; classCode: number } | null
}

/** Below this many items a figure is marked `smallSample`. */
export const SMALL_SAMPLE = 10

// ---------------------------------------------------------------------------------------------
// Pure figures
// ---------------------------------------------------------------------------------------------

/** A figure with its sample size; NaN and ±∞ become null. */
export function figure(value: number | null, n: number): Figure {
  return { value: value === null || !Number.isFinite(value) ? null : value, n, smallSample: n < SMALL_SAMPLE }
}

const safe = (n: number, f: () => number) => figure(n === 0 ? null : f(), n)

/** The ISO 8601 week of a UTC time, "YYYY-Www" (weeks start on Monday; week 1 holds the year's first Thursday). */
export function isoWeek(date: Date): string {
  const d = new Date(Date.UTC(date.getUTCFullYear(), date.getUTCMonth(), date.getUTCDate()))
  const day = d.getUTCDay() || 7
  d.setUTCDate(d.getUTCDate() + 4 - day)
  const yearStart = Date.UTC(d.getUTCFullYear(), 0, 1)
  const week = Math.ceil(((d.getTime() - yearStart) / 86_400_000 + 1) / 7)
  return `${d.getUTCFullYear()}-W${String(week).padStart(2, '0')}`
}

const weeksByDay = new Map<number, string>()
/** isoWeek, worked out once per UTC day: an audit asks it for every call. */
function weekOf(date: Date): string {
  const day = Math.floor(date.getTime() / 86_400_000)
  let week = weeksByDay.get(day)
  if (week === undefined) {
    week = isoWeek(date)
    if (weeksByDay.size > 100_000) weeksByDay.clear()
    weeksByDay.set(day, week)
  }
  return week
}

/**
 * The categories of the numeric type scale between the lowest and highest code: every half subtype,
 * plus any finer value used, so that weighted κ counts an unused subtype as a step (Cohen 1968 weights
 * by category rank).
 */
export function typeScale(values: readonly number[]): number[] {
  if (values.length === 0) return []
  // A loop, not Math.min(...values): spreading 100 000 calls overflows the call stack.
  let min = Infinity
  let max = -Infinity
  for (const v of values) {
    if (v < min) min = v
    if (v > max) max = v
  }
  const lo = Math.floor(min * 2) / 2
  const hi = Math.ceil(max * 2) / 2
  const set = new Set<number>()
  for (let v = lo; v <= hi + 1e-9; v += 0.5) set.add(Math.round(v * 2) / 2)
  for (const v of values) set.add(v)
  return [...set].sort((a, b) => a - b)
}

/** Exact and ±1 agreement, κ for class, and weighted κ for type, of two aligned rating lists. */
export function agreementFigures(a: { type: number[]; cls: number[] }, b: { type: number[]; cls: number[] }): AgreementFigures {
  const n = a.type.length
  let counts: number[][] | null = null
  // Counted once for both weightings, on the scale of both raters' types.
  const typeCounts = () => (counts ??= confusionMatrix(a.type, b.type, { categories: typeScale(a.type.concat(b.type)) }).counts)
  return {
    n,
    exactType: safe(n, () => agreementFraction(a.type, b.type, 0)),
    withinOneSubtype: safe(n, () => agreementFraction(a.type, b.type, 1)),
    // As the per-version accuracy and the benchmark read classes: IV-V agrees with IV and with V.
    exactClass: safe(n, () => classAgreementFraction(a.cls, b.cls)),
    withinOneClass: safe(n, () => agreementFraction(a.cls, b.cls, 1)),
    // Read the same way: a pair such as IV-V and V is one category for κ.
    kappaClass: safe(n, () => {
      const r = reconcileClasses(a.cls, b.cls)
      return cohenKappa(r.a, r.b)
    }),
    weightedKappaTypeLinear: safe(n, () => weightedKappaOfCounts(typeCounts(), 'linear')),
    weightedKappaTypeQuadratic: safe(n, () => weightedKappaOfCounts(typeCounts(), 'quadratic')),
  }
}

function median(values: number[]): number {
  // A typed array sorts numerically without a comparator call per step (tens of thousands of times per audit).
  const s = Float64Array.from(values).sort()
  const m = s.length >> 1
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2
}

/** The consensus of a spectrum: its decided classification, else the median of two or more calls. */
export function consensusOf(spectrum: AuditSpectrum | undefined, calls: AuditCall[]): { typeCode: number; classCode: number } | null {
  if (spectrum?.decision) return spectrum.decision
  if (calls.length < 2) return null
  return { typeCode: median(calls.map((c) => c.typeCode)), classCode: median(calls.map((c) => c.classCode)) }
}

const letterOf = (code: number) => MK_LETTERS[Math.min(MK_LETTERS.length - 1, Math.max(0, Math.floor(code / 10)))]!.letter
const classLabels = new Map<number, string>()
/** The nearest luminosity class; a handful of codes recur over every call, so each is worked out once. */
const classLabel = (code: number) => {
  const known = classLabels.get(code)
  if (known !== undefined) return known
  let best = LUMINOSITY_CLASSES[0]!
  for (const c of LUMINOSITY_CLASSES) if (Math.abs(c.code - code) < Math.abs(best.code - code)) best = c
  classLabels.set(code, best.text)
  return best.text
}

/** Distinct values of a list of ids, ascending. */
function distinctSorted(ids: readonly number[]): number[] {
  const sorted = Float64Array.from(ids).sort()
  const out: number[] = []
  for (let i = 0; i < sorted.length; i++) if (i === 0 || sorted[i] !== sorted[i - 1]) out.push(sorted[i]!)
  return out
}

/** A confusion matrix of labels in a fixed order, counted pair by pair, keeping the spectrum ids behind each cell. */
class MatrixTally {
  private readonly index: Map<string, number>
  // One flat list of ids per cell of the full order; a spectrum called alike by two people counts twice but is listed once.
  private readonly ids: number[][]
  private n = 0

  constructor(private readonly order: readonly string[]) {
    this.index = new Map(order.map((l, i) => [l, i]))
    this.ids = Array.from({ length: order.length * order.length }, (): number[] => [])
  }

  add(row: string, column: string, spectrumId: number): void {
    this.ids[this.index.get(row)! * this.order.length + this.index.get(column)!]!.push(spectrumId)
    this.n++
  }

  matrix(rowsAre: string, columnsAre: string): ConfusionMatrix {
    const k = this.order.length
    const used = this.order.map((_, i) => {
      for (let j = 0; j < k; j++) if (this.ids[i * k + j]!.length > 0 || this.ids[j * k + i]!.length > 0) return true
      return false
    })
    const at = this.order.map((_, i) => i).filter((i) => used[i])
    const cells = at.map((r) => at.map((c): MatrixCell => ({ count: this.ids[r * k + c]!.length, spectrumIds: distinctSorted(this.ids[r * k + c]!) })))
    return { rowsAre, columnsAre, labels: at.map((i) => this.order[i]!), cells, n: this.n }
  }
}

const LETTER_ORDER = MK_LETTERS.map((l) => l.letter)
const CLASS_ORDER = LUMINOSITY_CLASSES.map((c) => c.text)

/** The type-letter and luminosity-class matrices of one rater against another. */
class TypeAndClassTally {
  private readonly type = new MatrixTally(LETTER_ORDER)
  private readonly cls = new MatrixTally(CLASS_ORDER)

  add(a: Codes, b: Codes, spectrumId: number): void {
    this.type.add(letterOf(a.typeCode), letterOf(b.typeCode), spectrumId)
    this.cls.add(classLabel(a.classCode), classLabel(b.classCode), spectrumId)
  }

  matrices(rowsAre: string, columnsAre: string) {
    return {
      type: this.type.matrix(`${rowsAre} (type letter)`, `${columnsAre} (type letter)`),
      class: this.cls.matrix(`${rowsAre} (luminosity class)`, `${columnsAre} (luminosity class)`),
    }
  }
}

interface Codes {
  typeCode: number
  classCode: number
}

/** Exact and ±1 agreement of type and class, counted pair by pair (no arrays: audits add up hundreds of thousands). */
class AgreementTally {
  private n = 0
  private exactType = 0
  private withinOneSubtype = 0
  private exactClass = 0
  private withinOneClass = 0

  add(a: Codes, b: Codes): void {
    this.n++
    if (codesWithin(a.typeCode, b.typeCode, 0)) this.exactType++
    if (codesWithin(a.typeCode, b.typeCode, 1)) this.withinOneSubtype++
    if (classesAgree(a.classCode, b.classCode)) this.exactClass++
    if (codesWithin(a.classCode, b.classCode, 1)) this.withinOneClass++
  }

  figures() {
    const n = this.n
    return {
      exactType: safe(n, () => this.exactType / n),
      withinOneSubtype: safe(n, () => this.withinOneSubtype / n),
      exactClass: safe(n, () => this.exactClass / n),
      withinOneClass: safe(n, () => this.withinOneClass / n),
    }
  }
}

function fractions(pairs: Iterable<{ a: Codes; b: Codes }>) {
  const tally = new AgreementTally()
  for (const { a, b } of pairs) tally.add(a, b)
  return tally.figures()
}

/**
 * Fleiss' κ (Fleiss 1971) over the spectra that more than two classifiers called. Fleiss needs the
 * same number of raters per item: the most common count m ≥ 3 among those spectra is used (the
 * larger on a tie), with the first m calls of every spectrum that has at least m.
 */
export function fleissFigures(bySpectrum: Map<number, AuditCall[]>): AuditFigures['fleiss'] {
  const counts = new Map<number, number>()
  for (const calls of bySpectrum.values()) if (calls.length >= 3) counts.set(calls.length, (counts.get(calls.length) ?? 0) + 1)
  if (counts.size === 0) return { type: figure(null, 0), class: figure(null, 0), ratersPerItem: null }
  const m = [...counts.entries()].sort((x, y) => y[1] - x[1] || y[0] - x[0])[0]![0]
  const items = [...bySpectrum.values()].filter((c) => c.length >= m).map((c) => [...c].sort((x, y) => x.at.getTime() - y.at.getTime()).slice(0, m))
  const table = (values: number[][]) => {
    const cats = [...new Set(values.flat())].sort((x, y) => x - y)
    return values.map((v) => cats.map((c) => v.filter((x) => x === c).length))
  }
  const n = items.length
  return {
    type: figure(fleissKappa(table(items.map((c) => c.map((x) => x.typeCode)))), n),
    class: figure(fleissKappa(table(items.map((c) => c.map((x) => x.classCode)))), n),
    ratersPerItem: m,
  }
}

/**
 * Every agreement figure of the audit from standing calls and what is known of their spectra:
 * pairs of classifiers and each classifier against the suggestion (exact and ±1 agreement, κ,
 * weighted κ), Fleiss' κ, offsets from the consensus, median time per call, confusion matrices
 * with the spectra behind each cell, trends per ISO week and per library version, and blind
 * versus shown calls. Every figure carries its n and a small-sample mark (n < 10).
 */
export function auditFigures(calls: readonly AuditCall[], spectra: readonly AuditSpectrum[]): AuditFigures {
  const info = new Map(spectra.map((s) => [s.spectrumId, s]))
  const bySpectrum = new Map<number, AuditCall[]>()
  for (const c of calls) {
    const list = bySpectrum.get(c.spectrumId)
    if (list) list.push(c)
    else bySpectrum.set(c.spectrumId, [c])
  }
  const people = new Map<number, string>()
  for (const c of calls) people.set(c.classifierId, c.classifierName)
  const ids = [...people.keys()].sort((a, b) => a - b)
  const rank = new Map(ids.map((id, i) => [id, i]))
  const ref = (id: number): RaterRef => ({ kind: 'classifier', id, name: people.get(id)! })
  const suggestionRef: RaterRef = { kind: 'suggestion', id: null, name: 'Suggestion' }

  // Everything is counted in one walk over the spectra, each looked up once: with a hundred thousand
  // calls, a Map lookup per call for every figure was most of the work.
  const ratings = () => ({ type: [] as number[], cls: [] as number[] })
  const pairRatings = new Map<number, { a: ReturnType<typeof ratings>; b: ReturnType<typeof ratings> }>()
  const person = ids.map(() => ({ calls: 0, judged: 0, typeOffset: 0, classOffset: 0, seconds: [] as number[], mine: ratings(), suggested: ratings() }))
  const callsVsConsensus = new TypeAndClassTally()
  const suggestionVsConsensus = new TypeAndClassTally()
  const group = () => new Map<string, { calls: number; vsConsensus: AgreementTally; vsSuggestion: AgreementTally }>()
  const byWeek = group()
  const byVersion = group()
  const addTo = (groups: ReturnType<typeof group>, key: string, c: AuditCall, agreed: Codes | null, suggested: Codes | null | undefined) => {
    let g = groups.get(key)
    if (!g) groups.set(key, (g = { calls: 0, vsConsensus: new AgreementTally(), vsSuggestion: new AgreementTally() }))
    g.calls++
    if (agreed) g.vsConsensus.add(c, agreed)
    if (suggested) g.vsSuggestion.add(c, suggested)
  }
  const shown = { calls: 0, accepted: 0, sameJudged: 0, same: 0, exactJudged: 0, exact: 0 }
  const blind = { calls: 0, accepted: 0, sameJudged: 0, same: 0, exactJudged: 0, exact: 0 }
  // Each person's standing call on the spectrum at hand (the last in the list, as a person's later call replaces the earlier).
  const latest: AuditCall[] = []

  for (const [id, list] of bySpectrum) {
    const spectrum = info.get(id)
    const agreed = consensusOf(spectrum, list)
    const suggested = spectrum?.suggestion
    if (agreed && suggested) suggestionVsConsensus.add(suggested, agreed, id)
    latest.length = 0
    for (const c of list) {
      const k = latest.findIndex((x) => x.classifierId === c.classifierId)
      if (k >= 0) latest[k] = c
      else latest.push(c)

      if (agreed) callsVsConsensus.add(c, agreed, id)
      addTo(byWeek, weekOf(c.at), c, agreed, suggested)
      if (suggested) addTo(byVersion, suggested.libraryVersion, c, agreed, suggested)
      const way = c.suggestionShown ? shown : blind
      way.calls++
      if (c.acceptedSuggestion) way.accepted++
      if (suggested) {
        way.sameJudged++
        if (Math.abs(suggested.typeCode - c.typeCode) < 1e-9 && Math.abs(suggested.classCode - c.classCode) < 1e-9) way.same++
      }
      if (agreed) {
        way.exactJudged++
        if (Math.abs(agreed.typeCode - c.typeCode) < 1e-9) way.exact++
      }
    }
    if (latest.length > 1) latest.sort((x, y) => x.classifierId - y.classifierId)
    for (let i = 0; i < latest.length; i++) {
      const c = latest[i]!
      const p = person[rank.get(c.classifierId)!]!
      p.calls++
      if (c.secondsSpent !== null) p.seconds.push(c.secondsSpent)
      if (agreed) {
        p.judged++
        p.typeOffset += c.typeCode - agreed.typeCode
        p.classOffset += c.classCode - agreed.classCode
      }
      if (suggested) {
        p.mine.type.push(c.typeCode)
        p.mine.cls.push(c.classCode)
        p.suggested.type.push(suggested.typeCode)
        p.suggested.cls.push(suggested.classCode)
      }
      for (let j = i + 1; j < latest.length; j++) {
        const d = latest[j]!
        const key = rank.get(c.classifierId)! * ids.length + rank.get(d.classifierId)!
        let pair = pairRatings.get(key)
        if (!pair) pairRatings.set(key, (pair = { a: ratings(), b: ratings() }))
        pair.a.type.push(c.typeCode)
        pair.a.cls.push(c.classCode)
        pair.b.type.push(d.typeCode)
        pair.b.cls.push(d.classCode)
      }
    }
  }

  const pairs: PairFigures[] = []
  for (let i = 0; i < ids.length; i++) {
    for (let j = i + 1; j < ids.length; j++) {
      const r = pairRatings.get(i * ids.length + j) ?? { a: ratings(), b: ratings() }
      pairs.push({ a: ref(ids[i]!), b: ref(ids[j]!), ...agreementFigures(r.a, r.b) })
    }
  }
  const vsSuggestion: PairFigures[] = ids.map((id, i) => ({ a: ref(id), b: suggestionRef, ...agreementFigures(person[i]!.mine, person[i]!.suggested) }))
  const classifiers: ClassifierFigures[] = ids.map((id, i) => {
    const p = person[i]!
    return {
      id,
      name: people.get(id)!,
      calls: p.calls,
      typeOffset: safe(p.judged, () => p.typeOffset / p.judged),
      classOffset: safe(p.judged, () => p.classOffset / p.judged),
      medianSecondsPerCall: safe(p.seconds.length, () => median(p.seconds)),
    }
  })
  const groupFigures = (groups: ReturnType<typeof group>): GroupFigures[] =>
    [...groups.entries()]
      .sort((x, y) => (x[0] < y[0] ? -1 : x[0] > y[0] ? 1 : 0))
      .map(([key, g]) => ({ key, calls: g.calls, vsConsensus: g.vsConsensus.figures(), vsSuggestion: g.vsSuggestion.figures() }))
  const share = (yes: number, judged: number) => safe(judged, () => yes / judged)

  return {
    spectra: bySpectrum.size,
    calls: calls.length,
    classifiers,
    pairs,
    vsSuggestion,
    fleiss: fleissFigures(bySpectrum),
    confusion: {
      callsVsConsensus: callsVsConsensus.matrices('call', 'consensus'),
      suggestionVsConsensus: suggestionVsConsensus.matrices('suggestion', 'consensus'),
    },
    byWeek: groupFigures(byWeek),
    byLibraryVersion: groupFigures(byVersion),
    blind: {
      shown: {
        calls: shown.calls,
        acceptedSuggestion: share(shown.accepted, shown.calls),
        agreeWithSuggestion: share(shown.same, shown.sameJudged),
        exactTypeVsConsensus: share(shown.exact, shown.exactJudged),
      },
      blind: { calls: blind.calls, agreeWithSuggestion: share(blind.same, blind.sameJudged), exactTypeVsConsensus: share(blind.exact, blind.exactJudged) },
    },
    notes: [
      `Figures with fewer than ${SMALL_SAMPLE} items are marked smallSample.`,
      "Each classifier's standing call counts: the latest of a call and its corrections.",
      'The consensus is the decided classification, or the median of two or more calls when none is decided yet.',
      'Weighted κ uses the numeric type scale in half-subtype steps (Cohen 1968 weights by category rank).',
      'κ is null when both raters used a single category.',
      'Exact class: the same class, or an intermediate class (such as IV-V) and one of its ends.',
    ],
  }
}

/** One suggestion of a decided spectrum, to be scored against the decision. */
export interface AccuracyItem {
  spectrumId: number
  /** The spectrum's instrument (null: none). */
  instrument: { id: number | null; name: string }
  version: { id: number; name: string; publishedAt: Date | null }
  madeAt: Date
  suggestion: { typeCode: number; classCode: number }
  decision: { typeCode: number; classCode: number }
  /** Share of the type vote from the instrument's own standards, when the suggestion says. */
  ownShare: number | null
}

function accuracyFigures(items: readonly AccuracyItem[]): AccuracyFigures {
  const n = items.length
  const shares = items.map((i) => i.ownShare).filter((s): s is number => s !== null)
  return {
    n,
    ...fractions(items.map((i) => ({ a: i.suggestion, b: i.decision }))),
    ownShare: safe(shares.length, () => shares.reduce((a, b) => a + b, 0) / shares.length),
  }
}

/**
 * Suggestions scored against the decided classifications, for each instrument (spectra of none
 * together): per library version in the order they were published, with the change from the
 * previous version in points, and per ISO week the suggestions were made. Each spectrum counts
 * once per version (its latest suggestion from that version), so a campaign suggested again after
 * a new version shows both on the same spectra.
 */
export function suggestionAccuracy(items: readonly AccuracyItem[]): SuggestionAccuracy {
  const byInstrument = new Map<string, AccuracyItem[]>()
  for (const item of items) {
    const key = String(item.instrument.id)
    const list = byInstrument.get(key)
    if (list) list.push(item)
    else byInstrument.set(key, [item])
  }
  const instruments: InstrumentAccuracy[] = [...byInstrument.values()]
    .map((list) => {
      const versions = new Map<number, AccuracyItem[]>()
      for (const i of list) {
        const group = versions.get(i.version.id)
        if (group) group.push(i)
        else versions.set(i.version.id, [i])
      }
      const ordered = [...versions.values()].sort((a, b) => (a[0]!.version.publishedAt?.getTime() ?? 0) - (b[0]!.version.publishedAt?.getTime() ?? 0) || a[0]!.version.id - b[0]!.version.id)
      let previous: AccuracyFigures | null = null
      const perVersion: VersionAccuracy[] = ordered.map((group) => {
        const f = accuracyFigures(group)
        const v = group[0]!.version
        const delta = (a: Figure, b: Figure | undefined) => (a.value === null || !b || b.value === null ? null : Math.round(1000 * (a.value - b.value)) / 10)
        const out: VersionAccuracy = {
          ...f,
          version: { id: v.id, name: v.name, publishedAt: v.publishedAt?.toISOString() ?? null },
          change: { withinOneSubtype: delta(f.withinOneSubtype, previous?.withinOneSubtype), exactClass: delta(f.exactClass, previous?.exactClass) },
        }
        previous = f
        return out
      })
      const weeks = new Map<string, AccuracyItem[]>()
      for (const i of list) {
        const week = weekOf(i.madeAt)
        const group = weeks.get(week)
        if (group) group.push(i)
        else weeks.set(week, [i])
      }
      const byWeek = [...weeks.entries()]
        .sort((a, b) => (a[0] < b[0] ? -1 : a[0] > b[0] ? 1 : 0))
        .map(([week, group]) => ({ week, versions: [...new Set(group.map((i) => i.version.name))], ...accuracyFigures(group) }))
      return { instrument: list[0]!.instrument, versions: perVersion, byWeek }
    })
    .sort((a, b) => (a.instrument.id === null ? 1 : b.instrument.id === null ? -1 : a.instrument.name.localeCompare(b.instrument.name)))
  return {
    instruments,
    notes: [
      'Each decided spectrum counts once per library version: its latest suggestion from that version, against its decided classification.',
      "A spectrum is left out of a version's figures when it is itself one of that version's standards (it would be matched against itself).",
      "Own share: the part of the type vote that came from the instrument's own standards (promoted from its agreed spectra).",
      'Exact class: the same class, or an intermediate class (such as IV-V) and one of its ends.',
    ],
  }
}

// ---------------------------------------------------------------------------------------------
// Loading
// ---------------------------------------------------------------------------------------------

type Decisions = Map<number, { typeCode: number; classCode: number }>

/**
 * A DATETIME column as microseconds since 1970 (the stored UTC text, no time zone involved): the
 * driver's date parsing of a hundred thousand rows costs more than the rest of the reading.
 */
const microseconds = (column: string) => `TIMESTAMPDIFF(MICROSECOND, '1970-01-01 00:00:00', ${column})`
const dateOf = (us: number | bigint) => new Date(Number(us) / 1000)

/**
 * Plain rows straight from the driver, without the ORM's conversion of every field (it more than
 * doubles the cost of reading a hundred thousand rows). Only numbers and text are read this way:
 * times come as microseconds and go in as UTC text, so no date handling is involved.
 */
async function rows<T>(sql: string, values: Record<string, Date | number | null>): Promise<T[]> {
  const plain = Object.fromEntries(Object.entries(values).map(([k, v]) => [k, v instanceof Date ? sqlTime(v) : v]))
  return onPooledConnection(ReviewCall.sequelize!, async (connection) => (await connection.query({ sql, namedPlaceholders: true, typeCast: undefined }, plain)) as T[])
}

let packetLimit: Promise<number> | null = null

/**
 * Numeric rows read as one text per query: the server joins each row's numbers with commas and
 * the rows into one JSON array, which JSON.parse reads at once. Decoding a hundred thousand rows
 * one at a time in the driver took most of a cold audit; this takes a fraction of it. Each row is
 * the values of `columns` (numeric SQL expressions; NULL comes back as null) in their order; `from`
 * is the FROM … WHERE … text. Rows come in no particular order. A result too long for one packet
 * (max_allowed_packet) is read again in parts, split by the first column.
 */
export async function numericRows(
  columns: readonly string[],
  from: string,
  values: Record<string, Date | number | null>,
  /** The longest text read at once; by default what fits in one packet. */
  maxText?: number,
): Promise<Array<Array<number | null>>> {
  const joined = columns.map((c) => `IFNULL(${c}, 'null')`).join(', ')
  // Room for the rest of the reply beside the text.
  const limit = maxText ?? (await (packetLimit ??= rows<{ p: number | bigint }>('SELECT @@max_allowed_packet AS p', {}).then(([r]) => Number(r!.p) - 4096)))
  for (let parts = 1; parts <= 1 << 16; parts *= 4) {
    const out: Array<Array<number | null>> = []
    let whole = true
    for (let part = 0; part < parts && whole; part++) {
      const [r] = await rows<{ j: string | null; n: number | bigint }>(
        `SET STATEMENT group_concat_max_len = ${limit} FOR
         SELECT GROUP_CONCAT(CONCAT_WS(',', ${joined}) SEPARATOR '],[') AS j, COUNT(*) AS n ${from}
         ${parts > 1 ? `AND MOD(${columns[0]}, ${parts}) = ${part}` : ''}`,
        values,
      )
      const n = Number(r?.n ?? 0)
      if (n === 0) continue
      // A text cut at the length limit parses to fewer rows than were counted, or not at all.
      const list = r!.j !== null && r!.j.length < limit ? (JSON.parse(`[[${r!.j}]]`) as Array<Array<number | null>>) : []
      if (list.length !== n) whole = false
      else if (parts === 1) return list
      else for (const row of list) out.push(row)
    }
    if (whole) return out
  }
  throw new Error('the rows do not fit in the packets the database allows')
}

/** Rows in ascending order of their first value (an id). */
const byId = <T extends Array<number | null>>(list: T[]) => list.sort((a, b) => a[0]! - b[0]!)

/** The decided classification of each of the campaign's spectra: the latest row. */
async function loadDecisions(campaignId: number): Promise<Decisions> {
  const decided = byId(
    await numericRows(['c.id', 'c.spectrum_id', 'c.type_code', 'c.class_code'], 'FROM classifications c JOIN spectra sp ON sp.id = c.spectrum_id WHERE sp.campaign_id = :campaign', {
      campaign: campaignId,
    }),
  )
  const latest: Decisions = new Map()
  for (const [, spectrumId, typeCode, classCode] of decided) latest.set(spectrumId!, { typeCode: typeCode!, classCode: classCode! })
  return latest
}

/**
 * The suggestions of the campaign's decided spectra made in the range, as AccuracyItems: read by
 * campaign in one joined query (no id lists), only the columns the figures use.
 */
async function accuracyItems(campaignId: number, range: { from?: Date | undefined; to?: Date | undefined }, decisions: Promise<Decisions>): Promise<AccuracyItem[]> {
  const r = { campaign: campaignId, from: range.from ?? null, to: range.to ?? null }
  const [decision, suggestions, selfStandards] = await Promise.all([
    decisions,
    // suggestions_audit (migration 0031) covers every column read here, the share included.
    numericRows(
      ['sg.id', 'sg.spectrum_id', 'sg.library_version_id', 'sg.type_code', 'sg.class_code', microseconds('sg.created_at'), 'sg.own_share', 'sp.instrument_id'],
      `FROM suggestions sg JOIN spectra sp ON sp.id = sg.spectrum_id
       WHERE sp.campaign_id = :campaign AND EXISTS (SELECT 1 FROM classifications c WHERE c.spectrum_id = sg.spectrum_id)
         ${range.from ? 'AND sg.created_at >= :from' : ''} ${range.to ? 'AND sg.created_at < :to' : ''}`,
      r,
    ).then((list) =>
      byId(list).map(([, spectrum_id, library_version_id, type_code, class_code, created_us, own_share, instrument_id]) => ({
        spectrum_id: spectrum_id!,
        library_version_id: library_version_id!,
        type_code: type_code!,
        class_code: class_code!,
        created_us: created_us!,
        own_share: own_share ?? null,
        instrument_id: instrument_id ?? null,
      })),
    ),
    rows<{ spectrum_id: number; version_id: number }>(
      `SELECT st.spectrum_id, l.version_id FROM standards st JOIN spectra sp ON sp.id = st.spectrum_id
       JOIN library_version_standards l ON l.standard_id = st.id
       WHERE sp.campaign_id = :campaign AND EXISTS (SELECT 1 FROM classifications c WHERE c.spectrum_id = st.spectrum_id)`,
      r,
    ),
  ])
  if (decision.size === 0) return []
  // The latest suggestion of each spectrum and version, in the order the pairs first appear.
  const latest = new Map<string, (typeof suggestions)[number]>()
  for (const s of suggestions) latest.set(`${s.spectrum_id}|${s.library_version_id}`, s)
  const versionIds = [...new Set(suggestions.map((s) => Number(s.library_version_id)))]
  const instrumentIds = [
    ...new Set(
      suggestions
        .map((s) => s.instrument_id)
        .filter((i): i is number => i !== null)
        .map(Number),
    ),
  ]
  const [versions, instruments] = await Promise.all([
    LibraryVersion.findAll({ where: { id: { [Op.in]: versionIds.length ? versionIds : [0] } }, attributes: ['id', 'name', 'publishedAt'] }),
    instrumentIds.length ? Instrument.findAll({ where: { id: { [Op.in]: instrumentIds } }, attributes: ['id', 'name'] }) : [],
  ])
  const isOwnStandard = new Set(selfStandards.map((l) => `${l.spectrum_id}|${l.version_id}`))
  const versionOf = new Map(versions.map((v) => [v.id, v]))
  const names = new Map(instruments.map((i) => [i.id, i.name]))
  const out: AccuracyItem[] = []
  for (const [key, s] of latest) {
    if (isOwnStandard.has(key)) continue
    const spectrumId = Number(s.spectrum_id)
    const versionId = Number(s.library_version_id)
    const d = decision.get(spectrumId)!
    const v = versionOf.get(versionId)
    const instrumentId = s.instrument_id === null ? null : Number(s.instrument_id)
    const share = s.own_share
    out.push({
      spectrumId,
      instrument: { id: instrumentId, name: instrumentId === null ? 'No instrument' : (names.get(instrumentId) ?? `#${instrumentId}`) },
      version: { id: versionId, name: v?.name ?? `#${versionId}`, publishedAt: v?.publishedAt ?? null },
      madeAt: dateOf(s.created_us),
      suggestion: { typeCode: Number(s.type_code), classCode: Number(s.class_code) },
      decision: { typeCode: d.typeCode, classCode: d.classCode },
      ownShare: share === null || share === undefined ? null : Number(share),
    })
  }
  return out
}

/** The audit query as parsed: a campaign id and a half-open range of instants (shared/api/audit.ts). */
export type { AuditQuery }

/** The columns of a call row as read below, by position. */
const CALL = { id: 0, spectrum: 1, user: 2, type: 3, cls: 4, createdUs: 5, seconds: 6, shown: 7, accepted: 8, suggestion: 9, shownType: 10, shownClass: 11, shownVersion: 12 } as const
type Row = Array<number | null>

/**
 * The rows the audit needs, read by campaign through indexes (no per-spectrum lookups and no
 * dependent subqueries), as plain AuditCall and AuditSpectrum values. Each call row brings the
 * suggestion it names; the current suggestion is read only for spectra whose calls name none.
 */
export async function loadAuditInputs(query: AuditQuery, decisions?: Promise<Decisions>): Promise<{ calls: AuditCall[]; spectra: AuditSpectrum[] }> {
  const r = { campaign: query.campaignId, from: query.from ?? null, to: query.to ?? null }
  const [all, users, versions, latestDecision] = await Promise.all([
    // The named suggestion is read through suggestions_audit (migration 0031), which holds every
    // column used here: by its primary key the large row itself would be read, from disk at scale.
    numericRows(
      [
        'rc.id',
        'rc.spectrum_id',
        'rc.user_id',
        'rc.type_code',
        'rc.class_code',
        microseconds('rc.created_at'),
        'rc.seconds_spent',
        'rc.suggestion_shown',
        'rc.accepted_suggestion',
        'rc.suggestion_id',
        'sg.type_code',
        'sg.class_code',
        'sg.library_version_id',
      ],
      `FROM review_calls rc JOIN spectra sp ON sp.id = rc.spectrum_id
       LEFT JOIN suggestions sg FORCE INDEX (suggestions_audit) ON sg.spectrum_id = rc.spectrum_id AND sg.id = rc.suggestion_id
       WHERE sp.campaign_id = :campaign ${query.from ? 'AND rc.created_at >= :from' : ''} ${query.to ? 'AND rc.created_at < :to' : ''}`,
      r,
    ).then(byId),
    User.findAll({ attributes: ['id', 'name'], raw: true }),
    LibraryVersion.findAll({ attributes: ['id', 'name'], raw: true }),
    decisions ?? loadDecisions(query.campaignId),
  ])
  // The standing call of each person on each spectrum: the latest row. Rows stay as read (arrays of
  // numbers): a hundred thousand calls copied into objects twice over kept the collector busy.
  const standing = new Map<number, Map<number, Row>>()
  for (const row of all) {
    const spectrumId = row[CALL.spectrum]!
    let people = standing.get(spectrumId)
    if (!people) standing.set(spectrumId, (people = new Map()))
    people.set(row[CALL.user]!, row)
  }
  // The suggestion the calls were made against (the first standing call that names one), else the current one.
  const shownOf = new Map<number, Row>()
  let withoutShown = false
  for (const [spectrumId, people] of standing) {
    for (const row of people.values())
      if (row[CALL.suggestion] !== null) {
        shownOf.set(spectrumId, row)
        break
      }
    if (shownOf.get(spectrumId)?.[CALL.shownType] == null) withoutShown = true
  }
  const current = new Map<number, Row>()
  if (withoutShown) {
    const currentRows = byId(
      await numericRows(
        ['sg.id', 'sg.spectrum_id', 'sg.type_code', 'sg.class_code', 'sg.library_version_id'],
        'FROM suggestions sg JOIN spectra sp ON sp.id = sg.spectrum_id WHERE sp.campaign_id = :campaign AND sg.is_current = 1',
        r,
      ),
    )
    for (const row of currentRows) current.set(row[1]!, row)
  }
  const names = new Map(users.map((u) => [u.id, u.name]))
  const versionName = new Map(versions.map((v) => [v.id, v.name]))

  const spectra: AuditSpectrum[] = []
  const auditCalls: AuditCall[] = []
  for (const [id, people] of standing) {
    const shown = shownOf.get(id)
    const named = shown && shown[CALL.shownType] != null
    const cur = named ? null : current.get(id)
    const typeCode = named ? shown[CALL.shownType] : cur?.[2]
    const classCode = named ? shown[CALL.shownClass] : cur?.[3]
    const versionId = named ? shown[CALL.shownVersion] : cur?.[4]
    spectra.push({
      spectrumId: id,
      suggestion: typeCode != null ? { typeCode: Number(typeCode), classCode: Number(classCode), libraryVersion: versionName.get(Number(versionId)) ?? `#${versionId}` } : null,
      decision: latestDecision.get(id) ?? null,
    })
    for (const c of people.values()) {
      const userId = c[CALL.user]!
      auditCalls.push({
        spectrumId: id,
        classifierId: userId,
        classifierName: names.get(userId) ?? `#${userId}`,
        typeCode: Number(c[CALL.type]),
        classCode: Number(c[CALL.cls]),
        at: dateOf(c[CALL.createdUs]!),
        secondsSpent: c[CALL.seconds] === null ? null : Number(c[CALL.seconds]),
        suggestionShown: Boolean(Number(c[CALL.shown])),
        acceptedSuggestion: Boolean(Number(c[CALL.accepted])),
      })
    }
  }
  return { calls: auditCalls, spectra }
}

/** A campaign as the report names it. */
export interface AuditCampaignRef {
  id: number
  code: string
  name: string
}

/** The audit report as the API sends it (`{ "audit": … }`), as JSON text. */
export async function auditReportJson(query: AuditQuery, campaign: AuditCampaignRef): Promise<string> {
  // Read once for both parts, at the same time as the rest.
  const decisions = loadDecisions(query.campaignId)
  // The figures are worked out while the database still reads the suggestions to score.
  const [figures, accuracy] = await Promise.all([loadAuditInputs(query, decisions).then(({ calls, spectra }) => auditFigures(calls, spectra)), accuracyItems(campaign.id, query, decisions)])
  const report: AuditReport = {
    campaign: { id: campaign.id, code: campaign.code, name: campaign.name },
    from: query.from?.toISOString() ?? null,
    to: query.to?.toISOString() ?? null,
    ...figures,
    suggestionAccuracy: suggestionAccuracy(accuracy),
  }
  return JSON.stringify({ audit: report })
}

/**
 * Builds the report somewhere other than the calling thread: reading tens of thousands of calls,
 * computing the figures and writing the JSON all grow with the stored data. Unset, it is built in place.
 */
export type AuditRunner = (query: AuditQuery, campaign: AuditCampaignRef) => Promise<string>
let auditRunner: AuditRunner | null = null
export function setAuditRunner(runner: AuditRunner | null): void {
  auditRunner = runner
}

/**
 * What the audit's worker thread sends back: the report, or why the database could not give it (an
 * error's class and code do not survive the way between threads).
 */
export type AuditWorkerResult = string | { databaseUnavailable: string }

/** The report from a worker's answer; a database it could not reach is thrown as such, so the API answers 503 with Retry-After. */
export function auditFromWorker(result: AuditWorkerResult): string {
  if (typeof result === 'string') return result
  throw new ConnectionError(new Error(result.databaseUnavailable))
}

/**
 * What the stored review data looks like right now: the newest call, decision and suggestion, the
 * library versions, and the names of people and instruments (only the names: every sign-in updates
 * its user's row, and must not throw the figures away). Rows are only ever added (calls, decisions
 * and suggestions are never edited), so an unchanged stamp means unchanged figures.
 */
async function dataStamp(): Promise<string> {
  const [row] = await ReviewCall.sequelize!.query<Record<string, unknown>>(
    `SELECT (SELECT MAX(id) FROM review_calls) AS calls, (SELECT MAX(id) FROM classifications) AS decisions,
            (SELECT MAX(id) FROM suggestions) AS suggestions, (SELECT COUNT(*) FROM library_versions) AS versions,
            (SELECT MD5(GROUP_CONCAT(id, ':', name ORDER BY id)) FROM users) AS people,
            (SELECT MD5(GROUP_CONCAT(id, ':', name ORDER BY id)) FROM instruments) AS instruments`,
    { type: QueryTypes.SELECT },
  )
  return JSON.stringify(row)
}

const AUDIT_CACHE_SIZE = 32
interface CachedAudit {
  stamp: string
  json: Promise<string>
  reply?: Promise<AuditReply>
}
const auditCache = new Map<string, CachedAudit>()

/** The audit as bytes to send and their entity tag (a strong one: the SHA-1 of the bytes). */
export interface AuditReply {
  body: Buffer
  etag: string
}

/**
 * The audit of one campaign over a date range, as the JSON the API sends. Reports are kept per
 * campaign, range and data stamp: asking again without a new call, decision, suggestion or library
 * version answers from memory, and leads asking at the same moment share one computation. The
 * report is built off the request thread when a runner is set (the server sets a worker thread).
 */
export async function getAuditJson(query: AuditQuery): Promise<string> {
  return (await cachedAudit(query)).json
}

/**
 * getAuditJson as the bytes the API sends, with their entity tag: both are worked out once per
 * cached report (at 100 000 spectra the report is 1.5 MB, and encoding and hashing it for every
 * request cost more than the rest of answering from the cache).
 */
export async function getAuditReply(query: AuditQuery): Promise<AuditReply> {
  const entry = await cachedAudit(query)
  entry.reply ??= entry.json.then((text) => {
    const body = Buffer.from(text)
    return { body, etag: `"${createHash('sha1').update(body).digest('base64url')}"` }
  })
  return entry.reply
}

/** The cache entry of the report asked for, made (and the report started) when there is none for the current data. */
async function cachedAudit(query: AuditQuery): Promise<CachedAudit> {
  const campaign = await Campaign.findByPk(query.campaignId, { attributes: ['id', 'code', 'name'] })
  if (!campaign) throw notFound('The campaign')
  const ref = { id: campaign.id, code: campaign.code, name: campaign.name }
  const key = JSON.stringify([ref, query.from?.toISOString() ?? null, query.to?.toISOString() ?? null])
  const stamp = await dataStamp()
  const cached = auditCache.get(key)
  if (cached && cached.stamp === stamp) return cached
  const json = auditRunner ? auditRunner(query, ref) : auditReportJson(query, ref)
  const entry: CachedAudit = { stamp, json }
  auditCache.delete(key)
  auditCache.set(key, entry)
  if (auditCache.size > AUDIT_CACHE_SIZE) auditCache.delete(auditCache.keys().next().value!)
  json.catch(() => {
    if (auditCache.get(key) === entry) auditCache.delete(key)
  })
  return entry
}

/** The audit of one campaign over a date range, from the stored calls, suggestions and decisions. */
export async function getAudit(query: AuditQuery): Promise<AuditReport> {
  return (JSON.parse(await getAuditJson(query)) as { audit: AuditReport }).audit
}
