import { Campaign, Classification, Dispute, Measurement, ReviewCall, SpectrumEvent, Suggestion, type User } from '../models'
import { isBlindFor, namesOf, toCallView, toFinalClassification, type PersonRef } from './review.service'
import { findVisibleSpectrum } from './visibility'
import type { HistoryEvent, HistoryKind, SpectrumHistory } from '../../shared/api/history'

export type { HistoryEvent, HistoryKind }

const KIND_ORDER: HistoryKind[] = ['upload', 'reread', 'reprocess', 'measurement', 'suggestion', 'call', 'correction', 'dispute', 'agreed', 'settled']

/**
 * Everything that happened to a spectrum, oldest first, from rows that are never changed. Blind
 * review applies: a classifier who has not called yet sees neither the suggestions nor others' calls.
 */
export async function historyOf(user: User, spectrumId: number): Promise<SpectrumHistory> {
  const spectrum = await findVisibleSpectrum(user, spectrumId)
  const [campaign, measurements, suggestions, calls, disputes, classifications, spectrumEvents] = await Promise.all([
    Campaign.findByPk(spectrum.campaignId, { rejectOnEmpty: true }),
    Measurement.findAll({ where: { spectrumId }, attributes: ['id', 'pipelineVersion', 'snr', 'rv', 'isCurrent', 'createdAt'], order: [['id', 'ASC']] }),
    Suggestion.findAll({ where: { spectrumId }, attributes: { exclude: ['probabilities', 'votes', 'candidates'] }, order: [['id', 'ASC']] }),
    ReviewCall.findAll({ where: { spectrumId }, order: [['id', 'ASC']] }),
    Dispute.findAll({ where: { spectrumId }, order: [['id', 'ASC']] }),
    Classification.findAll({ where: { spectrumId }, order: [['id', 'ASC']] }),
    SpectrumEvent.findAll({ where: { spectrumId, kind: ['reread', 'reprocess'] }, order: [['id', 'ASC']] }),
  ])
  const hasCalled = calls.some((c) => c.userId === user.id)
  const blind = user.role !== 'observer' && isBlindFor(campaign, spectrum, hasCalled)
  const visibleCalls = blind ? calls.filter((c) => c.userId === user.id) : calls
  const names = await namesOf([
    spectrum.submittedBy,
    ...visibleCalls.map((c) => c.userId),
    ...classifications.map((c) => c.decidedBy),
    ...spectrumEvents.flatMap((e) => (e.userId === null ? [] : [e.userId])),
  ])
  const person = (id: number | null): PersonRef | null => (id === null ? null : { id, name: names.get(id) ?? '' })

  const events: HistoryEvent[] = [
    {
      at: spectrum.createdAt.toISOString(),
      kind: 'upload',
      who: person(spectrum.submittedBy),
      summary: `Submitted ${spectrum.fileName} (${spectrum.objectName})`,
      details: { fileName: spectrum.fileName, format: spectrum.format, pixels: spectrum.pixels, campaignId: spectrum.campaignId },
    },
  ]
  for (const e of spectrumEvents) {
    const details = JSON.parse(e.details) as { before?: Record<string, unknown>; after?: Record<string, unknown> }
    // Blind review: the earlier suggestion is not shown to a classifier who has not called yet.
    if (blind && details.before) details.before = { ...details.before, suggestion: null, suggestionId: null }
    events.push({
      at: e.createdAt.toISOString(),
      kind: e.kind as HistoryKind,
      who: person(e.userId),
      summary: e.summary,
      details: details as Record<string, unknown>,
    })
  }
  for (const m of measurements) {
    events.push({
      at: m.createdAt.toISOString(),
      kind: 'measurement',
      who: null,
      summary: `Measured with pipeline ${m.pipelineVersion}${m.snr !== null ? `, S/N ${m.snr.toFixed(1)}` : ''}`,
      details: { measurementId: m.id, pipelineVersion: m.pipelineVersion, snr: m.snr, rv: m.rv, isCurrent: m.isCurrent },
    })
  }
  if (!blind) {
    for (const s of suggestions) {
      events.push({
        at: s.createdAt.toISOString(),
        kind: 'suggestion',
        who: null,
        summary: `Suggested ${s.spectralType} (±${s.uncertaintySubtypes} subtypes, ±${s.uncertaintyClasses} classes)`,
        details: {
          suggestionId: s.id,
          spectralType: s.spectralType,
          libraryVersionId: s.libraryVersionId,
          pipelineVersion: s.pipelineVersion,
          isCurrent: s.isCurrent,
          flags: JSON.parse(s.flags) as unknown,
        },
      })
    }
  }
  for (const c of visibleCalls) {
    const view = toCallView(c, names)
    events.push({
      at: view.createdAt,
      kind: c.kind,
      who: view.by,
      summary: `${c.kind === 'correction' ? 'Corrected the call to' : c.acceptedSuggestion ? 'Accepted the suggestion' : 'Called'} ${c.spectralType} (confidence ${c.confidence}/3)`,
      suggestionShown: c.suggestionShown,
      secondsSpent: c.secondsSpent,
      details: { ...view },
    })
  }
  for (const d of disputes) {
    events.push({
      at: d.createdAt.toISOString(),
      kind: 'dispute',
      who: null,
      summary: `Disputed: the calls differ by ${d.typeSpread} subtypes and ${d.classSpread} classes (tolerance ${d.typeTolerance} and ${d.classTolerance})`,
      details: { disputeId: d.id, callIds: JSON.parse(d.callIds) as unknown },
    })
  }
  for (const c of classifications) {
    const final = toFinalClassification(c, names)
    events.push({
      at: final.decidedAt,
      kind: c.source === 'settled' ? 'settled' : 'agreed',
      who: person(c.decidedBy),
      summary: c.source === 'settled' ? `Settled as ${c.spectralType}: ${c.note}` : `Agreed on ${c.spectralType} from ${c.nCalls} call${c.nCalls === 1 ? '' : 's'}`,
      details: { ...final },
    })
  }
  events.sort((a, b) => a.at.localeCompare(b.at) || KIND_ORDER.indexOf(a.kind) - KIND_ORDER.indexOf(b.kind))
  return { events, hidden: blind && (suggestions.length > 0 || visibleCalls.length < calls.length) }
}
