// Outgoing mail through nodemailer: to SMTP_URL, or to the local fake SMTP server.
import nodemailer from 'nodemailer'

export interface OutgoingMail {
  to: string
  subject: string
  text: string
  html: string
  attachments?: { filename: string; content: string | Buffer; contentType?: string }[]
  /** A Message-ID of the sender's choosing ('<...@...>'); nodemailer makes one otherwise. */
  messageId?: string
}

export interface Mailer {
  /** True when messages go to the local fake (shown on the Mailbox page). */
  readonly fake: boolean
  send(mail: OutgoingMail): Promise<void>
  close(): void
}

export function createMailer(options: {
  from: string
  smtpUrl?: string
  fake?: { host: string; port: number }
}): Mailer {
  const fake = !options.smtpUrl
  if (fake && !options.fake) throw new Error('createMailer needs smtpUrl or the fake SMTP address')
  const transport = options.smtpUrl
    ? nodemailer.createTransport(options.smtpUrl)
    : nodemailer.createTransport({
        host: options.fake!.host,
        port: options.fake!.port,
        secure: false,
        // The fake offers no STARTTLS (smtp-server's built-in certificate has expired).
        ignoreTLS: true,
      })
  return {
    fake,
    async send(mail) {
      await transport.sendMail({ from: options.from, ...mail })
    },
    close: () => transport.close(),
  }
}
