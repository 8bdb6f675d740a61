import { http } from './http'

export interface MailSummary {
  id: number
  from: string
  to: string
  subject: string
  receivedAt: string
}

export interface MailDetail extends MailSummary {
  text: string
}

export interface MailPage {
  items: MailSummary[]
  total: number
}

export const listMail = (page: number, pageSize: number) => http.get<MailPage>('/outbox', { query: { page, pageSize } })

export const getMail = async (id: number): Promise<MailDetail> => (await http.get<{ mail: MailDetail }>(`/outbox/${id}`)).mail
