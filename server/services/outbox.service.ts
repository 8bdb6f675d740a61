import { notFound } from '../lib/http-error'
import { MailMessage } from '../models'
import type { MailDetail, MailPage, MailSummary } from '../../shared/api/outbox'

export type { MailDetail, MailSummary }

const summary = (m: MailMessage): MailSummary => ({ id: m.id, from: m.fromAddress, to: m.toAddresses, subject: m.subject, receivedAt: m.receivedAt.toISOString() })

export async function listMail(page: number, pageSize: number): Promise<MailPage> {
  const { rows, count } = await MailMessage.findAndCountAll({
    attributes: ['id', 'fromAddress', 'toAddresses', 'subject', 'receivedAt'],
    order: [['id', 'DESC']],
    limit: pageSize,
    offset: (page - 1) * pageSize,
  })
  return { items: rows.map(summary), total: count }
}

/**
 * Single-use links (invitations, password resets) shown with their token hidden: a lead reading the
 * Outbox must not be able to take over the account. The stored mail keeps the whole link.
 */
export function maskLinks(text: string): string {
  return text.replace(/\S*set-password\?token=\S+/g, '[single-use link hidden: only the recipient can use it]')
}

export async function getMail(id: number): Promise<MailDetail> {
  const m = await MailMessage.findByPk(id)
  if (!m) throw notFound('The mail')
  return { ...summary(m), text: maskLinks(m.text) }
}
