import { listCampaigns } from '@/api/campaigns'
import { useAsync } from './useAsync'

/** The campaigns the signed-in person may submit to or filter by. */
export function useCampaigns() {
  return useAsync(listCampaigns)
}
