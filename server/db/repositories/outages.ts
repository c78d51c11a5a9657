// Queries on satellite outages (a satellite out of service for a time span).
import { asc, eq, gte } from 'drizzle-orm'
import type { DbOrTx } from '../index.ts'
import { outages, type OutageRow } from '../schema-planning.ts'

export interface NewOutage {
  satId: string
  fromAt: Date
  toAt: Date
  note: string
  createdBy: number | null
}

export function outagesRepository(db: DbOrTx) {
  return {
    async findById(id: number): Promise<OutageRow | null> {
      const [row] = await db.select().from(outages).where(eq(outages.id, id)).limit(1)
      return row ?? null
    },

    /** Outages ending at or after `endingAfter` (all when not given), by start. */
    async list(endingAfter?: Date): Promise<OutageRow[]> {
      return db
        .select()
        .from(outages)
        .where(endingAfter ? gte(outages.toAt, endingAfter) : undefined)
        .orderBy(asc(outages.fromAt), asc(outages.id))
    },

    async insert(o: NewOutage): Promise<number> {
      const [result] = await db.insert(outages).values(o)
      return result.insertId
    },

    async update(id: number, changes: Partial<Omit<NewOutage, 'createdBy'>>): Promise<void> {
      await db
        .update(outages)
        .set({ ...changes, updatedAt: new Date() })
        .where(eq(outages.id, id))
    },

    async delete(id: number): Promise<boolean> {
      const [result] = await db.delete(outages).where(eq(outages.id, id))
      return result.affectedRows > 0
    },
  }
}
export type OutagesRepository = ReturnType<typeof outagesRepository>
