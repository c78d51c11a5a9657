import { z } from 'zod'
import { listQuerySchema } from './common'

export const mailboxSortKeys = ['receivedAt', 'subject', 'from'] as const
export type MailboxSortKey = (typeof mailboxSortKeys)[number]

/** GET /api/mailbox: newest first by default; search in subject, sender and recipients. */
export const mailboxListQuerySchema = listQuerySchema.extend({
  sort: z.enum(mailboxSortKeys, { error: `Sort by one of: ${mailboxSortKeys.join(', ')}` }).optional(),
  order: z.enum(['asc', 'desc']).default('desc'),
})
export type MailboxListQuery = z.infer<typeof mailboxListQuerySchema>

/** One row of the Mailbox list. */
export interface MailboxSummary {
  id: number
  from: string
  /** Recipients, comma-separated as in the message header. */
  to: string
  subject: string
  receivedAt: string
  hasAttachments: boolean
}

export interface MailboxAttachment {
  filename: string
  contentType: string
  size: number
}

/** GET /api/mailbox/:id. `html` is the message's own HTML: show it sandboxed. */
export interface MailboxMessage extends MailboxSummary {
  text: string
  html: string
  attachments: MailboxAttachment[]
}
