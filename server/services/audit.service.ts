import { Op } from 'sequelize'
import { agreementFraction, cohenKappa, fleissKappa, meanOffset, weightedKappa } from '../../shared/agreement'
import { LUMINOSITY_CLASSES, MK_LETTERS } from '../../shared/mk'
import { notFound } from '../lib/http-error'
import { Campaign, Classification, LibraryVersion, ReviewCall, Spectrum, Suggestion, User } from '../models'
import type { AgreementFigures, AuditFigures, AuditQuery, AuditReport, BlindFigures, ClassifierFigures, ConfusionMatrix, Figure, GroupFigures, MatrixCell, PairFigures, RaterRef } from '../../shared/api/audit'

export type { AgreementFigures, AuditFigures, AuditReport, BlindFigures, ClassifierFigures, ConfusionMatrix, Figure, GroupFigures, MatrixCell, PairFigures, RaterRef }

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

/**
 * The categories of the numeric type scale between the lowest and highest code: every half subtype,
 * plus any finer value used, so that weighted κ counts an unused subtype as a step (Cohen 1968 weights
 * by category rank).
 */
export function typeScale(values: readonly number[]): number[] {
  if (values.length === 0) return []
  const lo = Math.floor(Math.min(...values) * 2) / 2
  const hi = Math.ceil(Math.max(...values) * 2) / 2
  const set = new Set<number>()
  for (let v = lo; v <= hi + 1e-9; v += 0.5) set.add(Math.round(v * 2) / 2)
  for (const v of values) set.add(v)
  return [...set].sort((a, b) => a - b)
}

/** Exact and ±1 agreement, κ for class, and weighted κ for type, of two aligned rating lists. */
export function agreementFigures(a: { type: number[]; cls: number[] }, b: { type: number[]; cls: number[] }): AgreementFigures {
  const n = a.type.length
  const scale = typeScale([...a.type, ...b.type])
  return {
    n,
    exactType: safe(n, () => agreementFraction(a.type, b.type, 0)),
    withinOneSubtype: safe(n, () => agreementFraction(a.type, b.type, 1)),
    exactClass: safe(n, () => agreementFraction(a.cls, b.cls, 0)),
    withinOneClass: safe(n, () => agreementFraction(a.cls, b.cls, 1)),
    kappaClass: safe(n, () => cohenKappa(a.cls, b.cls)),
    weightedKappaTypeLinear: safe(n, () => weightedKappa(a.type, b.type, 'linear', { categories: scale })),
    weightedKappaTypeQuadratic: safe(n, () => weightedKappa(a.type, b.type, 'quadratic', { categories: scale })),
  }
}

function median(values: number[]): number {
  const s = [...values].sort((x, y) => x - y)
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
const classLabel = (code: number) => {
  let best = LUMINOSITY_CLASSES[0]!
  for (const c of LUMINOSITY_CLASSES) if (Math.abs(c.code - code) < Math.abs(best.code - code)) best = c
  return best.text
}

/** A confusion matrix of labelled pairs, keeping the spectrum ids behind each cell. */
export function labelledMatrix(pairs: Array<{ row: string; column: string; spectrumId: number }>, order: readonly string[], rowsAre: string, columnsAre: string): ConfusionMatrix {
  const used = new Set(pairs.flatMap((p) => [p.row, p.column]))
  const labels = order.filter((l) => used.has(l))
  const index = new Map(labels.map((l, i) => [l, i]))
  const cells = labels.map(() => labels.map((): MatrixCell => ({ count: 0, spectrumIds: [] })))
  for (const p of pairs) {
    const cell = cells[index.get(p.row)!]![index.get(p.column)!]!
    cell.count++
    if (!cell.spectrumIds.includes(p.spectrumId)) cell.spectrumIds.push(p.spectrumId)
  }
  for (const row of cells) for (const c of row) c.spectrumIds.sort((x, y) => x - y)
  return { rowsAre, columnsAre, labels, cells, n: pairs.length }
}

const LETTER_ORDER = MK_LETTERS.map((l) => l.letter)
const CLASS_ORDER = LUMINOSITY_CLASSES.map((c) => c.text)

function typeAndClassMatrices(pairs: Array<{ a: { typeCode: number; classCode: number }; b: { typeCode: number; classCode: number }; spectrumId: number }>, rowsAre: string, columnsAre: string) {
  return {
    type: labelledMatrix(pairs.map((p) => ({ row: letterOf(p.a.typeCode), column: letterOf(p.b.typeCode), spectrumId: p.spectrumId })), LETTER_ORDER, `${rowsAre} (type letter)`, `${columnsAre} (type letter)`),
    class: labelledMatrix(pairs.map((p) => ({ row: classLabel(p.a.classCode), column: classLabel(p.b.classCode), spectrumId: p.spectrumId })), CLASS_ORDER, `${rowsAre} (luminosity class)`, `${columnsAre} (luminosity class)`),
  }
}

function fractions(pairs: Array<{ a: { typeCode: number; classCode: number }; b: { typeCode: number; classCode: number } }>) {
  const a = pairs.map((p) => p.a)
  const b = pairs.map((p) => p.b)
  const n = pairs.length
  const at = a.map((x) => x.typeCode)
  const bt = b.map((x) => x.typeCode)
  const ac = a.map((x) => x.classCode)
  const bc = b.map((x) => x.classCode)
  return {
    exactType: safe(n, () => agreementFraction(at, bt, 0)),
    withinOneSubtype: safe(n, () => agreementFraction(at, bt, 1)),
    exactClass: safe(n, () => agreementFraction(ac, bc, 0)),
    withinOneClass: safe(n, () => agreementFraction(ac, bc, 1)),
  }
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
    const list = bySpectrum.get(c.spectrumId) ?? []
    list.push(c)
    bySpectrum.set(c.spectrumId, list)
  }
  const consensus = new Map<number, { typeCode: number; classCode: number }>()
  for (const [id, list] of bySpectrum) {
    const c = consensusOf(info.get(id), list)
    if (c) consensus.set(id, c)
  }
  const people = new Map<number, string>()
  for (const c of calls) people.set(c.classifierId, c.classifierName)
  const ids = [...people.keys()].sort((a, b) => a - b)
  const ref = (id: number): RaterRef => ({ kind: 'classifier', id, name: people.get(id)! })
  const suggestionRef: RaterRef = { kind: 'suggestion', id: null, name: 'Suggestion' }
  const callOf = (userId: number) => new Map(calls.filter((c) => c.classifierId === userId).map((c) => [c.spectrumId, c]))
  const byPerson = new Map(ids.map((id) => [id, callOf(id)]))

  const pairs: PairFigures[] = []
  for (let i = 0; i < ids.length; i++) {
    for (let j = i + 1; j < ids.length; j++) {
      const a = byPerson.get(ids[i]!)!
      const b = byPerson.get(ids[j]!)!
      const common = [...a.keys()].filter((s) => b.has(s)).sort((x, y) => x - y)
      const A = common.map((s) => a.get(s)!)
      const B = common.map((s) => b.get(s)!)
      pairs.push({
        a: ref(ids[i]!),
        b: ref(ids[j]!),
        ...agreementFigures({ type: A.map((c) => c.typeCode), cls: A.map((c) => c.classCode) }, { type: B.map((c) => c.typeCode), cls: B.map((c) => c.classCode) }),
      })
    }
  }

  const vsSuggestion: PairFigures[] = ids.map((id) => {
    const mine = [...byPerson.get(id)!.values()].filter((c) => info.get(c.spectrumId)?.suggestion).sort((x, y) => x.spectrumId - y.spectrumId)
    const sug = mine.map((c) => info.get(c.spectrumId)!.suggestion!)
    return {
      a: ref(id),
      b: suggestionRef,
      ...agreementFigures({ type: mine.map((c) => c.typeCode), cls: mine.map((c) => c.classCode) }, { type: sug.map((s) => s.typeCode), cls: sug.map((s) => s.classCode) }),
    }
  })

  const classifiers: ClassifierFigures[] = ids.map((id) => {
    const mine = [...byPerson.get(id)!.values()]
    const judged = mine.filter((c) => consensus.has(c.spectrumId))
    const ref = judged.map((c) => consensus.get(c.spectrumId)!)
    const seconds = mine.map((c) => c.secondsSpent).filter((s): s is number => s !== null)
    return {
      id,
      name: people.get(id)!,
      calls: mine.length,
      typeOffset: safe(judged.length, () => meanOffset(judged.map((c) => c.typeCode), ref.map((r) => r.typeCode))),
      classOffset: safe(judged.length, () => meanOffset(judged.map((c) => c.classCode), ref.map((r) => r.classCode))),
      medianSecondsPerCall: safe(seconds.length, () => median(seconds)),
    }
  })

  const callConsensusPairs = calls.filter((c) => consensus.has(c.spectrumId)).map((c) => ({ a: c, b: consensus.get(c.spectrumId)!, spectrumId: c.spectrumId }))
  const suggestionConsensusPairs = [...consensus.entries()]
    .filter(([id]) => info.get(id)?.suggestion)
    .map(([id, c]) => ({ a: info.get(id)!.suggestion!, b: c, spectrumId: id }))

  const groupFigures = (keyOf: (c: AuditCall) => string | null): GroupFigures[] => {
    const groups = new Map<string, AuditCall[]>()
    for (const c of calls) {
      const k = keyOf(c)
      if (k === null) continue
      groups.set(k, [...(groups.get(k) ?? []), c])
    }
    return [...groups.entries()]
      .sort((x, y) => (x[0] < y[0] ? -1 : x[0] > y[0] ? 1 : 0))
      .map(([key, list]) => ({
        key,
        calls: list.length,
        vsConsensus: fractions(list.filter((c) => consensus.has(c.spectrumId)).map((c) => ({ a: c, b: consensus.get(c.spectrumId)! }))),
        vsSuggestion: fractions(list.filter((c) => info.get(c.spectrumId)?.suggestion).map((c) => ({ a: c, b: info.get(c.spectrumId)!.suggestion! }))),
      }))
  }

  const sameAsSuggestion = (c: AuditCall) => {
    const s = info.get(c.spectrumId)?.suggestion
    return s ? Math.abs(s.typeCode - c.typeCode) < 1e-9 && Math.abs(s.classCode - c.classCode) < 1e-9 : null
  }
  const share = (list: AuditCall[], test: (c: AuditCall) => boolean | null) => {
    const judged = list.map(test).filter((v): v is boolean => v !== null)
    return safe(judged.length, () => judged.filter(Boolean).length / judged.length)
  }
  const exactVsConsensus = (c: AuditCall) => {
    const k = consensus.get(c.spectrumId)
    return k ? Math.abs(k.typeCode - c.typeCode) < 1e-9 : null
  }
  const shown = calls.filter((c) => c.suggestionShown)
  const blind = calls.filter((c) => !c.suggestionShown)

  return {
    spectra: bySpectrum.size,
    calls: calls.length,
    classifiers,
    pairs,
    vsSuggestion,
    fleiss: fleissFigures(bySpectrum),
    confusion: {
      callsVsConsensus: typeAndClassMatrices(callConsensusPairs, 'call', 'consensus'),
      suggestionVsConsensus: typeAndClassMatrices(suggestionConsensusPairs, 'suggestion', 'consensus'),
    },
    byWeek: groupFigures((c) => isoWeek(c.at)),
    byLibraryVersion: groupFigures((c) => info.get(c.spectrumId)?.suggestion?.libraryVersion ?? null),
    blind: {
      shown: { calls: shown.length, acceptedSuggestion: share(shown, (c) => c.acceptedSuggestion), agreeWithSuggestion: share(shown, sameAsSuggestion), exactTypeVsConsensus: share(shown, exactVsConsensus) },
      blind: { calls: blind.length, agreeWithSuggestion: share(blind, sameAsSuggestion), exactTypeVsConsensus: share(blind, exactVsConsensus) },
    },
    notes: [
      `Figures with fewer than ${SMALL_SAMPLE} items are marked smallSample.`,
      "Each classifier's standing call counts: the latest of a call and its corrections.",
      'The consensus is the decided classification, or the median of two or more calls when none is decided yet.',
      'Weighted κ uses the numeric type scale in half-subtype steps (Cohen 1968 weights by category rank).',
      'κ is null when both raters used a single category.',
    ],
  }
}

// ---------------------------------------------------------------------------------------------
// Loading
// ---------------------------------------------------------------------------------------------

/** The audit query as parsed: a campaign id and a half-open range of instants (shared/api/audit.ts). */
export type { AuditQuery }

/** The audit of one campaign over a date range, from the stored calls, suggestions and decisions. */
export async function getAudit(query: AuditQuery): Promise<AuditReport> {
  const campaign = await Campaign.findByPk(query.campaignId)
  if (!campaign) throw notFound('The campaign')
  const spectrumIds = (await Spectrum.findAll({ where: { campaignId: campaign.id }, attributes: ['id'] })).map((s) => s.id)
  const range: Record<symbol, Date> = {}
  if (query.from) range[Op.gte] = query.from
  if (query.to) range[Op.lt] = query.to
  const rows = spectrumIds.length
    ? await ReviewCall.findAll({
        where: { spectrumId: { [Op.in]: spectrumIds }, ...(query.from || query.to ? { createdAt: range } : {}) },
        order: [['id', 'ASC']],
      })
    : []
  // The standing call of each person on each spectrum: the latest row.
  const standing = new Map<string, ReviewCall>()
  for (const r of rows) standing.set(`${r.spectrumId}:${r.userId}`, r)
  const calls = [...standing.values()]
  const called = [...new Set(calls.map((c) => c.spectrumId))]

  const users = calls.length ? await User.findAll({ where: { id: { [Op.in]: [...new Set(calls.map((c) => c.userId))] } }, attributes: ['id', 'name'] }) : []
  const names = new Map(users.map((u) => [u.id, u.name]))
  const suggestionIds = [...new Set(calls.map((c) => c.suggestionId).filter((x): x is number => x !== null))]
  const suggestions = called.length
    ? await Suggestion.findAll({ where: { [Op.or]: [{ id: { [Op.in]: suggestionIds.length ? suggestionIds : [0] } }, { spectrumId: { [Op.in]: called }, isCurrent: true }] } })
    : []
  const versions = new Map((await LibraryVersion.findAll({ attributes: ['id', 'name'] })).map((v) => [v.id, v.name]))
  const decisions = called.length ? await Classification.findAll({ where: { spectrumId: { [Op.in]: called } }, order: [['id', 'ASC']] }) : []
  const latestDecision = new Map<number, Classification>()
  for (const d of decisions) latestDecision.set(d.spectrumId, d)

  const spectra: AuditSpectrum[] = called.map((id) => {
    // The suggestion the calls were made against, else the spectrum's current one.
    const shownId = calls.find((c) => c.spectrumId === id && c.suggestionId !== null)?.suggestionId
    const s = suggestions.find((x) => x.id === shownId) ?? suggestions.find((x) => x.spectrumId === id && x.isCurrent)
    const d = latestDecision.get(id)
    return {
      spectrumId: id,
      suggestion: s ? { typeCode: s.typeCode, classCode: s.classCode, libraryVersion: versions.get(s.libraryVersionId) ?? `#${s.libraryVersionId}` } : null,
      decision: d ? { typeCode: d.typeCode, classCode: d.classCode } : null,
    }
  })
  const auditCalls: AuditCall[] = calls.map((c) => ({
    spectrumId: c.spectrumId,
    classifierId: c.userId,
    classifierName: names.get(c.userId) ?? `#${c.userId}`,
    typeCode: c.typeCode,
    classCode: c.classCode,
    at: c.createdAt,
    secondsSpent: c.secondsSpent,
    suggestionShown: c.suggestionShown,
    acceptedSuggestion: c.acceptedSuggestion,
  }))
  return {
    campaign: { id: campaign.id, code: campaign.code, name: campaign.name },
    from: query.from?.toISOString() ?? null,
    to: query.to?.toISOString() ?? null,
    ...auditFigures(auditCalls, spectra),
  }
}
