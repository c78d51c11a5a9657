// Queries on a farm's elevation model and its height chunks.
import { asc, eq } from 'drizzle-orm'
import type { DbOrTx } from '../index.ts'
import { elevationModelChunks, elevationModels, type ElevationModelRow, type NewElevationModel } from '../schema-terrain.ts'

export function terrainRepository(db: DbOrTx) {
  return {
    async findByFarm(farmId: number): Promise<ElevationModelRow | null> {
      const [row] = await db.select().from(elevationModels).where(eq(elevationModels.farmId, farmId)).limit(1)
      return row ?? null
    },

    async chunks(modelId: number): Promise<Buffer[]> {
      const rows = await db
        .select({ data: elevationModelChunks.data })
        .from(elevationModelChunks)
        .where(eq(elevationModelChunks.modelId, modelId))
        .orderBy(asc(elevationModelChunks.seq))
      return rows.map((r) => r.data)
    },

    /** Replaces the farm's model (call inside a transaction). */
    async replace(model: NewElevationModel, chunks: readonly Buffer[]): Promise<number> {
      await db.delete(elevationModels).where(eq(elevationModels.farmId, model.farmId))
      const [result] = await db.insert(elevationModels).values(model)
      const id = result.insertId
      for (const [seq, data] of chunks.entries()) await db.insert(elevationModelChunks).values({ modelId: id, seq, data })
      return id
    },

    async removeByFarm(farmId: number): Promise<boolean> {
      const [result] = await db.delete(elevationModels).where(eq(elevationModels.farmId, farmId))
      return result.affectedRows > 0
    },
  }
}
