import { Op, QueryTypes, UniqueConstraintError } from 'sequelize'
import type { AppContext } from '../context'
import { HttpError } from '../lib/http-error'
import { ReviewCall, ReviewClaim, type Spectrum, type User } from '../models'
import { campaignIdsOf } from './campaigns.service'
import { OPEN_FOR_CALLS } from '../review/consensus'
import { namesOf, parseJson, toClaimView, type ClaimView } from './review.service'
import { sqlTime } from '../lib/sql-time'
import { findVisibleSpectrum } from './visibility'
import type { QueueItem, QueueOrder, QueuePage, QueueQuery } from '../../shared/api/queue'

export type { QueueItem, QueueOrder }

/** How long a claim holds an item before it lapses by itself. */
export const CLAIM_MINUTES = 10

export type { QueueQuery }

/** A stored UTC DATETIME(3) as ISO 8601 text, written by the database: parsing a few hundred dates per page in JS shows in the profile. */
const isoText = (column: string) => `CONCAT(LEFT(DATE_FORMAT(${column}, '%Y-%m-%dT%H:%i:%s.%f'), 23), 'Z')`

/** Each order is the column order of one spectra index (migration 0020); NULL S/N sorts last under DESC. */
const ORDER_SQL: Record<QueueOrder, { index: string; sql: string }> = {
  oldest: { index: 'spectra_queue_oldest', sql: 'sp.created_at ASC, sp.id ASC' },
  snr: { index: 'spectra_queue_snr', sql: 'sp.snr DESC, sp.id ASC' },
  flagged: { index: 'spectra_queue_flagged', sql: 'sp.flag_count DESC, sp.created_at ASC, sp.id ASC' },
}

interface QueuePageSql {
  /** SELECT of the ids, in queue order, up to the limit. */
  sql: string
  replacements: Record<string, unknown>
  /** ORDER BY of the queue order, on `sp`. */
  order: string
}

/**
 * The query of the ids of the spectra that still need this user's call, in queue order (null: the
 * user sees no campaign). `keep` stays in the list even after the user has called on or released
 * it, so "the item after it" can be found.
 */
async function queuePageSql(user: User, q: QueueQuery, now: Date, keep?: number): Promise<QueuePageSql | null> {
  const campaigns = await campaignIdsOf(user)
  if (campaigns !== 'all' && campaigns.length === 0) return null
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
  return { sql, replacements: r, order: ORDER_SQL[q.order].sql }
}

/** The ids of `queuePageSql`, in queue order. */
async function queueIds(ctx: Pick<AppContext, 'sequelize'>, user: User, q: QueueQuery, now: Date, keep?: number): Promise<number[]> {
  const page = await queuePageSql(user, q, now, keep)
  if (!page) return []
  const rows = await ctx.sequelize.query<{ id: number }>(page.sql, { replacements: page.replacements, type: QueryTypes.SELECT })
  return rows.map((row) => Number(row.id))
}

interface QueueRow {
  id: number
  object_name: string
  snr: number | null
  created_at: string
  status: string
  extra_calls: number
  campaign_id: number
  campaign_code: string
  campaign_name: string
  blind_review: number
  calls_required: number
  callers: number
  called: number
  claimed_at: string | null
  claim_expires_at: string | null
  sg_id: number | null
  spectral_type: string
  letter: string
  subtype: number
  type_code: number
  luminosity_class: string
  class_code: number
  uncertainty_subtypes: number
  uncertainty_classes: number
  library_version_id: number
  pipeline_version: string
  best_standard_id: number | null
  flags: string | null
  sg_created_at: string
}

/**
 * The rows of the given spectra in one query: spectrum, campaign, current suggestion (its call and
 * uncertainty; candidates, votes, details and the probability grid stay with the review screen),
 * the caller's claim and the number of people who called. Every join is a key lookup.
 */
async function queueItems(ctx: Pick<AppContext, 'sequelize'>, user: User, of: number[] | QueuePageSql, now: Date): Promise<QueueItem[]> {
  if (Array.isArray(of) && of.length === 0) return []
  // A page is read in the same statement as its ids (a derived table of at most `limit` rows).
  const source = Array.isArray(of)
    ? { from: 'spectra sp', where: 'WHERE sp.id IN (:ids)', order: 'sg.id', replacements: { ids: of } }
    : { from: `(${of.sql}) page JOIN spectra sp ON sp.id = page.id`, where: '', order: `${of.order}, sg.id`, replacements: of.replacements }
  // RAW: the driver's rows as they are; a SELECT would copy every row into a new object first.
  const [rows] = (await ctx.sequelize.query(
    `SELECT sp.id, sp.object_name, sp.snr, ${isoText('sp.created_at')} AS created_at, sp.status, sp.extra_calls,
            c.id AS campaign_id, c.code AS campaign_code, c.name AS campaign_name, c.blind_review, c.calls_required,
            (SELECT COUNT(DISTINCT rc.user_id) FROM review_calls rc WHERE rc.spectrum_id = sp.id) AS callers,
            EXISTS (SELECT 1 FROM review_calls rc WHERE rc.spectrum_id = sp.id AND rc.user_id = :uid) AS called,
            ${isoText('cl.claimed_at')} AS claimed_at, ${isoText('cl.expires_at')} AS claim_expires_at,
            sg.id AS sg_id, sg.spectral_type, sg.letter, sg.subtype, sg.type_code, sg.luminosity_class, sg.class_code,
            sg.uncertainty_subtypes, sg.uncertainty_classes, sg.library_version_id, sg.pipeline_version, sg.best_standard_id,
            sg.flags, ${isoText('sg.created_at')} AS sg_created_at
     FROM ${source.from}
     JOIN campaigns c ON c.id = sp.campaign_id
     LEFT JOIN suggestions sg ON sg.spectrum_id = sp.id AND sg.is_current = 1
     LEFT JOIN review_claims cl ON cl.spectrum_id = sp.id AND cl.user_id = :uid AND cl.expires_at > :now
     ${source.where}
     ORDER BY ${source.order}`,
    { replacements: { ...source.replacements, uid: user.id, now: sqlTime(now) }, type: QueryTypes.RAW },
  )) as [QueueRow[], unknown]
  // The newest current suggestion wins should a spectrum ever hold two.
  const byId = new Map(rows.map((r) => [Number(r.id), r]))
  const ids = Array.isArray(of) ? of : [...byId.keys()]
  return ids.flatMap((id): QueueItem[] => {
    const r = byId.get(id)
    if (!r) return []
    const blind = Boolean(Number(r.blind_review))
    const hasSuggestion = r.sg_id !== null
    const hidden = blind && !Number(r.called)
    const flags = hasSuggestion ? parseJson<string[]>(r.flags, []) : []
    return [
      {
        spectrumId: id,
        objectName: r.object_name,
        campaign: { id: Number(r.campaign_id), code: r.campaign_code, name: r.campaign_name, blindReview: blind },
        snr: r.snr === null ? null : Number(r.snr),
        flags,
        createdAt: r.created_at,
        status: r.status as QueueItem['status'],
        claim: r.claimed_at && r.claim_expires_at ? { state: 'mine' as const, claimedAt: r.claimed_at, expiresAt: r.claim_expires_at } : { state: 'free' as const },
        calls: { count: Number(r.callers), needed: Number(r.calls_required) + Number(r.extra_calls) },
        suggestion:
          hasSuggestion && !hidden
            ? {
                id: Number(r.sg_id),
                spectralType: r.spectral_type,
                letter: r.letter,
                subtype: Number(r.subtype),
                typeCode: Number(r.type_code),
                luminosityClass: r.luminosity_class,
                classCode: Number(r.class_code),
                uncertaintySubtypes: Number(r.uncertainty_subtypes),
                uncertaintyClasses: Number(r.uncertainty_classes),
                libraryVersionId: Number(r.library_version_id),
                pipelineVersion: r.pipeline_version,
                bestStandardId: r.best_standard_id === null ? null : Number(r.best_standard_id),
                flags,
                createdAt: r.sg_created_at,
              }
            : null,
        hidden: hidden && hasSuggestion,
      },
    ]
  })
}

/** The caller's queue: their campaigns' suggested spectra that still need their call. */
export async function listQueue(ctx: Pick<AppContext, 'sequelize'>, user: User, q: QueueQuery, now = new Date()): Promise<QueuePage> {
  const page = await queuePageSql(user, q, now)
  return { items: page ? await queueItems(ctx, user, page, now) : [], claimMinutes: CLAIM_MINUTES }
}

/** The item after `after` in the caller's queue (the first one without `after`), for working through it in order. */
export async function nextInQueue(ctx: Pick<AppContext, 'sequelize'>, user: User, q: QueueQuery & { after?: number }, now = new Date()): Promise<{ item: QueueItem | null }> {
  const ids = await queueIds(ctx, user, { ...q, limit: q.limit + 1 }, now, q.after)
  const at = q.after === undefined ? -1 : ids.indexOf(q.after)
  const next = ids.slice(at + 1).find((id) => id !== q.after)
  if (next === undefined) return { item: null }
  const [item] = await queueItems(ctx, user, [next], now)
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
