import { watch, type Ref } from 'vue'
import { getCampaign, listCampaigns, type CampaignDetail, type CampaignSummary } from '@/api/campaignsAdmin'
import { listUsers } from '@/api/users'
import { useAsync } from './useAsync'

/** Campaigns for the lead's Campaigns screen; `replace` keeps the list in step after a save. */
export function useCampaignsAdmin() {
  const campaigns = useAsync(listCampaigns)
  function replace(c: CampaignSummary): void {
    const list = campaigns.data.value ?? []
    const found = list.some((x) => x.id === c.id)
    campaigns.data.value = (found ? list.map((x) => (x.id === c.id ? c : x)) : [...list, c]).sort((a, b) => a.name.localeCompare(b.name))
  }
  return { ...campaigns, replace }
}

/** One campaign with its members, reloaded when the selection changes. */
export function useCampaignDetail(id: Ref<number | null>) {
  const detail = useAsync<CampaignDetail | null>(async () => (id.value === null ? null : getCampaign(id.value)))
  watch(id, () => void detail.reload())
  const set = (c: CampaignDetail) => (detail.data.value = c)
  return { ...detail, set }
}

/** The team, to assign classifiers and observers from. */
export function useAssignablePeople() {
  return useAsync(listUsers)
}
