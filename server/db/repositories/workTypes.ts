// Queries on work types and the passes that use them.
import { and, asc, count, eq, ne } from 'drizzle-orm'
import type { DbOrTx } from '../index.ts'
import { passes, workTypes, type WorkTypeRow } from '../schema-planning.ts'

export interface NewWorkType {
  name: string
  serviceLevelId: number
  maxH95M: number
  maxV95M: number | null
  minSats: number
  maxPdop: number
  requiredShare: number
  requireN1: boolean
  rateHaPerH: number
  sortOrder: number
  active: boolean
  stormAction?: 'none' | 'tight' | 'closed'
}

export function workTypesRepository(db: DbOrTx) {
  return {
    async list(options: { onlyActive?: boolean } = {}): Promise<WorkTypeRow[]> {
      return db
        .select()
        .from(workTypes)
        .where(options.onlyActive ? eq(workTypes.active, true) : undefined)
        .orderBy(asc(workTypes.sortOrder), asc(workTypes.name), asc(workTypes.id))
    },

    async findById(id: number): Promise<WorkTypeRow | null> {
      const [row] = await db.select().from(workTypes).where(eq(workTypes.id, id)).limit(1)
      return row ?? null
    },

    async findByName(name: string): Promise<WorkTypeRow | null> {
      const [row] = await db.select().from(workTypes).where(eq(workTypes.name, name)).limit(1)
      return row ?? null
    },

    async nameTaken(name: string, exceptId?: number): Promise<boolean> {
      const where = exceptId ? and(eq(workTypes.name, name), ne(workTypes.id, exceptId)) : eq(workTypes.name, name)
      const [row] = await db.select({ id: workTypes.id }).from(workTypes).where(where).limit(1)
      return Boolean(row)
    },

    async insert(workType: NewWorkType): Promise<number> {
      const [result] = await db.insert(workTypes).values(workType)
      return result.insertId
    },

    async update(id: number, changes: Partial<NewWorkType>): Promise<void> {
      await db.update(workTypes).set({ ...changes, updatedAt: new Date() }).where(eq(workTypes.id, id))
    },

    async delete(id: number): Promise<boolean> {
      const [result] = await db.delete(workTypes).where(eq(workTypes.id, id))
      return result.affectedRows > 0
    },

    /** How many passes are booked for the work type. */
    async passCount(id: number): Promise<number> {
      const [{ n }] = await db.select({ n: count() }).from(passes).where(eq(passes.workTypeId, id))
      return n
    },
  }
}
export type WorkTypesRepository = ReturnType<typeof workTypesRepository>
