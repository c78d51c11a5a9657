// Queries on calendar feed tokens: only the SHA-256 hash of a token is stored.
import { and, asc, eq, isNull } from 'drizzle-orm'
import type { DbOrTx } from '../index.ts'
import { users } from '../schema.ts'
import { calendarTokens } from '../schema-planning.ts'

export type CalendarTokenRow = typeof calendarTokens.$inferSelect

export interface NewCalendarToken {
  farmId: number
  tokenHash: string
  label: string
  includeWindows: boolean
  createdBy: number | null
}

export function calendarTokensRepository(db: DbOrTx) {
  return {
    async insert(token: NewCalendarToken): Promise<number> {
      const [result] = await db.insert(calendarTokens).values(token)
      return result.insertId
    },

    async findById(id: number): Promise<(CalendarTokenRow & { createdByName: string | null }) | null> {
      const [row] = await db
        .select({ token: calendarTokens, createdByName: users.name })
        .from(calendarTokens)
        .leftJoin(users, eq(users.id, calendarTokens.createdBy))
        .where(eq(calendarTokens.id, id))
        .limit(1)
      return row ? { ...row.token, createdByName: row.createdByName } : null
    },

    /** A token that has not been revoked, by its hash. */
    async findActiveByHash(tokenHash: string): Promise<CalendarTokenRow | null> {
      const [row] = await db
        .select()
        .from(calendarTokens)
        .where(and(eq(calendarTokens.tokenHash, tokenHash), isNull(calendarTokens.revokedAt)))
        .limit(1)
      return row ?? null
    },

    /** A farm's tokens (optionally only those one user created), oldest first. */
    async listByFarm(farmId: number, createdBy?: number): Promise<Array<CalendarTokenRow & { createdByName: string | null }>> {
      const where = createdBy === undefined
        ? eq(calendarTokens.farmId, farmId)
        : and(eq(calendarTokens.farmId, farmId), eq(calendarTokens.createdBy, createdBy))
      const rows = await db
        .select({ token: calendarTokens, createdByName: users.name })
        .from(calendarTokens)
        .leftJoin(users, eq(users.id, calendarTokens.createdBy))
        .where(where)
        .orderBy(asc(calendarTokens.createdAt), asc(calendarTokens.id))
      return rows.map((r) => ({ ...r.token, createdByName: r.createdByName }))
    },

    async revoke(id: number, at: Date): Promise<void> {
      await db.update(calendarTokens).set({ revokedAt: at }).where(and(eq(calendarTokens.id, id), isNull(calendarTokens.revokedAt)))
    },
  }
}
export type CalendarTokensRepository = ReturnType<typeof calendarTokensRepository>
