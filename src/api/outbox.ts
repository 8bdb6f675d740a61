import { outboxApi } from '@shared/api/outbox'
import { call } from './http'

export type { MailDetail, MailPage, MailSummary } from '@shared/api/outbox'

export const listMail = (page: number, pageSize: number) => call(outboxApi.list, { query: { page, pageSize } })

export const getMail = async (id: number) => (await call(outboxApi.get, { params: { id } })).mail
