import { watch, type Ref } from 'vue'
import { getAudit, listCampaignChoices, type AuditQuery } from '@/api/audit'
import { useAsync } from './useAsync'

/** The campaigns the person may audit. */
export function useCampaignChoices() {
  return useAsync(listCampaignChoices)
}

/** The agreement figures for a campaign and date range; nothing is fetched until a campaign is chosen. */
export function useAudit(query: Ref<AuditQuery | null>) {
  const audit = useAsync(async () => (query.value ? getAudit(query.value) : null), { immediate: query.value !== null })
  watch(
    () => (query.value ? `${query.value.campaign}|${query.value.from ?? ''}|${query.value.to ?? ''}` : ''),
    (key) => {
      if (key) void audit.reload()
    },
  )
  return audit
}
