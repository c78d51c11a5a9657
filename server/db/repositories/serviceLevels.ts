// Queries on correction service levels and what uses them.
import { and, asc, eq, inArray, ne } from 'drizzle-orm'
import type { DbOrTx } from '../index.ts'
import { farms } from '../schema.ts'
import { fields, serviceLevels, workTypes, type ServiceLevelRow } from '../schema-planning.ts'

export interface NewServiceLevel {
  name: string
  sigmaUereM: number
  note: string
  ppmH?: number
  ppmV?: number
  maxBaselineKm?: number | null
  needsBase?: boolean
}

export function serviceLevelsRepository(db: DbOrTx) {
  return {
    async list(): Promise<ServiceLevelRow[]> {
      return db.select().from(serviceLevels).orderBy(asc(serviceLevels.sigmaUereM), asc(serviceLevels.name))
    },

    async findById(id: number): Promise<ServiceLevelRow | null> {
      const [row] = await db.select().from(serviceLevels).where(eq(serviceLevels.id, id)).limit(1)
      return row ?? null
    },

    async findByName(name: string): Promise<ServiceLevelRow | null> {
      const [row] = await db.select().from(serviceLevels).where(eq(serviceLevels.name, name)).limit(1)
      return row ?? null
    },

    async byIds(ids: number[]): Promise<ServiceLevelRow[]> {
      if (ids.length === 0) return []
      return db.select().from(serviceLevels).where(inArray(serviceLevels.id, ids))
    },

    async nameTaken(name: string, exceptId?: number): Promise<boolean> {
      const where = exceptId ? and(eq(serviceLevels.name, name), ne(serviceLevels.id, exceptId)) : eq(serviceLevels.name, name)
      const [row] = await db.select({ id: serviceLevels.id }).from(serviceLevels).where(where).limit(1)
      return Boolean(row)
    },

    async insert(level: NewServiceLevel): Promise<number> {
      const [result] = await db.insert(serviceLevels).values(level)
      return result.insertId
    },

    async update(id: number, changes: Partial<NewServiceLevel>): Promise<void> {
      await db.update(serviceLevels).set({ ...changes, updatedAt: new Date() }).where(eq(serviceLevels.id, id))
    },

    async delete(id: number): Promise<boolean> {
      const [result] = await db.delete(serviceLevels).where(eq(serviceLevels.id, id))
      return result.affectedRows > 0
    },

    /** Work types and fields that use the service level (names, for a 409 message). */
    async usage(id: number): Promise<{ workTypes: string[]; fields: { name: string; farm: string }[] }> {
      const wt = await db
        .select({ name: workTypes.name })
        .from(workTypes)
        .where(eq(workTypes.serviceLevelId, id))
        .orderBy(asc(workTypes.name))
      const fl = await db
        .select({ name: fields.name, farm: farms.name })
        .from(fields)
        .innerJoin(farms, eq(farms.id, fields.farmId))
        .where(eq(fields.serviceLevelId, id))
        .orderBy(asc(farms.name), asc(fields.name))
      return { workTypes: wt.map((r) => r.name), fields: fl }
    },
  }
}
export type ServiceLevelsRepository = ReturnType<typeof serviceLevelsRepository>
