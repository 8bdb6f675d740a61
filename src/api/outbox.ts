import type { MailDetail, MailPage } from '@shared/api/outbox'
import { http } from './http'

export type { MailDetail, MailPage, MailSummary } from '@shared/api/outbox'

export const listMail = (page: number, pageSize: number) => http.get<MailPage>('/outbox', { query: { page, pageSize } })

export const getMail = async (id: number): Promise<MailDetail> => (await http.get<{ mail: MailDetail }>(`/outbox/${id}`)).mail
