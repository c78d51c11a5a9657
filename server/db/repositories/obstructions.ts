// Queries on a farm's obstructions (tree lines, woodlots, buildings); geometry as GeoJSON text.
import { asc, count, eq } from 'drizzle-orm'
import type { DbOrTx } from '../index.ts'
import { obstructions, type ObstructionRow } from '../schema-planning.ts'

export interface NewObstruction {
  farmId: number
  kind: 'deciduous' | 'evergreen' | 'structure'
  heightM: number
  /** GeoJSON text */
  geometry: string
  leaflessFrom: string | null
  leaflessTo: string | null
  note: string
}

export function obstructionsRepository(db: DbOrTx) {
  return {
    async findById(id: number): Promise<ObstructionRow | null> {
      const [row] = await db.select().from(obstructions).where(eq(obstructions.id, id)).limit(1)
      return row ?? null
    },

    async listByFarm(farmId: number): Promise<ObstructionRow[]> {
      return db.select().from(obstructions).where(eq(obstructions.farmId, farmId)).orderBy(asc(obstructions.id))
    },

    async countByFarm(farmId: number): Promise<number> {
      const [{ total }] = await db.select({ total: count() }).from(obstructions).where(eq(obstructions.farmId, farmId))
      return total
    },

    async insert(o: NewObstruction): Promise<number> {
      const [result] = await db.insert(obstructions).values(o)
      return result.insertId
    },

    async update(id: number, changes: Partial<Omit<NewObstruction, 'farmId'>>): Promise<void> {
      await db
        .update(obstructions)
        .set({ ...changes, updatedAt: new Date() })
        .where(eq(obstructions.id, id))
    },

    async delete(id: number): Promise<boolean> {
      const [result] = await db.delete(obstructions).where(eq(obstructions.id, id))
      return result.affectedRows > 0
    },
  }
}
export type ObstructionsRepository = ReturnType<typeof obstructionsRepository>
