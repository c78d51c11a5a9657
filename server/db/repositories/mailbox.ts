// Messages kept by the local fake SMTP server.
import { asc, count, desc, eq, or, type SQL } from 'drizzle-orm'
import type { MailboxSortKey } from '../../../shared/schemas/mailbox.ts'
import type { DbOrTx } from '../index.ts'
import { mailboxMessages, type MailboxRow } from '../schema.ts'
import { containsPattern, likeEscaped, type PageRequest } from './util.ts'

export type NewMailboxMessage = typeof mailboxMessages.$inferInsert

const sortColumns = {
  receivedAt: mailboxMessages.receivedAt,
  subject: mailboxMessages.subject,
  from: mailboxMessages.fromAddress,
} satisfies Record<MailboxSortKey, unknown>

const summaryColumns = {
  id: mailboxMessages.id,
  fromAddress: mailboxMessages.fromAddress,
  toAddresses: mailboxMessages.toAddresses,
  subject: mailboxMessages.subject,
  receivedAt: mailboxMessages.receivedAt,
  hasAttachments: mailboxMessages.hasAttachments,
}

export function mailboxRepository(db: DbOrTx) {
  return {
    async insert(message: NewMailboxMessage): Promise<number> {
      const [result] = await db.insert(mailboxMessages).values(message)
      return result.insertId
    },
    async list(req: PageRequest & { sort?: MailboxSortKey }) {
      let where: SQL | undefined
      if (req.q) {
        const p = containsPattern(req.q)
        where = or(
          likeEscaped(mailboxMessages.subject, p),
          likeEscaped(mailboxMessages.fromAddress, p),
          likeEscaped(mailboxMessages.toAddresses, p),
        )
      }
      const direction = req.order === 'asc' ? asc : desc
      const rows = await db
        .select(summaryColumns)
        .from(mailboxMessages)
        .where(where)
        .orderBy(direction(sortColumns[req.sort ?? 'receivedAt']), direction(mailboxMessages.id))
        .limit(req.pageSize)
        .offset((req.page - 1) * req.pageSize)
      const [{ total }] = await db.select({ total: count() }).from(mailboxMessages).where(where)
      return { rows, total }
    },
    async findById(id: number): Promise<MailboxRow | null> {
      const [row] = await db.select().from(mailboxMessages).where(eq(mailboxMessages.id, id)).limit(1)
      return row ?? null
    },
  }
}
export type MailboxRepository = ReturnType<typeof mailboxRepository>
