// The audit log of admin actions: append and page through, newest first.
import { and, count, desc, eq, type SQL } from 'drizzle-orm'
import type { AuditListQuery } from '../../../shared/schemas/audit.ts'
import type { DbOrTx } from '../index.ts'
import { auditEvents, type AuditEventRow } from '../schema.ts'

export type NewAuditEvent = Omit<AuditEventRow, 'id' | 'at'> & { at?: Date }

export function auditRepository(db: DbOrTx) {
  return {
    async insert(event: NewAuditEvent): Promise<void> {
      await db.insert(auditEvents).values({ ...event, at: event.at ?? new Date() })
    },

    async list(query: AuditListQuery): Promise<{ rows: AuditEventRow[]; total: number }> {
      const where: SQL[] = []
      if (query.action) where.push(eq(auditEvents.action, query.action))
      if (query.targetType) where.push(eq(auditEvents.targetType, query.targetType))
      if (query.targetId) where.push(eq(auditEvents.targetId, query.targetId))
      const cond = where.length ? and(...where) : undefined
      const rows = await db
        .select()
        .from(auditEvents)
        .where(cond)
        .orderBy(desc(auditEvents.at), desc(auditEvents.id))
        .limit(query.pageSize)
        .offset((query.page - 1) * query.pageSize)
      const [{ n }] = await db.select({ n: count() }).from(auditEvents).where(cond)
      return { rows, total: n }
    },
  }
}
export type AuditRepository = ReturnType<typeof auditRepository>
