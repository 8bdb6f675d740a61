import type { Role } from '../roles'

/** A campaign as GET /api/campaigns shows it. */
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

export interface CampaignMemberSummary {
  id: number
  name: string
  role: Role
  active: boolean
  /** Only leads see addresses. */
  email?: string
}

export interface CampaignDetail extends CampaignSummary {
  members: CampaignMemberSummary[]
  createdAt: string
  updatedAt: string
}
