import { Op, QueryTypes, UniqueConstraintError } from 'sequelize'
import type { AppContext } from '../context'
import { HttpError } from '../lib/http-error'
import { Campaign, ReviewCall, ReviewClaim, Spectrum, Suggestion, type User } from '../models'
import { campaignIdsOf } from './campaigns.service'
import { OPEN_FOR_CALLS } from '../review/consensus'
import { namesOf, suggestionFlags, toClaimView, toSuggestionView, type ClaimView } from './review.service'
import { findVisibleSpectrum } from './visibility'
import type { QueueItem, QueueOrder, QueuePage, QueueQuery, QueueSuggestion } from '../../shared/api/queue'

export type { QueueItem, QueueOrder }

/** How long a claim holds an item before it lapses by itself. */
export const CLAIM_MINUTES = 10

export type { QueueQuery }

/** MariaDB DATETIME(3) text of a moment, in UTC as the connection stores it. */
const sqlTime = (d: Date) => d.toISOString().slice(0, 23).replace('T', ' ')

/** Each order is the column order of one spectra index (migration 0020); NULL S/N sorts last under DESC. */
const ORDER_SQL: Record<QueueOrder, { index: string; sql: string }> = {
  oldest: { index: 'spectra_queue_oldest', sql: 'sp.created_at ASC, sp.id ASC' },
  snr: { index: 'spectra_queue_snr', sql: 'sp.snr DESC, sp.id ASC' },
  flagged: { index: 'spectra_queue_flagged', sql: 'sp.flag_count DESC, sp.created_at ASC, sp.id ASC' },
}

/**
 * Ids of the spectra that still need this user's call, in queue order. `keep` stays in the list even
 * after the user has called on or released it, so "the item after it" can be found.
 */
async function queueIds(ctx: Pick<AppContext, 'sequelize'>, user: User, q: QueueQuery, now: Date, keep?: number): Promise<number[]> {
  const campaigns = await campaignIdsOf(user)
  if (campaigns !== 'all' && campaigns.length === 0) return []
  // open_for_calls is stored as status IN OPEN_FOR_CALLS (migration 0020).
  const where: string[] = ['sp.open_for_calls = 1', 'sp.submitted_by <> :uid']
  const r: Record<string, unknown> = { uid: user.id, now: sqlTime(now), limit: q.limit }
  if (campaigns !== 'all') {
    where.push('sp.campaign_id IN (:campaigns)')
    r.campaigns = campaigns
  }
  const stillMine = [
    'NOT EXISTS (SELECT 1 FROM review_calls rc WHERE rc.spectrum_id = sp.id AND rc.user_id = :uid)',
    'NOT EXISTS (SELECT 1 FROM review_claims cl WHERE cl.spectrum_id = sp.id AND cl.user_id <> :uid AND cl.expires_at > :now)',
  ].join(' AND ')
  if (keep !== undefined) {
    where.push(`(sp.id = :keep OR (${stillMine}))`)
    r.keep = keep
  } else where.push(stillMine)
  if (q.campaign !== undefined) {
    where.push('sp.campaign_id = :campaign')
    r.campaign = q.campaign
  }
  if (q.snrMin !== undefined) {
    where.push('sp.snr >= :snrMin')
    r.snrMin = q.snrMin
  }
  if (q.snrMax !== undefined) {
    where.push('sp.snr <= :snrMax')
    r.snrMax = q.snrMax
  }
  ;(q.flags ?? []).forEach((flag, i) => {
    where.push(`sp.id IN (SELECT f.spectrum_id FROM spectrum_flags f WHERE f.flag = :flag${i})`)
    r[`flag${i}`] = flag
  })
  const bySuggestion = q.typeFrom !== undefined || q.typeTo !== undefined
  if (q.typeFrom !== undefined || q.typeTo !== undefined) where.push('sp.campaign_id IN (SELECT c.id FROM campaigns c WHERE c.blind_review = 0)')
  if (q.typeFrom !== undefined) {
    where.push('sg.type_code >= :typeFrom')
    r.typeFrom = q.typeFrom
  }
  if (q.typeTo !== undefined) {
    where.push('sg.type_code <= :typeTo')
    r.typeTo = q.typeTo
  }
  if (!bySuggestion) where.push('EXISTS (SELECT 1 FROM suggestions sg WHERE sg.spectrum_id = sp.id AND sg.is_current = 1)')
  // One pass down the order's index, stopping at the limit; every test per row is a key lookup.
  const sql = `
    SELECT sp.id AS id
    FROM spectra sp
    ${bySuggestion ? 'JOIN suggestions sg ON sg.spectrum_id = sp.id AND sg.is_current = 1' : ''}
    WHERE ${where.join('\n      AND ')}
    ORDER BY ${ORDER_SQL[q.order].sql}
    LIMIT :limit`
  const rows = await ctx.sequelize.query<{ id: number }>(sql, { replacements: r, type: QueryTypes.SELECT })
  return rows.map((row) => Number(row.id))
}

function toQueueSuggestion(s: Suggestion): QueueSuggestion {
  const { candidates: _c, votes: _v, ...rest } = toSuggestionView(s)
  return rest
}

async function queueItems(user: User, ids: number[], now: Date): Promise<QueueItem[]> {
  if (ids.length === 0) return []
  const [spectra, suggestions, calls, claims] = await Promise.all([
    // Plain rows (raw): a page holds a few hundred, and model instances cost more than the query.
    Spectrum.findAll({ where: { id: { [Op.in]: ids } }, attributes: ['id', 'objectName', 'campaignId', 'snr', 'createdAt', 'status', 'extraCalls'], raw: true }),
    // The standards, criteria and probability grid are the bulk of a suggestion row; a queue row shows the call.
    Suggestion.findAll({ where: { spectrumId: { [Op.in]: ids }, isCurrent: true }, attributes: { exclude: ['probabilities', 'candidates', 'votes'] }, order: [['id', 'ASC']], raw: true }),
    ReviewCall.findAll({ where: { spectrumId: { [Op.in]: ids } }, attributes: ['spectrumId', 'userId'], raw: true }),
    ReviewClaim.findAll({ where: { spectrumId: { [Op.in]: ids }, userId: user.id, expiresAt: { [Op.gt]: now } } }),
  ])
  const campaigns = new Map((await Campaign.findAll({ where: { id: { [Op.in]: [...new Set(spectra.map((s) => s.campaignId))] } } })).map((c) => [c.id, c]))
  const byId = new Map(spectra.map((s) => [s.id, s]))
  const suggestionOf = new Map(suggestions.map((s) => [s.spectrumId, s]))
  const callers = new Map<number, Set<number>>()
  for (const c of calls) {
    if (!callers.has(c.spectrumId)) callers.set(c.spectrumId, new Set())
    callers.get(c.spectrumId)!.add(c.userId)
  }
  const claimOf = new Map(claims.map((c) => [c.spectrumId, c]))
  return ids.flatMap((id) => {
    const s = byId.get(id)
    const campaign = s && campaigns.get(s.campaignId)
    if (!s || !campaign) return []
    const suggestion = suggestionOf.get(id) ?? null
    const claim = claimOf.get(id)
    const hidden = campaign.blindReview && !callers.get(id)?.has(user.id)
    return [
      {
        spectrumId: id,
        objectName: s.objectName,
        campaign: { id: campaign.id, code: campaign.code, name: campaign.name, blindReview: campaign.blindReview },
        snr: s.snr,
        flags: suggestionFlags(suggestion),
        createdAt: s.createdAt.toISOString(),
        status: s.status as QueueItem['status'],
        claim: claim ? { state: 'mine' as const, claimedAt: claim.claimedAt.toISOString(), expiresAt: claim.expiresAt.toISOString() } : { state: 'free' as const },
        calls: { count: callers.get(id)?.size ?? 0, needed: campaign.callsRequired + s.extraCalls },
        suggestion: suggestion && !hidden ? toQueueSuggestion(suggestion) : null,
        hidden: hidden && suggestion !== null,
      },
    ]
  })
}

/** The caller's queue: their campaigns' suggested spectra that still need their call. */
export async function listQueue(ctx: Pick<AppContext, 'sequelize'>, user: User, q: QueueQuery, now = new Date()): Promise<QueuePage> {
  return { items: await queueItems(user, await queueIds(ctx, user, q, now), now), claimMinutes: CLAIM_MINUTES }
}

/** The item after `after` in the caller's queue (the first one without `after`), for working through it in order. */
export async function nextInQueue(ctx: Pick<AppContext, 'sequelize'>, user: User, q: QueueQuery & { after?: number }, now = new Date()): Promise<{ item: QueueItem | null }> {
  const ids = await queueIds(ctx, user, { ...q, limit: q.limit + 1 }, now, q.after)
  const at = q.after === undefined ? -1 : ids.indexOf(q.after)
  const next = ids.slice(at + 1).find((id) => id !== q.after)
  if (next === undefined) return { item: null }
  const [item] = await queueItems(user, [next], now)
  return { item: item ?? null }
}

/** Refuses a claim on a spectrum the user cannot call on. */
async function assertCallable(user: User, spectrum: Spectrum): Promise<void> {
  if (spectrum.submittedBy === user.id) throw new HttpError(403, 'own_submission', 'You submitted this spectrum; someone else classifies it.')
  if (!OPEN_FOR_CALLS.includes(spectrum.status)) throw new HttpError(409, 'not_open', `The spectrum is ${spectrum.status.replace('_', ' ')} and takes no calls.`)
  if (await ReviewCall.count({ where: { spectrumId: spectrum.id, userId: user.id } })) throw new HttpError(409, 'already_called', 'You have recorded your call on this spectrum.')
}

/**
 * Claims the item for CLAIM_MINUTES so no one else works it meanwhile. Claiming one's own claim again
 * extends it; a lapsed claim of anyone can be taken over.
 */
export async function claimSpectrum(user: User, spectrumId: number, maxOpen: number, now = new Date()): Promise<ClaimView> {
  const spectrum = await findVisibleSpectrum(user, spectrumId)
  await assertCallable(user, spectrum)
  // A few open claims each, so no one can empty a colleague's queue.
  const open = await ReviewClaim.count({ where: { userId: user.id, spectrumId: { [Op.ne]: spectrumId }, expiresAt: { [Op.gt]: now } } })
  if (open >= maxOpen) {
    throw new HttpError(409, 'too_many_claims', `You already hold ${open} claims (at most ${maxOpen}); record a call or give one back first.`, { open, max: maxOpen })
  }
  const expiresAt = new Date(now.getTime() + CLAIM_MINUTES * 60_000)
  // Each step is one conditional statement, so two people claiming at once cannot both win.
  const [extended] = await ReviewClaim.update({ expiresAt }, { where: { spectrumId, userId: user.id, expiresAt: { [Op.gt]: now } } })
  if (extended === 0) {
    const [taken] = await ReviewClaim.update({ userId: user.id, claimedAt: now, expiresAt }, { where: { spectrumId, [Op.or]: [{ userId: user.id }, { expiresAt: { [Op.lte]: now } }] } })
    if (taken === 0) {
      try {
        await ReviewClaim.create({ spectrumId, userId: user.id, claimedAt: now, expiresAt })
      } catch (error) {
        if (!(error instanceof UniqueConstraintError)) throw error
      }
    }
  }
  const claim = await ReviewClaim.findByPk(spectrumId)
  if (!claim) throw new HttpError(409, 'claim_lost', 'The claim could not be placed; try again.')
  const names = await namesOf([claim.userId])
  if (claim.userId !== user.id) {
    throw new HttpError(409, 'claimed', `${names.get(claim.userId) ?? 'Someone'} is working on this spectrum until ${claim.expiresAt.toISOString()}.`, {
      by: { id: claim.userId, name: names.get(claim.userId) ?? '' },
      expiresAt: claim.expiresAt.toISOString(),
    })
  }
  return toClaimView(claim, user, names, now)
}

/** Gives the item back to the queue; releasing a claim one does not hold changes nothing. */
export async function releaseClaim(user: User, spectrumId: number): Promise<void> {
  await findVisibleSpectrum(user, spectrumId)
  await ReviewClaim.destroy({ where: { spectrumId, userId: user.id } })
}
