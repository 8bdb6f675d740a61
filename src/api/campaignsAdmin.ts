import { campaignsApi, type CampaignDetail, type CampaignMemberSummary, type CampaignSummary, type HrDiagram } from '@shared/api/campaigns'
import { call } from './http'

export type { CampaignDetail, CampaignSummary, HrDiagram }
export { listCampaigns } from './campaigns'
export type CampaignMember = CampaignMemberSummary

/** The settings a lead edits; the code is fixed once the campaign exists. */
export type CampaignRules = Omit<CampaignSummary, 'id' | 'code' | 'progress'>

export type CampaignCreateInput = CampaignRules & { code: string }

export const getCampaign = async (id: number): Promise<CampaignDetail> => (await call(campaignsApi.get, { params: { id } })).campaign

export const createCampaign = async (input: CampaignCreateInput): Promise<CampaignDetail> => (await call(campaignsApi.create, { body: input })).campaign

export const updateCampaign = async (id: number, changes: Partial<CampaignRules>): Promise<CampaignDetail> => (await call(campaignsApi.update, { params: { id }, body: changes })).campaign

/** Replaces the campaign's people with exactly these users. */
export const setCampaignMembers = async (id: number, userIds: number[]): Promise<CampaignDetail> => (await call(campaignsApi.setMembers, { params: { id }, body: { userIds } })).campaign

/** The campaign's HR diagram (leads). */
export const getHrDiagram = async (id: number): Promise<HrDiagram> => (await call(campaignsApi.hr, { params: { id } })).hr
