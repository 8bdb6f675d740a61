import { Op, type Sequelize, type Transaction } from 'sequelize'
import type { AppContext } from '../context'
import { executeInTransaction, insertModelRow } from '../db/execute'
import { HttpError, notFound } from '../lib/http-error'
import { Campaign, Instrument, ProcessingJob, ReviewCall, Spectrum, Suggestion, type User } from '../models'
import { isBlindFor } from '../review/consensus'
import type { MatchResult } from '../spectra/match'
import { activeVersionId } from './standards.service'
import type { SpectrumSuggestions, SuggestionDetails, SuggestionSummary } from '../../shared/api/suggestions'
import type { StandardsUsed } from '../spectra/match/instrument'
import type { PipelineResolution } from '../spectra/pipeline'

export type { SuggestionSummary }

/**
 * What a suggestion keeps beyond type and class: the matcher's result, how the pipeline reached it,
 * and which standards decided it (the instrument's own or the general library's).
 */
export async function suggestionDetails(r: MatchResult, resolution: PipelineResolution, notes: readonly string[], used: StandardsUsed | null, transaction?: Transaction): Promise<SuggestionDetails> {
  const details: SuggestionDetails = {
    parameters: r.parameters,
    classShares: r.classShares,
    classNote: r.classNote,
    resolution,
    region: [r.region[0], r.region[1]],
    residual: r.residual,
    notes: [...notes],
  }
  if (used) {
    const instrument = used.instrumentId !== null ? await Instrument.findByPk(used.instrumentId, { attributes: ['id', 'name'], transaction }) : null
    // The instrument is told by id and name; the bare id is not part of the answer's shape.
    const { instrumentId: _id, ...rest } = used
    details.standards = { ...rest, instrument: instrument ? { id: instrument.id, name: instrument.name } : null }
  }
  return details
}

/**
 * Stores a matcher result as the spectrum's current suggestion; the earlier current ones (their ids
 * found by the caller) stay with is_current = false. Raw statements on the transaction's connection:
 * this runs once per processed spectrum, and a model instance per insert cost more than the insert.
 */
export async function storeSuggestion(
  input: { spectrumId: number; measurementId: number; libraryVersionId: number; pipelineVersion: string; result: MatchResult; details: SuggestionDetails; instrumentId?: number | null },
  earlier: readonly number[],
  transaction: Transaction,
): Promise<number> {
  const r = input.result
  if (earlier.length > 0) await executeInTransaction(transaction, `UPDATE suggestions SET is_current = 0 WHERE id IN (${earlier.map(() => '?').join(', ')})`, [...earlier])
  return insertModelRow(transaction, Suggestion, {
    spectrumId: input.spectrumId,
    measurementId: input.measurementId,
    libraryVersionId: input.libraryVersionId,
    pipelineVersion: input.pipelineVersion,
    isCurrent: true,
    spectralType: r.spectralType,
    letter: r.letter,
    subtype: r.subtype,
    typeCode: r.typeCode,
    luminosityClass: r.luminosityClass,
    classCode: r.classCode,
    uncertaintySubtypes: r.uncertainty.subtypes,
    uncertaintyClasses: r.uncertainty.classes,
    bestStandardId: r.bestStandardId > 0 ? r.bestStandardId : null,
    candidates: JSON.stringify(r.candidates),
    votes: JSON.stringify(r.votes),
    flags: JSON.stringify(r.flags),
    probabilities: JSON.stringify(r.probabilities),
    details: JSON.stringify(input.details),
    instrumentId: input.instrumentId ?? null,
  })
}

/**
 * Replaces a spectrum's flag rows (each flag once, as long as the column holds) in the caller's
 * transaction and returns the flag count the spectrum row keeps. `clear` is false when the caller
 * knows the spectrum has none, which saves the DELETE.
 */
export async function replaceFlagRows(transaction: Transaction, spectrumId: number, flags: readonly string[], clear = true): Promise<number> {
  const unique = [...new Set(flags)].map((f) => f.slice(0, 40))
  if (clear) await executeInTransaction(transaction, 'DELETE FROM spectrum_flags WHERE spectrum_id = ?', [spectrumId])
  if (unique.length > 0) {
    await executeInTransaction(
      transaction,
      `INSERT INTO spectrum_flags (spectrum_id, flag) VALUES ${unique.map(() => '(?, ?)').join(', ')}`,
      unique.flatMap((f) => [spectrumId, f]),
    )
  }
  return Math.min(255, unique.length)
}

/**
 * Writes what the queue orders and filters by for a spectrum's current suggestion: the flag count
 * on the spectrum and one spectrum_flags row per flag, in the given transaction or one of its own.
 */
export async function indexSuggestionFlags(sequelize: Sequelize, spectrumId: number, flags: readonly string[], transaction?: Transaction): Promise<void> {
  if (!transaction) return sequelize.transaction((own) => indexSuggestionFlags(sequelize, spectrumId, flags, own))
  const count = await replaceFlagRows(transaction, spectrumId, flags)
  await executeInTransaction(transaction, 'UPDATE spectra SET flag_count = ? WHERE id = ?', [count, spectrumId])
}

export function toSuggestionSummary(s: Suggestion): SuggestionSummary {
  return {
    id: s.id,
    spectrumId: s.spectrumId,
    measurementId: s.measurementId,
    libraryVersionId: s.libraryVersionId,
    pipelineVersion: s.pipelineVersion,
    isCurrent: s.isCurrent,
    spectralType: s.spectralType,
    letter: s.letter,
    subtype: s.subtype,
    typeCode: s.typeCode,
    luminosityClass: s.luminosityClass,
    classCode: s.classCode,
    uncertainty: { subtypes: s.uncertaintySubtypes, classes: s.uncertaintyClasses },
    bestStandardId: s.bestStandardId,
    candidates: JSON.parse(s.candidates) as unknown[],
    votes: JSON.parse(s.votes) as unknown[],
    flags: JSON.parse(s.flags) as string[],
    probabilities: JSON.parse(s.probabilities) as unknown[],
    details: s.details ? (JSON.parse(s.details) as SuggestionDetails) : null,
    instrumentId: s.instrumentId ?? null,
    createdAt: s.createdAt.toISOString(),
  }
}

/** The current suggestion of a spectrum and the older ones, newest first. */
export async function suggestionsOf(spectrumId: number): Promise<{ current: SuggestionSummary | null; history: SuggestionSummary[] }> {
  const all = await Suggestion.findAll({ where: { spectrumId }, order: [['id', 'DESC']] })
  const current = all.find((s) => s.isCurrent)
  return { current: current ? toSuggestionSummary(current) : null, history: all.filter((s) => !s.isCurrent).map(toSuggestionSummary) }
}

/** Whether blind review withholds this spectrum's suggestion from the user (a classifier or lead who has not called yet). */
export async function suggestionHiddenFrom(user: User, spectrumId: number): Promise<boolean> {
  if (user.role === 'observer') return false
  const spectrum = await Spectrum.findByPk(spectrumId, { attributes: ['id', 'campaignId', 'status'] })
  const campaign = spectrum ? await Campaign.findByPk(spectrum.campaignId) : null
  if (!spectrum || !campaign) return false
  const hasCalled = (await ReviewCall.count({ where: { spectrumId, userId: user.id } })) > 0
  return isBlindFor(campaign, spectrum, hasCalled)
}

/** The suggestions as this user may see them: none under blind review, however they ask. */
export async function visibleSuggestionsOf(user: User, spectrumId: number): Promise<SpectrumSuggestions> {
  if (await suggestionHiddenFrom(user, spectrumId)) return { current: null, history: [], hidden: true }
  return { ...(await suggestionsOf(spectrumId)), hidden: false }
}

/**
 * Queues every spectrum of a campaign to be processed again, so that each gets a new suggestion
 * against the active library version. Spectra already waiting are skipped.
 */
export async function resuggestCampaign(ctx: AppContext, user: User, campaignId: number): Promise<{ queued: number; skipped: number; libraryVersionId: number }> {
  const campaign = await Campaign.findByPk(campaignId)
  if (!campaign) throw notFound('The campaign')
  const versionId = await activeVersionId()
  if (versionId === null) throw new HttpError(409, 'no_active_library', 'No standards library version is active.')
  const spectra = await Spectrum.findAll({ where: { campaignId }, attributes: ['id'] })
  const ids = spectra.map((s) => s.id)
  const pending = new Set((await ProcessingJob.findAll({ where: { spectrumId: { [Op.in]: ids }, status: { [Op.in]: ['queued', 'running'] } }, attributes: ['spectrumId'] })).map((j) => j.spectrumId))
  const todo = ids.filter((id) => !pending.has(id))
  if (todo.length > 0) {
    await ProcessingJob.bulkCreate(todo.map((spectrumId) => ({ spectrumId, error: null, requestedBy: user.id, startedAt: null, finishedAt: null })))
  }
  for (const id of todo) ctx.jobs?.enqueue(id)
  return { queued: todo.length, skipped: ids.length - todo.length, libraryVersionId: versionId }
}
