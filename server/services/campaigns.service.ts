import { Op, type WhereOptions } from 'sequelize'
import { forbidden, notFound } from '../lib/http-error'
import { Campaign, CampaignMember, type User } from '../models'

export interface CampaignSummary {
  id: number
  code: string
  name: string
  description: string
  observatory: string
  regionMin: number
  regionMax: number
  callsRequired: number
  blindReview: boolean
  typeTolerance: number
  classTolerance: number
}

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
})

/** Campaign ids the user belongs to; leads belong to every campaign. */
export async function campaignIdsOf(user: User): Promise<number[] | 'all'> {
  if (user.role === 'lead') return 'all'
  const rows = await CampaignMember.findAll({ where: { userId: user.id }, attributes: ['campaignId'] })
  return rows.map((r) => r.campaignId)
}

export async function listCampaignsFor(user: User): Promise<CampaignSummary[]> {
  const ids = await campaignIdsOf(user)
  const where: WhereOptions<Campaign> = ids === 'all' ? {} : { id: { [Op.in]: ids } }
  return (await Campaign.findAll({ where, order: [['name', 'ASC']] })).map(toCampaignSummary)
}

/** The campaign, if the user may submit into it. */
export async function campaignForSubmission(user: User, campaignId: number): Promise<Campaign> {
  const campaign = await Campaign.findByPk(campaignId)
  if (!campaign) throw notFound('The campaign')
  const ids = await campaignIdsOf(user)
  if (ids !== 'all' && !ids.includes(campaignId)) throw forbidden('You are not a member of this campaign.')
  return campaign
}
