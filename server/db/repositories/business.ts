// The single row naming the contracting business of this installation.
import { eq } from 'drizzle-orm'
import type { DbOrTx } from '../index.ts'
import { business } from '../schema.ts'

export function businessRepository(db: DbOrTx) {
  return {
    async get(): Promise<{ name: string } | null> {
      const [row] = await db.select({ name: business.name }).from(business).where(eq(business.id, 1)).limit(1)
      return row ?? null
    },
    async setName(name: string): Promise<void> {
      await db.insert(business).values({ id: 1, name }).onDuplicateKeyUpdate({ set: { name, updatedAt: new Date() } })
    },
  }
}
export type BusinessRepository = ReturnType<typeof businessRepository>
