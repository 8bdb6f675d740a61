import { Op, QueryTypes, type WhereOptions } from 'sequelize'
import type { AppContext } from '../context'
import { HttpError, forbidden, notFound } from '../lib/http-error'
import { Campaign, CampaignMember, Spectrum, User } from '../models'
import type { CreateCampaignInput, UpdateCampaignInput } from '../../shared/api/campaigns'
import type { CampaignDetail, CampaignMemberSummary, CampaignProgress, CampaignSummary } from '../../shared/api/campaigns'

export type { CampaignDetail, CampaignMemberSummary, CampaignProgress, CampaignSummary }

export const toCampaignSummary = (c: Campaign): CampaignSummary => ({
  id: c.id,
  code: c.code,
  name: c.name,
  description: c.description,
  observatory: c.observatory,
  regionMin: c.regionMin,
  regionMax: c.regionMax,
  callsRequired: c.callsRequired,
  blindReview: c.blindReview,
  typeTolerance: c.typeTolerance,
  classTolerance: c.classTolerance,
  deadline: c.deadline ?? null,
})

/** Spectra of each campaign counted by status. */
export async function progressOf(campaignIds: number[]): Promise<Map<number, CampaignProgress>> {
  const out = new Map<number, CampaignProgress>()
  if (campaignIds.length === 0) return out
  const rows = (await Spectrum.count({ where: { campaignId: { [Op.in]: campaignIds } }, group: ['campaignId', 'status'] })) as unknown as { campaignId: number; status: string; count: number }[]
  for (const id of campaignIds) out.set(id, { total: 0, processing: 0, waiting: 0, underReview: 0, agreed: 0, disputed: 0, settled: 0, failed: 0, calls: 0 })
  const calls = await Campaign.sequelize!.query<{ campaignId: number; n: number }>(
    'SELECT sp.campaign_id AS campaignId, COUNT(*) AS n FROM review_calls rc JOIN spectra sp ON sp.id = rc.spectrum_id WHERE sp.campaign_id IN (:ids) GROUP BY sp.campaign_id',
    { replacements: { ids: campaignIds }, type: QueryTypes.SELECT },
  )
  for (const c of calls) {
    const p = out.get(Number(c.campaignId))
    if (p) p.calls = Number(c.n)
  }
  const KEY: Record<string, keyof Omit<CampaignProgress, 'calls' | 'total'>> = {
    received: 'processing',
    measured: 'processing',
    suggested: 'waiting',
    under_review: 'underReview',
    agreed: 'agreed',
    disputed: 'disputed',
    settled: 'settled',
    failed: 'failed',
  }
  for (const r of rows) {
    const p = out.get(Number(r.campaignId))
    const k = KEY[r.status]
    if (!p || !k) continue
    p[k] += Number(r.count)
    p.total += Number(r.count)
  }
  return out
}

/** Campaign ids the user belongs to; leads belong to every campaign. */
export async function campaignIdsOf(user: User): Promise<number[] | 'all'> {
  if (user.role === 'lead') return 'all'
  const rows = await CampaignMember.findAll({ where: { userId: user.id }, attributes: ['campaignId'] })
  return rows.map((r) => r.campaignId)
}

export async function listCampaignsFor(user: User): Promise<CampaignSummary[]> {
  const ids = await campaignIdsOf(user)
  const where: WhereOptions<Campaign> = ids === 'all' ? {} : { id: { [Op.in]: ids } }
  const campaigns = await Campaign.findAll({ where, order: [['name', 'ASC']] })
  const progress = await progressOf(campaigns.map((c) => c.id))
  return campaigns.map((c) => ({ ...toCampaignSummary(c), progress: progress.get(c.id)! }))
}

/** The campaign, if the user may submit into it. */
export async function campaignForSubmission(user: User, campaignId: number): Promise<Campaign> {
  const campaign = await Campaign.findByPk(campaignId)
  if (!campaign) throw notFound('The campaign')
  const ids = await campaignIdsOf(user)
  if (ids !== 'all' && !ids.includes(campaignId)) throw forbidden('You are not a member of this campaign.')
  return campaign
}

async function membersOf(campaignId: number, viewer: User): Promise<CampaignMemberSummary[]> {
  const rows = await CampaignMember.findAll({ where: { campaignId }, attributes: ['userId'] })
  if (rows.length === 0) return []
  const users = await User.findAll({
    where: { id: { [Op.in]: rows.map((r) => r.userId) } },
    order: [
      ['name', 'ASC'],
      ['id', 'ASC'],
    ],
  })
  return users.map((u) => ({ id: u.id, name: u.name, role: u.role, active: u.active, ...(viewer.role === 'lead' ? { email: u.email } : {}) }))
}

/** A campaign with its people; members see it, others are told it does not exist. */
export async function getCampaign(user: User, id: number): Promise<CampaignDetail> {
  const campaign = await Campaign.findByPk(id)
  const ids = await campaignIdsOf(user)
  if (!campaign || (ids !== 'all' && !ids.includes(id))) throw notFound('The campaign')
  const progress = (await progressOf([id])).get(id)!
  return { ...toCampaignSummary(campaign), progress, members: await membersOf(id, user), createdAt: campaign.createdAt.toISOString(), updatedAt: campaign.updatedAt.toISOString() }
}

export async function createCampaign(lead: User, input: CreateCampaignInput): Promise<CampaignDetail> {
  if (await Campaign.findOne({ where: { code: input.code }, attributes: ['id'] })) {
    throw new HttpError(409, 'conflict', `A campaign with the code ${input.code} already exists.`, { fields: { code: 'is already taken' } })
  }
  const campaign = await Campaign.create({
    code: input.code,
    name: input.name,
    description: input.description,
    observatory: input.observatory,
    ...(input.regionMin !== undefined ? { regionMin: input.regionMin } : {}),
    ...(input.regionMax !== undefined ? { regionMax: input.regionMax } : {}),
    callsRequired: input.callsRequired,
    blindReview: input.blindReview,
    typeTolerance: input.typeTolerance,
    classTolerance: input.classTolerance,
    deadline: input.deadline ?? null,
  })
  if (campaign.regionMin >= campaign.regionMax) {
    await campaign.destroy()
    throw new HttpError(422, 'invalid_input', 'Some fields are not valid.', { fields: { regionMax: 'the region must start below where it ends' } })
  }
  return getCampaign(lead, campaign.id)
}

/** New rules apply from the next call; calls already recorded keep the rules they were judged by. */
export async function updateCampaign(lead: User, id: number, input: UpdateCampaignInput): Promise<CampaignDetail> {
  const campaign = await Campaign.findByPk(id)
  if (!campaign) throw notFound('The campaign')
  const regionMin = input.regionMin ?? campaign.regionMin
  const regionMax = input.regionMax ?? campaign.regionMax
  if (regionMin >= regionMax) {
    throw new HttpError(422, 'invalid_input', 'Some fields are not valid.', { fields: { [input.regionMax !== undefined ? 'regionMax' : 'regionMin']: 'the region must start below where it ends' } })
  }
  await campaign.update(input)
  return getCampaign(lead, id)
}

async function assignableUsers(userIds: number[]): Promise<number[]> {
  const unique = [...new Set(userIds)]
  if (unique.length === 0) return []
  const users = await User.findAll({ where: { id: { [Op.in]: unique } }, attributes: ['id'] })
  const found = new Set(users.map((u) => u.id))
  const missing = unique.filter((id) => !found.has(id))
  if (missing.length > 0) throw new HttpError(422, 'unknown_users', `No user has the id ${missing.join(', ')}.`, { fields: { userIds: `unknown: ${missing.join(', ')}` }, missing })
  return unique
}

/** Replaces the campaign's people with exactly these users. */
export async function setCampaignMembers(ctx: Pick<AppContext, 'sequelize'>, lead: User, id: number, userIds: number[]): Promise<CampaignDetail> {
  const campaign = await Campaign.findByPk(id)
  if (!campaign) throw notFound('The campaign')
  const wanted = await assignableUsers(userIds)
  await ctx.sequelize.transaction(async (transaction) => {
    const where = wanted.length > 0 ? { campaignId: id, userId: { [Op.notIn]: wanted } } : { campaignId: id }
    await CampaignMember.destroy({ where, transaction })
    const existing = new Set((await CampaignMember.findAll({ where: { campaignId: id }, attributes: ['userId'], transaction })).map((m) => m.userId))
    const added = wanted.filter((u) => !existing.has(u))
    if (added.length > 0)
      await CampaignMember.bulkCreate(
        added.map((userId) => ({ campaignId: id, userId })),
        { transaction },
      )
  })
  return getCampaign(lead, id)
}

export async function addCampaignMember(lead: User, id: number, userId: number): Promise<CampaignDetail> {
  const campaign = await Campaign.findByPk(id)
  if (!campaign) throw notFound('The campaign')
  await assignableUsers([userId])
  await CampaignMember.findOrCreate({ where: { campaignId: id, userId } })
  return getCampaign(lead, id)
}

export async function removeCampaignMember(lead: User, id: number, userId: number): Promise<CampaignDetail> {
  const campaign = await Campaign.findByPk(id)
  if (!campaign) throw notFound('The campaign')
  await CampaignMember.destroy({ where: { campaignId: id, userId } })
  return getCampaign(lead, id)
}
