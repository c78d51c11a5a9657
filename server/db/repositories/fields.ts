// Queries on fields (boundaries stored as GeoJSON text) and the service levels they refer to.
import { and, asc, eq, inArray, ne } from 'drizzle-orm'
import type { DbOrTx } from '../index.ts'
import { fields, serviceLevels, type FieldRow } from '../schema-planning.ts'

export interface NewField {
  farmId: number
  name: string
  crop: string
  notes: string
  serviceLevelId: number
  antennaHeightM: number
  /** GeoJSON text */
  boundary: string
  areaHa: number
  centroidLat: number
  centroidLon: number
}

export function fieldsRepository(db: DbOrTx) {
  return {
    async findById(id: number): Promise<FieldRow | null> {
      const [row] = await db.select().from(fields).where(eq(fields.id, id)).limit(1)
      return row ?? null
    },

    async listByFarm(farmId: number): Promise<FieldRow[]> {
      return db.select().from(fields).where(eq(fields.farmId, farmId)).orderBy(asc(fields.name), asc(fields.id))
    },

    /** Every field (the nightly refresh), or those of the given farms. */
    async listAll(farmIds?: number[]): Promise<FieldRow[]> {
      if (farmIds && farmIds.length === 0) return []
      return db
        .select()
        .from(fields)
        .where(farmIds ? inArray(fields.farmId, farmIds) : undefined)
        .orderBy(asc(fields.farmId), asc(fields.id))
    },

    async nameTaken(farmId: number, name: string, exceptId?: number): Promise<boolean> {
      const where = exceptId
        ? and(eq(fields.farmId, farmId), eq(fields.name, name), ne(fields.id, exceptId))
        : and(eq(fields.farmId, farmId), eq(fields.name, name))
      const [row] = await db.select({ id: fields.id }).from(fields).where(where).limit(1)
      return Boolean(row)
    },

    /** Names already used on a farm (lower-cased for comparisons as the collation does). */
    async namesOfFarm(farmId: number): Promise<Set<string>> {
      const rows = await db.select({ name: fields.name }).from(fields).where(eq(fields.farmId, farmId))
      return new Set(rows.map((r) => r.name.toLowerCase()))
    },

    async insert(field: NewField): Promise<number> {
      const [result] = await db.insert(fields).values({ ...field, revision: 1 })
      return result.insertId
    },

    /** Writes the changes and bumps the revision. */
    async update(id: number, changes: Partial<Omit<NewField, 'farmId'>>, revision: number): Promise<void> {
      await db
        .update(fields)
        .set({ ...changes, revision, updatedAt: new Date() })
        .where(eq(fields.id, id))
    },

    async delete(id: number): Promise<boolean> {
      const [result] = await db.delete(fields).where(eq(fields.id, id))
      return result.affectedRows > 0
    },

    async serviceLevelExists(id: number): Promise<boolean> {
      const [row] = await db.select({ id: serviceLevels.id }).from(serviceLevels).where(eq(serviceLevels.id, id)).limit(1)
      return Boolean(row)
    },

    /** For the seed: a service level's id by name, or null. */
    async serviceLevelIdByName(name: string): Promise<number | null> {
      const [row] = await db.select({ id: serviceLevels.id }).from(serviceLevels).where(eq(serviceLevels.name, name)).limit(1)
      return row?.id ?? null
    },

    /** For the seed, when the planning seed has not run yet. */
    async insertServiceLevel(level: { name: string; sigmaUereM: number; note: string }): Promise<number> {
      const [result] = await db.insert(serviceLevels).values(level)
      return result.insertId
    },
  }
}
export type FieldsRepository = ReturnType<typeof fieldsRepository>
