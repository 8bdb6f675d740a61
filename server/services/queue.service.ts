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
  /** SELECT COUNT of everything waiting with these filters, up to WAITING_COUNT_CAP + 1 (no cursor). */
  countSql: string
  replacements: Record<string, unknown>
  /** ORDER BY of the queue order, on `sp`. */
  order: string
}

/**
 * Counting stops at four pages: the queue screen says "more than 200" rather than scan every open
 * spectrum on each visit (campaign progress has the full counts).
 */
export const WAITING_COUNT_CAP = 200

/** The order keys of the item a page continues after (keyset paging: stable while others call). */
interface Cursor {
  id: number
  createdAt: Date
  snr: number | null
  flagCount: number
}

/** Rows after the cursor in each order; NULL S/N sorts last under DESC. */
const AFTER_SQL: Record<QueueOrder, (c: Cursor) => string> = {
  oldest: () => '(sp.created_at > :afterAt OR (sp.created_at = :afterAt AND sp.id > :afterId))',
  snr: (c) => (c.snr === null ? '(sp.snr IS NULL AND sp.id > :afterId)' : '(sp.snr < :afterSnr OR sp.snr IS NULL OR (sp.snr = :afterSnr AND sp.id > :afterId))'),
  flagged: () => '(sp.flag_count < :afterFlags OR (sp.flag_count = :afterFlags AND (sp.created_at > :afterAt OR (sp.created_at = :afterAt AND sp.id > :afterId))))',
}

/** The order keys of spectrum `after` when it is in a campaign the user sees; null otherwise. */
async function cursorOf(ctx: Pick<AppContext, 'sequelize'>, campaigns: number[] | 'all', after: number): Promise<Cursor | null> {
  const [row] = await ctx.sequelize.query<{ id: number; created_at: Date; snr: number | null; flag_count: number }>(
    `SELECT id, created_at, snr, flag_count FROM spectra WHERE id = :after${campaigns === 'all' ? '' : ' AND campaign_id IN (:campaigns)'}`,
    { replacements: { after, campaigns }, type: QueryTypes.SELECT },
  )
  return row ? { id: Number(row.id), createdAt: new Date(row.created_at), snr: row.snr === null ? null : Number(row.snr), flagCount: Number(row.flag_count) } : null
}

/** Plan thresholds; tests lower them to check that both plans give the same answer. */
export const queuePlans = {
  /** Flagged rows from which walking the order's index beats starting from the flag (see flagsAreCommon). */
  commonFlagRows: 4000,
}

/**
 * Whether every flag asked for is common enough that walking the queue order finds a page sooner
 * than reading every flagged spectrum and sorting them. The optimizer starts from the flag whenever
 * it is selective at all, which at 100 000 spectra costs 30 ms for a flag on 8 % of them, against
 * 5 ms for the walk; for rare flags starting from the flag stays the better plan.
 */
async function flagsAreCommon(ctx: Pick<AppContext, 'sequelize'>, flags: string[], now = Date.now()): Promise<boolean> {
  if (flags.length === 0) return false
  for (const flag of flags) {
    // Counting a common flag's first rows reads thousands of index entries; how common a flag is
    // changes slowly, and either plan gives the same page, so the answer is kept a while.
    const key = `${flag}|${queuePlans.commonFlagRows}`
    let known = flagCommonness.get(key)
    if (!known || now - known.at > FLAG_COMMONNESS_MS) {
      const [row] = await ctx.sequelize.query<{ n: number }>('SELECT COUNT(*) AS n FROM (SELECT 1 FROM spectrum_flags WHERE flag = :flag LIMIT :cap) f', {
        replacements: { flag, cap: queuePlans.commonFlagRows },
        type: QueryTypes.SELECT,
      })
      known = { common: Number(row?.n ?? 0) >= queuePlans.commonFlagRows, at: now }
      if (flagCommonness.size > 200) flagCommonness.clear()
      flagCommonness.set(key, known)
    }
    if (!known.common) return false
  }
  return true
}

/** How long flagsAreCommon keeps its answer for a flag, ms. */
const FLAG_COMMONNESS_MS = 60_000
const flagCommonness = new Map<string, { common: boolean; at: number }>()

/**
 * The query of the ids of the spectra that still need this user's call, in queue order (null: the
 * user sees no campaign), starting after `after` when it names a spectrum the user sees.
 */
async function queuePageSql(ctx: Pick<AppContext, 'sequelize'>, user: User, q: QueueQuery, now: Date): Promise<QueuePageSql | null> {
  const campaigns = await campaignIdsOf(user)
  if (campaigns !== 'all' && campaigns.length === 0) return null
  // open_for_calls is stored as status IN OPEN_FOR_CALLS (migration 0020).
  // The caller's own calls are an anti-join: as NOT EXISTS the optimizer may read every call the
  // caller ever made into a temporary table on each request (tens of thousands of rows at scale).
  const where: string[] = [
    'sp.open_for_calls = 1',
    'sp.submitted_by <> :uid',
    'mine.id IS NULL',
    'NOT EXISTS (SELECT 1 FROM review_claims cl WHERE cl.spectrum_id = sp.id AND cl.user_id <> :uid AND cl.expires_at > :now)',
  ]
  const r: Record<string, unknown> = { uid: user.id, now: sqlTime(now), limit: q.limit, cap: WAITING_COUNT_CAP + 1 }
  if (campaigns !== 'all') {
    where.push('sp.campaign_id IN (:campaigns)')
    r.campaigns = campaigns
  }
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
  // A flag is a lookup per row while walking the order's index when it is common (a scalar subquery
  // cannot become a join that starts from the flag); otherwise a semi-join that may start from it.
  const walk = await flagsAreCommon(ctx, q.flags ?? [])
  const flagSemiJoins: string[] = []
  const flagLookups: string[] = []
  ;(q.flags ?? []).forEach((flag, i) => {
    flagSemiJoins.push(`sp.id IN (SELECT f.spectrum_id FROM spectrum_flags f WHERE f.flag = :flag${i})`)
    flagLookups.push(`(SELECT 1 FROM spectrum_flags f WHERE f.spectrum_id = sp.id AND f.flag = :flag${i}) IS NOT NULL`)
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
  const from = [
    'spectra sp',
    'LEFT JOIN review_calls mine ON mine.spectrum_id = sp.id AND mine.user_id = :uid',
    bySuggestion ? 'JOIN suggestions sg ON sg.spectrum_id = sp.id AND sg.is_current = 1' : '',
  ].join(' ')
  // Counting needs no order, so starting from the flag stays the better plan there.
  const countSql = `SELECT COUNT(*) AS n FROM (SELECT 1 FROM ${from} WHERE ${[...where, ...flagSemiJoins].join(' AND ')} LIMIT :cap) waiting`
  const pageWhere = [...where, ...(walk ? flagLookups : flagSemiJoins)]
  const cursor = q.after === undefined ? null : await cursorOf(ctx, campaigns, q.after)
  if (cursor) {
    pageWhere.push(AFTER_SQL[q.order](cursor))
    Object.assign(r, { afterId: cursor.id, afterAt: sqlTime(cursor.createdAt), afterSnr: cursor.snr, afterFlags: cursor.flagCount })
  }
  // One pass down the order's index, stopping at the limit; every test per row is a key lookup.
  const sql = `
    SELECT sp.id AS id
    FROM ${from}
    WHERE ${pageWhere.join('\n      AND ')}
    ORDER BY ${ORDER_SQL[q.order].sql}
    LIMIT :limit`
  return { sql, countSql, replacements: r, order: ORDER_SQL[q.order].sql }
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
 * The rows of a page in one query: spectrum, campaign, current suggestion (its call and
 * uncertainty; candidates, votes, details and the probability grid stay with the review screen),
 * the caller's claim and the number of people who called. Every join is a key lookup.
 */
async function queueItems(ctx: Pick<AppContext, 'sequelize'>, user: User, page: QueuePageSql, now: Date): Promise<QueueItem[]> {
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
     FROM (${page.sql}) page JOIN spectra sp ON sp.id = page.id
     JOIN campaigns c ON c.id = sp.campaign_id
     LEFT JOIN suggestions sg ON sg.spectrum_id = sp.id AND sg.is_current = 1
     LEFT JOIN review_claims cl ON cl.spectrum_id = sp.id AND cl.user_id = :uid AND cl.expires_at > :now
     ORDER BY ${page.order}, sg.id`,
    { replacements: { ...page.replacements, uid: user.id, now: sqlTime(now) }, type: QueryTypes.RAW },
  )) as [QueueRow[], unknown]
  // The newest current suggestion wins should a spectrum ever hold two.
  const byId = new Map(rows.map((r) => [Number(r.id), r]))
  return [...byId].map(([id, r]): QueueItem => {
    const blind = Boolean(Number(r.blind_review))
    const hasSuggestion = r.sg_id !== null
    const hidden = blind && !Number(r.called)
    const flags = hasSuggestion ? parseJson<string[]>(r.flags, []) : []
    return {
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
    }
  })
}

/**
 * A page of the caller's queue: their campaigns' suggested spectra that still need their call, after
 * `after` when given. The first page also says how many wait in all (counted up to a cap).
 */
export async function listQueue(ctx: Pick<AppContext, 'sequelize'>, user: User, q: QueueQuery, now = new Date()): Promise<QueuePage> {
  const page = await queuePageSql(ctx, user, { ...q, limit: q.limit + 1 }, now)
  if (!page) return { items: [], more: false, waiting: q.after === undefined ? { count: 0, atLeast: false } : null, claimMinutes: CLAIM_MINUTES }
  const [items, counted] = await Promise.all([
    queueItems(ctx, user, page, now),
    q.after === undefined ? ctx.sequelize.query<{ n: number }>(page.countSql, { replacements: page.replacements, type: QueryTypes.SELECT }) : null,
  ])
  const n = counted ? Number(counted[0]?.n ?? 0) : null
  return {
    items: items.slice(0, q.limit),
    more: items.length > q.limit,
    waiting: n === null ? null : { count: Math.min(n, WAITING_COUNT_CAP), atLeast: n > WAITING_COUNT_CAP },
    claimMinutes: CLAIM_MINUTES,
  }
}

/** The item after `after` in the caller's queue (the first one without `after`, or when `after` is not theirs to see), for working through it in order. */
export async function nextInQueue(ctx: Pick<AppContext, 'sequelize'>, user: User, q: QueueQuery, now = new Date()): Promise<{ item: QueueItem | null }> {
  const page = await queuePageSql(ctx, user, { ...q, limit: 1 }, now)
  if (!page) return { item: null }
  const [item] = await queueItems(ctx, user, page, now)
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
