import type { CampaignSummary } from '@shared/api/campaigns'
import { http } from './http'

export type { CampaignSummary }

/** The campaigns the signed-in person belongs to (leads: all). */
export const listCampaigns = async (): Promise<CampaignSummary[]> => (await http.get<{ campaigns: CampaignSummary[] }>('/campaigns')).campaigns
