import type { AddressInfo } from 'node:net'
import { simpleParser } from 'mailparser'
import { SMTPServer } from 'smtp-server'
import { MailMessage } from '../models'

export interface FakeSmtp {
  port: number
  close(): Promise<void>
}

const MAX_MAIL_BYTES = 5 * 1024 * 1024

/** A loopback SMTP server that keeps every mail it receives in MariaDB, for the Outbox screen. */
export async function startFakeSmtp(port: number, host = '127.0.0.1'): Promise<FakeSmtp> {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    size: MAX_MAIL_BYTES,
    logger: false,
    onData(stream, _session, callback) {
      const chunks: Buffer[] = []
      let size = 0
      stream.on('data', (chunk: Buffer) => {
        size += chunk.length
        if (size <= MAX_MAIL_BYTES) chunks.push(chunk)
      })
      stream.on('end', () => {
        if (stream.sizeExceeded) return callback(new Error('Message exceeds the fake server size limit'))
        const raw = Buffer.concat(chunks)
        simpleParser(raw)
          .then((parsed) =>
            MailMessage.create({
              fromAddress: parsed.from?.text ?? '',
              toAddresses: [parsed.to ?? []]
                .flat()
                .map((a) => a.text)
                .join(', '),
              subject: parsed.subject ?? '(no subject)',
              text: parsed.text ?? '',
              html: typeof parsed.html === 'string' ? parsed.html : null,
              raw: raw.toString('utf8'),
            }),
          )
          .then(
            () => callback(),
            (error: Error) => callback(error),
          )
      })
    },
  })
  await new Promise<void>((resolve, reject) => {
    server.once('error', (error: NodeJS.ErrnoException) =>
      reject(
        error.code === 'EADDRINUSE'
          ? new Error(`the mail catcher cannot listen on SMTP_PORT ${port}: the port is already in use. Leave SMTP_PORT unset to take any free port, or choose another.`)
          : error,
      ),
    )
    server.listen(port, host, () => resolve())
  })
  return {
    port: (server.server.address() as AddressInfo).port,
    close: () => new Promise((resolve) => server.close(() => resolve())),
  }
}
