import type { SuggestionDetails } from '../../shared/api/suggestions'
import { Op, UniqueConstraintError, type InferAttributes, type Transaction } from 'sequelize'
import { parseMK } from '../../shared/mk'
import type { AppContext } from '../context'
import { HttpError } from '../lib/http-error'
import { Campaign, Classification, Dispute, ReviewCall, ReviewClaim, Spectrum, Suggestion, User } from '../models'
import { OPEN_FOR_CALLS, isBlindFor, judgeByMajority, judgeCalls, parseCallType, parsedCallOf, type ParsedCall } from '../review/consensus'
import { measurementsOf } from './measurements.service'
import { findVisibleSpectrum } from './visibility'
import type { CallView, ClaimView, FinalClassification, PersonRef, RecordCallInput, RecordCallResult, ReviewCampaign, ReviewView, SuggestionView } from '../../shared/api/review'

export type { CallView, ClaimView, FinalClassification, PersonRef, RecordCallInput, RecordCallResult, ReviewCampaign, ReviewView, SuggestionView }

/** Parsed JSON text of a stored column, or `fallback` when it is empty or not JSON. */
export const parseJson = <T>(text: string | null | undefined, fallback: T): T => {
  if (!text) return fallback
  try {
    return JSON.parse(text) as T
  } catch {
    return fallback
  }
}

// ---------------------------------------------------------------------------------------------
// Views
// ---------------------------------------------------------------------------------------------

export const suggestionFlags = (s: Suggestion | null): string[] => (s ? parseJson<unknown>(s.flags, []) : []) as string[]

export function toSuggestionView(s: Suggestion): SuggestionView {
  return {
    id: s.id,
    spectralType: s.spectralType,
    letter: s.letter,
    subtype: s.subtype,
    typeCode: s.typeCode,
    luminosityClass: s.luminosityClass,
    classCode: s.classCode,
    uncertaintySubtypes: s.uncertaintySubtypes,
    uncertaintyClasses: s.uncertaintyClasses,
    libraryVersionId: s.libraryVersionId,
    pipelineVersion: s.pipelineVersion,
    bestStandardId: s.bestStandardId,
    candidates: parseJson<unknown[]>(s.candidates, []),
    votes: parseJson<unknown>(s.votes, []),
    flags: suggestionFlags(s),
    probabilities: parseJson<unknown[]>(s.probabilities, []),
    details: s.details ? parseJson<SuggestionDetails | null>(s.details, null) : null,
    createdAt: s.createdAt.toISOString(),
  }
}

export function toCallView(c: ReviewCall, names: Map<number, string>): CallView {
  return {
    id: c.id,
    kind: c.kind,
    correctsCallId: c.correctsCallId,
    by: { id: c.userId, name: names.get(c.userId) ?? '' },
    spectralType: c.spectralType,
    letter: c.letter,
    subtype: c.subtype,
    typeCode: c.typeCode,
    luminosityClass: c.luminosityClass,
    classCode: c.classCode,
    peculiarities: parseJson<string[]>(c.peculiarities, []),
    notes: c.notes,
    confidence: c.confidence,
    uncertain: c.uncertain,
    acceptedSuggestion: c.acceptedSuggestion,
    suggestionId: c.suggestionId,
    suggestionShown: c.suggestionShown,
    secondsSpent: c.secondsSpent,
    createdAt: c.createdAt.toISOString(),
  }
}

export function toFinalClassification(c: InferAttributes<Classification>, names: Map<number, string>): FinalClassification {
  return {
    id: c.id,
    spectrumId: c.spectrumId,
    source: c.source,
    spectralType: c.spectralType,
    letter: c.letter,
    subtype: c.subtype,
    typeCode: c.typeCode,
    luminosityClass: c.luminosityClass,
    classCode: c.classCode,
    peculiarities: parseJson<string[]>(c.peculiarities, []),
    decidedBy: c.decidedBy === null ? null : { id: c.decidedBy, name: names.get(c.decidedBy) ?? '' },
    decidedAt: c.createdAt.toISOString(),
    nCalls: c.nCalls,
    callIds: parseJson<number[]>(c.callIds, []),
    agreement: c.agreement,
    typeSpread: c.typeSpread,
    classSpread: c.classSpread,
    suggestionId: c.suggestionId,
    disputeId: c.disputeId,
    note: c.note,
  }
}

/** Names of the given users, for views. */
export async function namesOf(ids: Iterable<number | null>): Promise<Map<number, string>> {
  const unique = [...new Set([...ids].filter((id): id is number => id !== null))]
  if (unique.length === 0) return new Map()
  const users = await User.findAll({ where: { id: { [Op.in]: unique } }, attributes: ['id', 'name'], raw: true })
  return new Map(users.map((u) => [u.id, u.name]))
}

/**
 * The decided classification of each spectrum (the latest row wins), keyed by spectrum id.
 * Spectra without one are absent. The caller decides who may see which spectra.
 */
export async function finalClassificationsFor(spectrumIds: number[]): Promise<Map<number, FinalClassification>> {
  const ids = [...new Set(spectrumIds)]
  if (ids.length === 0) return new Map()
  // Plain rows: lists ask for a page of these on every request.
  const rows = (await Classification.findAll({ where: { spectrumId: { [Op.in]: ids } }, order: [['id', 'ASC']], raw: true })) as InferAttributes<Classification>[]
  const latest = new Map<number, InferAttributes<Classification>>()
  for (const r of rows) latest.set(r.spectrumId, r)
  const names = await namesOf([...latest.values()].map((r) => r.decidedBy))
  return new Map([...latest].map(([id, r]) => [id, toFinalClassification(r, names)]))
}

/** The suggestion a classifier works from: the newest current one. */
export async function currentSuggestion(spectrumId: number, transaction?: Transaction): Promise<Suggestion | null> {
  return Suggestion.findOne({ where: { spectrumId, isCurrent: true }, order: [['id', 'DESC']], transaction })
}

/** Each person's standing call (their latest row; a correction replaces the call it corrects), in the order people first called. */
export function standingCalls(rows: ReviewCall[]): ReviewCall[] {
  const latest = new Map<number, ReviewCall>()
  for (const r of [...rows].sort((a, b) => a.id - b.id)) latest.set(r.userId, r)
  // A Map keeps first-insertion order, which is the order of each person's first call.
  return [...latest.values()]
}

/** The suggestion read as a call, for a classifier who accepts it. */
export function suggestionAsCall(s: Suggestion): ParsedCall {
  const full = parseMK(s.spectralType)
  if (full.ok && full.value.typeCode !== undefined && full.value.classCode !== undefined && full.value.luminosityClass !== undefined) return parsedCallOf(full.value)
  return parseCallType(`${s.letter}${s.subtype}`, s.luminosityClass)
}

// ---------------------------------------------------------------------------------------------
// Review view
// ---------------------------------------------------------------------------------------------

export function toClaimView(c: ReviewClaim, user: User, names: Map<number, string>, now = new Date()): ClaimView {
  return {
    spectrumId: c.spectrumId,
    mine: c.userId === user.id,
    by: { id: c.userId, name: names.get(c.userId) ?? (c.userId === user.id ? user.name : '') },
    claimedAt: c.claimedAt.toISOString(),
    expiresAt: c.expiresAt.toISOString(),
    live: c.expiresAt.getTime() > now.getTime(),
  }
}

const toRules = (c: Campaign): ReviewCampaign => ({
  id: c.id,
  code: c.code,
  name: c.name,
  callsRequired: c.callsRequired,
  blindReview: c.blindReview,
  typeTolerance: c.typeTolerance,
  classTolerance: c.classTolerance,
  regionMin: c.regionMin,
  regionMax: c.regionMax,
})

function callRefusal(user: User, spectrum: Spectrum, hasCalled: boolean): { code: string; reason: string } | null {
  if (spectrum.submittedBy === user.id) return { code: 'own_submission', reason: 'You submitted this spectrum; someone else classifies it.' }
  if (!OPEN_FOR_CALLS.includes(spectrum.status)) return { code: 'not_open', reason: `The spectrum is ${spectrum.status.replace('_', ' ')} and takes no calls.` }
  if (hasCalled) return { code: 'already_called', reason: 'You have recorded your call on this spectrum.' }
  return null
}

/** Everything the working screen needs, with blind review applied for this user. */
export async function getReviewView(user: User, spectrumId: number, now = new Date()): Promise<ReviewView> {
  const spectrum = await findVisibleSpectrum(user, spectrumId)
  const [campaign, suggestion, rows, claim, measurements, dispute, classification] = await Promise.all([
    Campaign.findByPk(spectrum.campaignId, { rejectOnEmpty: true }),
    currentSuggestion(spectrum.id),
    ReviewCall.findAll({ where: { spectrumId: spectrum.id }, order: [['id', 'ASC']] }),
    ReviewClaim.findByPk(spectrum.id),
    measurementsOf(spectrum.id),
    Dispute.findOne({ where: { spectrumId: spectrum.id }, order: [['id', 'DESC']] }),
    finalClassificationsFor([spectrum.id]).then((m) => m.get(spectrum.id) ?? null),
  ])
  const mine = rows.filter((r) => r.userId === user.id)
  const hasCalled = mine.length > 0
  const blind = isBlindFor(campaign, spectrum, hasCalled)
  const visibleRows = blind ? mine : rows
  const names = await namesOf([spectrum.submittedBy, ...visibleRows.map((r) => r.userId), claim?.userId ?? null])
  const standing = standingCalls(rows)
  const othersClaim = claim && claim.userId !== user.id && claim.expiresAt > now ? claim : null
  const refusal =
    callRefusal(user, spectrum, hasCalled) ??
    (othersClaim
      ? { code: 'claimed', reason: `${names.get(othersClaim.userId) ?? 'Someone'} is working on this spectrum until ${othersClaim.expiresAt.toISOString()}; it is read-only for you until then.` }
      : null)
  const settled = dispute ? (await Classification.count({ where: { disputeId: dispute.id } })) > 0 : false
  const showClaim = claim && (claim.userId === user.id || claim.expiresAt > now)
  return {
    spectrum: {
      id: spectrum.id,
      objectName: spectrum.objectName,
      status: spectrum.status,
      statusReason: spectrum.statusReason,
      submittedBy: { id: spectrum.submittedBy, name: names.get(spectrum.submittedBy) ?? '' },
      createdAt: spectrum.createdAt.toISOString(),
      obsDate: spectrum.obsDate ? spectrum.obsDate.toISOString() : null,
      instrument: spectrum.instrument,
      snr: spectrum.snr,
      wavelengthRange: [spectrum.wlMin, spectrum.wlMax],
      dispersion: spectrum.dispersion,
      resolvingPower: spectrum.resolvingPower,
      vMag: spectrum.vMag,
      notes: spectrum.notes,
    },
    campaign: toRules(campaign),
    measurement: measurements.current,
    suggestion: suggestion && !blind ? toSuggestionView(suggestion) : null,
    hidden: blind && suggestion !== null,
    claim: showClaim ? toClaimView(claim, user, names, now) : null,
    calls: visibleRows.map((r) => toCallView(r, names)),
    othersHidden: blind,
    callsSoFar: standing.length,
    callsRequired: campaign.callsRequired + spectrum.extraCalls,
    myCall: hasCalled ? toCallView(mine[mine.length - 1]!, names) : null,
    canCall: { allowed: refusal === null, reason: refusal?.reason ?? null, code: refusal?.code ?? null },
    canCorrect: hasCalled && spectrum.status === 'under_review',
    dispute: dispute ? { id: dispute.id, openedAt: dispute.createdAt.toISOString(), settled } : null,
    classification,
  }
}

// ---------------------------------------------------------------------------------------------
// Recording a call
// ---------------------------------------------------------------------------------------------

const conflict = (code: string, message: string) => new HttpError(409, code, message)

/**
 * Records one classifier's call and, once the campaign's required number of people have called,
 * decides the spectrum: agreed with the consensus, or disputed. Rows are only ever added.
 */
export async function recordCall(
  ctx: Pick<AppContext, 'sequelize' | 'mailer' | 'config' | 'logger'>,
  user: User,
  spectrumId: number,
  input: RecordCallInput,
  now = new Date(),
): Promise<RecordCallResult> {
  await findVisibleSpectrum(user, spectrumId)
  const result = await ctx.sequelize.transaction(async (transaction) => {
    // The row lock serialises calls on one spectrum, so the N-th call is judged exactly once.
    const spectrum = await Spectrum.findByPk(spectrumId, { transaction, lock: transaction.LOCK.UPDATE, rejectOnEmpty: true })
    const campaign = await Campaign.findByPk(spectrum.campaignId, { transaction, rejectOnEmpty: true })
    const rows = await ReviewCall.findAll({ where: { spectrumId }, order: [['id', 'ASC']], transaction })
    const mine = rows.filter((r) => r.userId === user.id)
    const correcting = input.correctsCallId !== undefined
    if (spectrum.submittedBy === user.id) throw new HttpError(403, 'own_submission', 'You submitted this spectrum; someone else classifies it.')
    if (!OPEN_FOR_CALLS.includes(spectrum.status)) throw conflict('not_open', `The spectrum is ${spectrum.status.replace('_', ' ')} and takes no calls.`)
    if (correcting) {
      const standing = mine[mine.length - 1]
      if (!standing) throw conflict('no_call', 'You have no call on this spectrum to correct.')
      if (standing.id !== input.correctsCallId) throw conflict('not_latest', `Correct your standing call (#${standing.id}), not an earlier one.`)
    } else if (mine.length > 0) {
      throw conflict('already_called', 'You have recorded your call on this spectrum; record a correction instead.')
    }

    const suggestion = await currentSuggestion(spectrumId, transaction)
    const shown = suggestion !== null && !isBlindFor(campaign, spectrum, mine.length > 0)
    let parsed: ParsedCall
    if (input.acceptedSuggestion) {
      if (!suggestion) throw new HttpError(422, 'no_suggestion', 'There is no suggestion to accept.')
      if (!shown) throw new HttpError(422, 'suggestion_not_shown', 'Blind review: record your own call before the suggestion is shown.')
      const explicit = input.spectralType !== undefined && input.luminosityClass !== undefined
      // Without values of their own the call is the suggestion, codes included.
      parsed = explicit
        ? parseCallType(input.spectralType!, input.luminosityClass!, input.peculiarities ?? '')
        : { ...suggestionAsCall(suggestion), typeCode: suggestion.typeCode, classCode: suggestion.classCode }
      if (explicit && (Math.abs(parsed.typeCode - suggestion.typeCode) > 0.01 || Math.abs(parsed.classCode - suggestion.classCode) > 0.01)) {
        throw new HttpError(422, 'not_the_suggestion', `The suggestion is ${suggestion.spectralType}; record your own call if you see something else.`, {
          fields: { spectralType: `differs from the suggestion ${suggestion.spectralType}` },
        })
      }
    } else {
      if (!input.spectralType || !input.luminosityClass)
        throw new HttpError(422, 'invalid_input', 'Some fields are not valid.', { fields: { spectralType: 'give a spectral type and a luminosity class, or accept the suggestion' } })
      parsed = parseCallType(input.spectralType, input.luminosityClass, input.peculiarities ?? '')
    }

    const held = await ReviewClaim.findByPk(spectrumId, { transaction })
    if (!correcting && held && held.userId !== user.id && held.expiresAt > now) {
      throw new HttpError(409, 'claimed', `Someone else is working on this spectrum until ${held.expiresAt.toISOString()}; try again after that.`, { expiresAt: held.expiresAt.toISOString() })
    }
    const claim = held && held.userId === user.id ? held : null
    const seconds = input.secondsSpent ?? (claim ? Math.max(0, Math.round((now.getTime() - claim.claimedAt.getTime()) / 1000)) : null)
    let call: ReviewCall
    try {
      call = await ReviewCall.create(
        {
          spectrumId,
          userId: user.id,
          kind: correcting ? 'correction' : 'call',
          firstCall: correcting ? null : 1,
          correctsCallId: input.correctsCallId ?? null,
          spectralType: parsed.spectralType,
          letter: parsed.letter,
          subtype: parsed.subtype,
          typeCode: parsed.typeCode,
          luminosityClass: parsed.luminosityClass,
          classCode: parsed.classCode,
          peculiarities: JSON.stringify(parsed.peculiarities),
          notes: input.notes ?? '',
          confidence: input.confidence,
          uncertain: (input.uncertain ?? false) || parsed.uncertain,
          acceptedSuggestion: input.acceptedSuggestion ?? false,
          suggestionId: suggestion?.id ?? null,
          suggestionShown: shown,
          secondsSpent: seconds,
          createdAt: now,
        },
        { transaction },
      )
    } catch (error) {
      if (error instanceof UniqueConstraintError) throw conflict('already_called', 'You have recorded your call on this spectrum.')
      throw error
    }
    if (claim) await ReviewClaim.destroy({ where: { spectrumId, userId: user.id }, transaction })

    const standing = standingCalls([...rows, call])
    let outcome: RecordCallResult['outcome'] = 'waiting'
    let classification: Classification | null = null
    let dispute: Dispute | null = null
    const required = campaign.callsRequired + spectrum.extraCalls
    if (standing.length < required) {
      if (spectrum.status !== 'under_review') await spectrum.update({ status: 'under_review', statusReason: null }, { transaction })
    } else {
      const judged = spectrum.extraCalls > 0 ? judgeByMajority(standing, campaign, suggestion) : judgeCalls(standing, campaign, suggestion)
      if (judged.outcome === 'agreed') {
        outcome = 'agreed'
        const c = judged.consensus
        classification = await Classification.create(
          {
            spectrumId,
            source: judged.source,
            spectralType: c.spectralType,
            letter: c.letter,
            subtype: c.subtype,
            typeCode: c.typeCode,
            luminosityClass: c.luminosityClass,
            classCode: c.classCode,
            peculiarities: JSON.stringify(c.peculiarities),
            decidedBy: user.id,
            nCalls: standing.length,
            callIds: JSON.stringify(standing.map((s) => s.id)),
            agreement: judged.agreement,
            typeSpread: judged.typeSpread,
            classSpread: judged.classSpread,
            suggestionId: suggestion?.id ?? null,
            disputeId: null,
            note: '',
            createdAt: now,
          },
          { transaction },
        )
        await spectrum.update({ status: 'agreed', statusReason: null }, { transaction })
      } else {
        outcome = 'disputed'
        dispute = await Dispute.create(
          {
            spectrumId,
            campaignId: campaign.id,
            callIds: JSON.stringify(standing.map((s) => s.id)),
            typeSpread: judged.typeSpread,
            classSpread: judged.classSpread,
            typeTolerance: campaign.typeTolerance,
            classTolerance: campaign.classTolerance,
            createdAt: now,
          },
          { transaction },
        )
        await spectrum.update({ status: 'disputed', statusReason: `The calls differ by ${judged.typeSpread} subtypes and ${judged.classSpread} classes; a lead settles it.` }, { transaction })
      }
    }
    return { spectrum, call, outcome, classification, dispute, callsSoFar: standing.length, callsRequired: required }
  })

  const names = await namesOf([user.id])
  const final = result.classification ? toFinalClassification(result.classification, names) : null
  if (final) await notifySubmitter(ctx, result.spectrum, final)
  return {
    call: toCallView(result.call, names),
    spectrum: { id: result.spectrum.id, status: result.spectrum.status },
    outcome: result.outcome,
    callsSoFar: result.callsSoFar,
    callsRequired: result.callsRequired,
    classification: final,
    dispute: result.dispute ? { id: result.dispute.id } : null,
  }
}

// ---------------------------------------------------------------------------------------------
// Mail
// ---------------------------------------------------------------------------------------------

/** Tells the observer who submitted the spectrum how it was classified. A failed mail never undoes the decision. */
export async function notifySubmitter(ctx: Pick<AppContext, 'mailer' | 'config' | 'logger'>, spectrum: Spectrum, final: FinalClassification): Promise<void> {
  const submitter = await User.findByPk(spectrum.submittedBy, { attributes: ['id', 'email', 'name', 'active'] })
  if (!submitter || !submitter.active) return
  const link = `${ctx.config.publicUrl.replace(/\/$/, '')}/spectra/${spectrum.id}`
  const how =
    final.source === 'settled'
      ? `A lead settled it after the classifiers disagreed${final.note ? `: ${final.note}` : '.'}`
      : final.nCalls === 1
        ? final.source === 'accepted-suggestion'
          ? 'A classifier confirmed the suggested classification.'
          : 'A classifier recorded it.'
        : `${final.nCalls} classifiers agreed on it${final.source === 'accepted-suggestion' ? ', confirming the suggested classification' : ''}.`
  try {
    await ctx.mailer.send({
      to: submitter.email,
      subject: `${spectrum.objectName} is classified ${final.spectralType}`,
      text: [
        `Hello ${submitter.name},`,
        '',
        `Your spectrum of ${spectrum.objectName} (#${spectrum.id}, ${spectrum.fileName}) is ${final.source === 'settled' ? 'settled' : 'agreed'}.`,
        '',
        `Spectral type and luminosity class: ${final.spectralType}`,
        how,
        '',
        `See it here: ${link}`,
        '',
        '— Lineweight',
      ].join('\n'),
    })
  } catch (error) {
    ctx.logger.warn({ err: error, spectrumId: spectrum.id }, 'could not send the classification mail')
  }
}
