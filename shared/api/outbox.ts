import { z } from 'zod'
import { idParams, pagingQuery } from './common'
import { endpoint } from './endpoint'

/** A mail the development outbox caught. */
export const MailSummary = z.object({ id: z.number().int(), from: z.string(), to: z.string(), subject: z.string(), receivedAt: z.string() }).meta({ id: 'MailSummary' })
export type MailSummary = z.infer<typeof MailSummary>

export const MailDetail = MailSummary.extend({ text: z.string() }).meta({ id: 'MailDetail' })
export type MailDetail = z.infer<typeof MailDetail>

export const MailPage = z.object({ items: z.array(MailSummary), total: z.number().int() })
export type MailPage = z.infer<typeof MailPage>

export const outboxApi = {
  list: endpoint({ method: 'get', path: '/outbox', tag: 'Outbox', summary: 'Mail the loopback mail server caught, newest first', query: pagingQuery, response: MailPage }),
  get: endpoint({ method: 'get', path: '/outbox/:id', tag: 'Outbox', summary: 'One caught mail with its text', params: idParams, response: z.object({ mail: MailDetail }) }),
}
