// One-time tokens for reset and invitation links (stored as SHA-256 hashes).
import { and, eq, isNotNull, isNull, lte, or } from 'drizzle-orm'
import type { DbOrTx } from '../index.ts'
import { authTokens, type AuthTokenRow } from '../schema.ts'

export type TokenPurpose = AuthTokenRow['purpose']

export function tokensRepository(db: DbOrTx) {
  return {
    async insert(token: { userId: number; purpose: TokenPurpose; tokenHash: string; expiresAt: Date }): Promise<void> {
      await db.insert(authTokens).values(token)
    },
    /** The token row for `tokenHash`, locked for the rest of the transaction. */
    async findByHashForUpdate(tokenHash: string): Promise<AuthTokenRow | null> {
      const [row] = await db.select().from(authTokens).where(eq(authTokens.tokenHash, tokenHash)).limit(1).for('update')
      return row ?? null
    },
    async markUsed(id: number, at: Date): Promise<void> {
      await db.update(authTokens).set({ usedAt: at }).where(eq(authTokens.id, id))
    },
    /** Removes tokens that can no longer be used (expired, or used more than a day ago). */
    async deleteStale(now: Date): Promise<void> {
      const dayAgo = new Date(now.getTime() - 86_400_000)
      await db
        .delete(authTokens)
        .where(or(lte(authTokens.expiresAt, now), and(isNotNull(authTokens.usedAt), lte(authTokens.usedAt, dayAgo))))
    },
    /** Ends every unused token of the user (all purposes, or one). */
    async revokeUnused(userId: number, purpose?: TokenPurpose): Promise<void> {
      const where = purpose
        ? and(eq(authTokens.userId, userId), eq(authTokens.purpose, purpose), isNull(authTokens.usedAt))
        : and(eq(authTokens.userId, userId), isNull(authTokens.usedAt))
      await db.delete(authTokens).where(where)
    },
  }
}
export type TokensRepository = ReturnType<typeof tokensRepository>
