import type { Role } from '@shared/roles'
import { http } from './http'

export interface CampaignRules {
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

export interface CampaignSummary extends CampaignRules {
  id: number
  code: string
}

export interface CampaignMember {
  id: number
  name: string
  role: Role
  active: boolean
  email?: string
}

export interface CampaignDetail extends CampaignSummary {
  members: CampaignMember[]
  createdAt: string
  updatedAt: string
}

export type CampaignCreateInput = CampaignRules & { code: string }

export const listCampaigns = async (): Promise<CampaignSummary[]> => (await http.get<{ campaigns: CampaignSummary[] }>('/campaigns')).campaigns

export const getCampaign = async (id: number): Promise<CampaignDetail> => (await http.get<{ campaign: CampaignDetail }>(`/campaigns/${id}`)).campaign

export const createCampaign = async (input: CampaignCreateInput): Promise<CampaignDetail> =>
  (await http.post<{ campaign: CampaignDetail }>('/campaigns', input)).campaign

export const updateCampaign = async (id: number, changes: Partial<CampaignRules>): Promise<CampaignDetail> =>
  (await http.patch<{ campaign: CampaignDetail }>(`/campaigns/${id}`, changes)).campaign

/** Replaces the campaign's people with exactly these users. */
export const setCampaignMembers = async (id: number, userIds: number[]): Promise<CampaignDetail> =>
  (await http.put<{ campaign: CampaignDetail }>(`/campaigns/${id}/members`, { userIds })).campaign
