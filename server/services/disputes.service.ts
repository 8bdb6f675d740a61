import { Op, UniqueConstraintError, type WhereOptions } from 'sequelize'
import type { AppContext } from '../context'
import { HttpError, notFound } from '../lib/http-error'
import { Campaign, Classification, Dispute, DisputeAction, ReviewCall, Spectrum, Suggestion, type User } from '../models'
import { parseCallType } from '../review/consensus'
import { namesOf, notifySubmitter, standingCalls, toCallView, toFinalClassification, toSuggestionView } from './review.service'
import type { DisputeActionInput, DisputeQuery, DisputeState, DisputeView, SettleInput } from '../../shared/api/disputes'

export type { DisputeActionInput, DisputeState, DisputeView, SettleInput }

async function disputeViews(disputes: Dispute[]): Promise<DisputeView[]> {
  if (disputes.length === 0) return []
  const spectrumIds = [...new Set(disputes.map((d) => d.spectrumId))]
  const [spectra, campaigns, calls, settlements, suggestions, actions] = await Promise.all([
    Spectrum.findAll({ where: { id: { [Op.in]: spectrumIds } }, attributes: ['id', 'objectName', 'status', 'snr', 'createdAt'] }),
    Campaign.findAll({ where: { id: { [Op.in]: [...new Set(disputes.map((d) => d.campaignId))] } }, attributes: ['id', 'code', 'name'] }),
    ReviewCall.findAll({ where: { spectrumId: { [Op.in]: spectrumIds } }, order: [['id', 'ASC']] }),
    Classification.findAll({ where: { disputeId: { [Op.in]: disputes.map((d) => d.id) } } }),
    Suggestion.findAll({ where: { spectrumId: { [Op.in]: spectrumIds }, isCurrent: true }, order: [['id', 'ASC']] }),
    DisputeAction.findAll({ where: { disputeId: { [Op.in]: disputes.map((d) => d.id) } } }),
  ])
  const names = await namesOf([...calls.map((c) => c.userId), ...settlements.map((s) => s.decidedBy), ...actions.map((a) => a.decidedBy)])
  const actionOf = new Map(actions.map((a) => [a.disputeId, a]))
  const spectrumOf = new Map(spectra.map((s) => [s.id, s]))
  const campaignOf = new Map(campaigns.map((c) => [c.id, c]))
  const settlementOf = new Map(settlements.map((s) => [s.disputeId!, s]))
  const suggestionOf = new Map(suggestions.map((s) => [s.spectrumId, s]))
  return disputes.map((d) => {
    const s = spectrumOf.get(d.spectrumId)!
    const c = campaignOf.get(d.campaignId)
    const ids = new Set(JSON.parse(d.callIds) as number[])
    const onSpectrum = calls.filter((k) => k.spectrumId === d.spectrumId)
    const settlement = settlementOf.get(d.id)
    const suggestion = suggestionOf.get(d.spectrumId)
    const action = actionOf.get(d.id)
    return {
      id: d.id,
      state: settlement ? 'settled' : action ? action.action : 'open',
      openedAt: d.createdAt.toISOString(),
      spectrum: { id: s.id, objectName: s.objectName, status: s.status, snr: s.snr, createdAt: s.createdAt.toISOString() },
      campaign: { id: d.campaignId, code: c?.code ?? '', name: c?.name ?? '' },
      typeSpread: d.typeSpread,
      classSpread: d.classSpread,
      typeTolerance: d.typeTolerance,
      classTolerance: d.classTolerance,
      calls: onSpectrum.filter((k) => ids.has(k.id)).map((k) => toCallView(k, names)),
      allCalls: onSpectrum.map((k) => toCallView(k, names)),
      suggestion: suggestion ? toSuggestionView(suggestion) : null,
      settlement: settlement ? toFinalClassification(settlement, names) : null,
      action: action ? { kind: action.action, note: action.note, by: { id: action.decidedBy, name: names.get(action.decidedBy) ?? '' }, at: action.createdAt.toISOString() } : null,
    }
  })
}

export type { DisputeQuery }

/** Open and settled disputes, open ones first, oldest first within each. */
export async function listDisputes(q: DisputeQuery): Promise<{ disputes: DisputeView[] }> {
  const where: WhereOptions<Dispute> = q.campaign !== undefined ? { campaignId: q.campaign } : {}
  const views = await disputeViews(await Dispute.findAll({ where, order: [['id', 'ASC']] }))
  const filtered = q.state === 'all' ? views : views.filter((v) => v.state === q.state)
  return { disputes: [...filtered.filter((v) => v.state === 'open'), ...filtered.filter((v) => v.state !== 'open').reverse()] }
}

export async function getDispute(id: number): Promise<DisputeView> {
  const d = await Dispute.findByPk(id)
  if (!d) throw notFound('The dispute')
  return (await disputeViews([d]))[0]!
}

/** A lead's final call on a disputed spectrum: a settled classification, and the spectrum is settled. */
export async function settleDispute(ctx: Pick<AppContext, 'sequelize' | 'mailer' | 'config' | 'logger'>, lead: User, disputeId: number, input: SettleInput, now = new Date()): Promise<DisputeView> {
  const dispute = await Dispute.findByPk(disputeId)
  if (!dispute) throw notFound('The dispute')
  const parsed = parseCallType(input.spectralType, input.luminosityClass, input.peculiarities ?? '')
  const spectrum = await ctx.sequelize.transaction(async (transaction) => {
    const s = await Spectrum.findByPk(dispute.spectrumId, { transaction, lock: transaction.LOCK.UPDATE, rejectOnEmpty: true })
    if (await Classification.count({ where: { disputeId }, transaction })) throw new HttpError(409, 'already_settled', 'This dispute is settled already.')
    if (await DisputeAction.count({ where: { disputeId }, transaction })) throw new HttpError(409, 'already_answered', 'This dispute went back to the classifiers; it is not open any more.')
    if (s.status !== 'disputed') throw new HttpError(409, 'not_disputed', `The spectrum is ${s.status.replace('_', ' ')}, not disputed.`)
    const calls = standingCalls(await ReviewCall.findAll({ where: { spectrumId: s.id }, transaction }))
    const suggestion = await Suggestion.findOne({ where: { spectrumId: s.id, isCurrent: true }, order: [['id', 'DESC']], transaction })
    try {
      await Classification.create(
        {
          spectrumId: s.id,
          source: 'settled',
          spectralType: parsed.spectralType,
          letter: parsed.letter,
          subtype: parsed.subtype,
          typeCode: parsed.typeCode,
          luminosityClass: parsed.luminosityClass,
          classCode: parsed.classCode,
          peculiarities: JSON.stringify(parsed.peculiarities),
          decidedBy: lead.id,
          nCalls: calls.length,
          callIds: JSON.stringify(calls.map((c) => c.id)),
          agreement: 'settled',
          typeSpread: dispute.typeSpread,
          classSpread: dispute.classSpread,
          suggestionId: suggestion?.id ?? null,
          disputeId,
          note: input.note,
          createdAt: now,
        },
        { transaction },
      )
    } catch (error) {
      if (error instanceof UniqueConstraintError) throw new HttpError(409, 'already_settled', 'This dispute is settled already.')
      throw error
    }
    await s.update({ status: 'settled', statusReason: null }, { transaction })
    return s
  })
  const view = await getDispute(disputeId)
  await notifySubmitter(ctx, spectrum, view.settlement!)
  return view
}

/**
 * A lead's other answers to a dispute. 'another-call' asks one more classifier (someone who has not
 * called) for a call: the spectrum goes back to the queue needing one call more, and the calls are
 * then judged by majority. 'reopened' gives the spectrum back to the classifiers who called, so they
 * can correct their calls; a correction judges the calls again.
 */
export async function answerDispute(lead: User, disputeId: number, input: DisputeActionInput, now = new Date()): Promise<DisputeView> {
  const dispute = await Dispute.findByPk(disputeId)
  if (!dispute) throw notFound('The dispute')
  await Dispute.sequelize!.transaction(async (transaction) => {
    const s = await Spectrum.findByPk(dispute.spectrumId, { transaction, lock: transaction.LOCK.UPDATE, rejectOnEmpty: true })
    if (await Classification.count({ where: { disputeId }, transaction })) throw new HttpError(409, 'already_settled', 'This dispute is settled already.')
    if (s.status !== 'disputed') throw new HttpError(409, 'not_disputed', `The spectrum is ${s.status.replace('_', ' ')}, not disputed.`)
    try {
      await DisputeAction.create({ disputeId, action: input.action, note: input.note, decidedBy: lead.id, createdAt: now }, { transaction })
    } catch (error) {
      if (error instanceof UniqueConstraintError) throw new HttpError(409, 'already_answered', 'This dispute has been answered already.')
      throw error
    }
    if (input.action === 'another-call') {
      await s.update({ status: 'under_review', statusReason: 'A lead asked another classifier for a call after the calls disagreed.', extraCalls: s.extraCalls + 1 }, { transaction })
    } else {
      await s.update({ status: 'under_review', statusReason: 'A lead reopened the calls: the classifiers who called can correct them.' }, { transaction })
    }
  })
  return getDispute(disputeId)
}
