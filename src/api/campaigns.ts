import { campaignsApi, type CampaignSummary } from '@shared/api/campaigns'
import { call } from './http'

export type { CampaignSummary }

/** The campaigns the signed-in person belongs to (leads: all). */
export const listCampaigns = async (): Promise<CampaignSummary[]> => (await call(campaignsApi.list)).campaigns
