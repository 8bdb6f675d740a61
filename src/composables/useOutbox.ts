import { ref, watch, type Ref } from 'vue'
import { getMail, listMail, type MailDetail, type MailPage } from '@/api/outbox'
import { useAsync } from './useAsync'

/** One page of the local mail catcher's messages, newest first; reloads when the page changes. */
export function useOutbox(pageSize = 25) {
  const page = ref(1)
  const list = useAsync<MailPage>(() => listMail(page.value, pageSize))
  watch(page, () => void list.reload())
  return { ...list, page, pageSize }
}

/** The full text of one mail; nothing is loaded while no mail is chosen. */
export function useMail(id: Ref<number | null>) {
  const mail = useAsync<MailDetail | null>(() => (id.value === null ? Promise.resolve(null) : getMail(id.value)), { immediate: id.value !== null })
  watch(id, () => void mail.reload())
  return mail
}
