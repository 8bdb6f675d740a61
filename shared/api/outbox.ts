/** A mail the development outbox caught. */
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
