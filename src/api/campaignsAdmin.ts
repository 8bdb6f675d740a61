import type { CampaignDetail, CampaignMemberSummary, CampaignSummary, HrDiagram } from '@shared/api/campaigns'
import { http } from './http'

export type { CampaignDetail, CampaignSummary, HrDiagram }
export { listCampaigns } from './campaigns'
export type CampaignMember = CampaignMemberSummary

/** The settings a lead edits; the code is fixed once the campaign exists. */
export type CampaignRules = Omit<CampaignSummary, 'id' | 'code'>

export type CampaignCreateInput = CampaignRules & { code: string }

export const getCampaign = async (id: number): Promise<CampaignDetail> => (await http.get<{ campaign: CampaignDetail }>(`/campaigns/${id}`)).campaign

export const createCampaign = async (input: CampaignCreateInput): Promise<CampaignDetail> =>
  (await http.post<{ campaign: CampaignDetail }>('/campaigns', input)).campaign

export const updateCampaign = async (id: number, changes: Partial<CampaignRules>): Promise<CampaignDetail> =>
  (await http.patch<{ campaign: CampaignDetail }>(`/campaigns/${id}`, changes)).campaign

/** Replaces the campaign's people with exactly these users. */
export const setCampaignMembers = async (id: number, userIds: number[]): Promise<CampaignDetail> =>
  (await http.put<{ campaign: CampaignDetail }>(`/campaigns/${id}/members`, { userIds })).campaign

/** The campaign's HR diagram (leads). */
export const getHrDiagram = async (id: number): Promise<HrDiagram> => (await http.get<{ hr: HrDiagram }>(`/campaigns/${id}/hr`)).hr
