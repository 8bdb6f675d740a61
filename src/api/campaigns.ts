import { http } from './http'

/** A campaign as GET /api/campaigns shows it (server: toCampaignSummary). */
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

/** The campaigns the signed-in person belongs to (leads: all). */
export const listCampaigns = async (): Promise<CampaignSummary[]> => (await http.get<{ campaigns: CampaignSummary[] }>('/campaigns')).campaigns
