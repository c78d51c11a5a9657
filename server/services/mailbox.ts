// The Mailbox page: messages the local fake SMTP server received. Exists only while the
// fake is in use (no SMTP_URL); otherwise every call answers 404.
import { simpleParser } from 'mailparser'
import type { Page } from '../../shared/schemas/common.ts'
import type { MailboxAttachment, MailboxListQuery, MailboxMessage, MailboxSummary } from '../../shared/schemas/mailbox.ts'
import { HttpError, notFound } from '../http/errors.ts'
import { pageOf, type ServiceContext } from './context.ts'

interface SummaryRow {
  id: number
  fromAddress: string
  toAddresses: string
  subject: string
  receivedAt: Date
  hasAttachments: boolean
}

const toSummary = (r: SummaryRow): MailboxSummary => ({
  id: r.id,
  from: r.fromAddress,
  to: r.toAddresses,
  subject: r.subject,
  receivedAt: r.receivedAt.toISOString(),
  hasAttachments: r.hasAttachments,
})

export function createMailboxService(ctx: ServiceContext) {
  const { store, mailer } = ctx

  function assertEnabled(): void {
    if (!mailer.fake) {
      throw new HttpError(404, 'mailbox_off', 'The Mailbox is only available while mail goes to the local fake server.')
    }
  }

  return {
    async list(query: MailboxListQuery): Promise<Page<MailboxSummary>> {
      assertEnabled()
      const { rows, total } = await store.repos.mailbox.list(query)
      return pageOf(rows.map(toSummary), total, query)
    },

    async get(id: number): Promise<MailboxMessage> {
      assertEnabled()
      const row = await store.repos.mailbox.findById(id)
      if (!row) throw notFound('The message')
      return {
        ...toSummary(row),
        text: row.textBody,
        html: row.htmlBody,
        attachments: JSON.parse(row.attachmentsJson) as MailboxAttachment[],
      }
    },

    /** The attachment's bytes, re-read from the raw message. */
    async attachment(id: number, index: number): Promise<MailboxAttachment & { content: Buffer }> {
      assertEnabled()
      const row = await store.repos.mailbox.findById(id)
      if (!row) throw notFound('The message')
      const parsed = await simpleParser(row.raw, { skipImageLinks: true })
      const a = parsed.attachments[index]
      if (!a) throw notFound('The attachment')
      return { filename: a.filename ?? `attachment-${index + 1}`, contentType: a.contentType, size: a.size, content: a.content }
    },
  }
}
export type MailboxService = ReturnType<typeof createMailboxService>
