import nodemailer, { type Transporter } from 'nodemailer'
import type { Config } from '../config'

export interface OutgoingMail {
  to: string
  subject: string
  text: string
}

export interface Mailer {
  send(mail: OutgoingMail): Promise<void>
  close(): void
}

/** One mail module: the local fake in development and tests, a real SMTP relay in production; same code. */
export function createMailer(config: Pick<Config, 'SMTP_HOST' | 'SMTP_PORT' | 'SMTP_SECURE' | 'SMTP_USER' | 'SMTP_PASSWORD' | 'MAIL_FROM' | 'MAIL_MODE'>): Mailer {
  const transport: Transporter = nodemailer.createTransport({
    host: config.SMTP_HOST,
    port: config.SMTP_PORT ?? 2525,
    secure: config.SMTP_SECURE,
    // The loopback fake speaks plain SMTP; a relay is expected to offer STARTTLS.
    ignoreTLS: config.MAIL_MODE === 'fake',
    auth: config.SMTP_USER ? { user: config.SMTP_USER, pass: config.SMTP_PASSWORD ?? '' } : undefined,
  })
  return {
    async send(mail) {
      await transport.sendMail({ from: config.MAIL_FROM, to: mail.to, subject: mail.subject, text: mail.text })
    },
    close() {
      transport.close()
    },
  }
}
