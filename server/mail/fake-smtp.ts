// The local fake SMTP server: accepts every message on 127.0.0.1 (no TLS, no AUTH) and keeps
// it in the mailbox_messages table, raw and parsed, for the Mailbox page and for tests.
// It answers the SMTP DATA command only after the row is stored, so a sender whose
// sendMail() resolved can read its message from the database at once.
import type { AddressInfo } from 'node:net'
import { simpleParser, type AddressObject } from 'mailparser'
import { SMTPServer } from 'smtp-server'
import type { MailboxRepository } from '../db/repositories/mailbox.ts'
import type { Logger } from '../logger.ts'

export const FAKE_SMTP_MAX_BYTES = 25 * 1024 * 1024

export interface FakeSmtp {
  host: string
  port: number
  close(): Promise<void>
}

function addresses(value: AddressObject | AddressObject[] | undefined): string {
  if (!value) return ''
  return (Array.isArray(value) ? value : [value]).map((a) => a.text).join(', ')
}

/** Parses a raw RFC 5322 message into the columns of a mailbox row. */
export async function parseForMailbox(raw: Buffer) {
  const parsed = await simpleParser(raw, { skipImageLinks: true })
  const attachments = parsed.attachments.map((a) => ({
    filename: a.filename ?? 'attachment',
    contentType: a.contentType,
    size: a.size,
  }))
  return {
    messageId: (parsed.messageId ?? '').slice(0, 255),
    fromAddress: addresses(parsed.from).slice(0, 500),
    toAddresses: [addresses(parsed.to), addresses(parsed.cc)].filter(Boolean).join(', '),
    subject: (parsed.subject ?? '').slice(0, 500),
    sizeBytes: raw.length,
    hasAttachments: attachments.length > 0,
    attachmentsJson: JSON.stringify(attachments),
    textBody: parsed.text ?? '',
    htmlBody: typeof parsed.html === 'string' ? parsed.html : '',
    raw,
  }
}

export function startFakeSmtp(options: {
  port: number
  host?: string
  mailbox: MailboxRepository
  logger: Logger
}): Promise<FakeSmtp> {
  const host = options.host ?? '127.0.0.1'
  const server = new SMTPServer({
    disabledCommands: ['STARTTLS', 'AUTH'],
    authOptional: true,
    size: FAKE_SMTP_MAX_BYTES,
    banner: 'Skyfurrow local mailbox',
    logger: false,
    onData(stream, _session, callback) {
      const chunks: Buffer[] = []
      stream.on('data', (chunk: Buffer) => chunks.push(chunk))
      stream.on('error', callback)
      stream.on('end', () => {
        if (stream.sizeExceeded) {
          const error = new Error('Message exceeds the size limit') as Error & { responseCode: number }
          error.responseCode = 552
          return callback(error)
        }
        const raw = Buffer.concat(chunks)
        parseForMailbox(raw)
          .then((row) => options.mailbox.insert(row))
          .then(() => callback())
          .catch((error: unknown) => {
            options.logger.error('the local mailbox could not store a message', error)
            callback(new Error('Could not store the message'))
          })
      })
    },
  })
  return new Promise((resolve, reject) => {
    const onError = (error: Error & { code?: string }) =>
      reject(
        error.code === 'EADDRINUSE'
          ? new Error(
              `Port ${options.port} of the local mailbox (FAKE_SMTP_PORT) is already in use. ` +
                'Stop the other Skyfurrow server, or set FAKE_SMTP_PORT to another port (0 picks a free one).',
            )
          : error,
      )
    server.once('error', onError)
    server.listen(options.port, host, () => {
      server.off('error', onError)
      server.on('error', (error) => options.logger.warn('local mailbox error', error))
      const port = (server.server.address() as AddressInfo).port
      resolve({
        host,
        port,
        close: () => new Promise<void>((done) => server.close(() => done())),
      })
    })
  })
}
