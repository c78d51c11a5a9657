// Session rows beyond what lucia's adapter does itself.
import { and, count, eq, ne } from 'drizzle-orm'
import type { DbOrTx } from '../index.ts'
import { sessions } from '../schema.ts'

export function sessionsRepository(db: DbOrTx) {
  return {
    async deleteOthers(userId: number, keepSessionId: string): Promise<void> {
      await db.delete(sessions).where(and(eq(sessions.userId, userId), ne(sessions.id, keepSessionId)))
    },
    async deleteAllOf(userId: number): Promise<void> {
      await db.delete(sessions).where(eq(sessions.userId, userId))
    },
    async countOf(userId: number): Promise<number> {
      const [{ n }] = await db.select({ n: count() }).from(sessions).where(eq(sessions.userId, userId))
      return n
    },
  }
}
export type SessionsRepository = ReturnType<typeof sessionsRepository>
