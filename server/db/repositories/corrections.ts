// Queries on RTK base stations, correction networks, fields' choice of source and the
// space-weather (Kp) feed.
import { and, asc, eq, gt, gte, inArray, lt, ne } from 'drizzle-orm'
import type { DbOrTx } from '../index.ts'
import {
  baseStations,
  correctionNetworks,
  fields,
  kpBlocks,
  serviceLevels,
  spaceWeatherFeed,
  type BaseStationRow,
  type CorrectionNetworkRow,
  type KpBlockRow,
} from '../schema-planning.ts'

export interface NewBaseStation {
  name: string
  latDeg: number
  lonDeg: number
  antennaHeightM: number
  radioRangeKm: number
  note: string
}

export interface NewNetwork {
  name: string
  /** GeoJSON text or null */
  coverage: string | null
  mountPointsJson: string
  note: string
}

export function correctionsRepository(db: DbOrTx) {
  return {
    async listBases(): Promise<BaseStationRow[]> {
      return db.select().from(baseStations).orderBy(asc(baseStations.name), asc(baseStations.id))
    },
    async findBase(id: number): Promise<BaseStationRow | null> {
      const [row] = await db.select().from(baseStations).where(eq(baseStations.id, id)).limit(1)
      return row ?? null
    },
    async baseNameTaken(name: string, exceptId?: number): Promise<boolean> {
      const where = exceptId ? and(eq(baseStations.name, name), ne(baseStations.id, exceptId)) : eq(baseStations.name, name)
      const [row] = await db.select({ id: baseStations.id }).from(baseStations).where(where).limit(1)
      return Boolean(row)
    },
    async insertBase(base: NewBaseStation): Promise<number> {
      const [result] = await db.insert(baseStations).values(base)
      return result.insertId
    },
    async updateBase(id: number, changes: Partial<NewBaseStation>): Promise<void> {
      await db.update(baseStations).set({ ...changes, updatedAt: new Date() }).where(eq(baseStations.id, id))
    },
    async deleteBase(id: number): Promise<boolean> {
      const [result] = await db.delete(baseStations).where(eq(baseStations.id, id))
      return result.affectedRows > 0
    },

    async listNetworks(): Promise<CorrectionNetworkRow[]> {
      return db.select().from(correctionNetworks).orderBy(asc(correctionNetworks.name), asc(correctionNetworks.id))
    },
    async findNetwork(id: number): Promise<CorrectionNetworkRow | null> {
      const [row] = await db.select().from(correctionNetworks).where(eq(correctionNetworks.id, id)).limit(1)
      return row ?? null
    },
    async networkNameTaken(name: string, exceptId?: number): Promise<boolean> {
      const where = exceptId ? and(eq(correctionNetworks.name, name), ne(correctionNetworks.id, exceptId)) : eq(correctionNetworks.name, name)
      const [row] = await db.select({ id: correctionNetworks.id }).from(correctionNetworks).where(where).limit(1)
      return Boolean(row)
    },
    async insertNetwork(n: NewNetwork): Promise<number> {
      const [result] = await db.insert(correctionNetworks).values(n)
      return result.insertId
    },
    async updateNetwork(id: number, changes: Partial<NewNetwork>): Promise<void> {
      await db.update(correctionNetworks).set({ ...changes, updatedAt: new Date() }).where(eq(correctionNetworks.id, id))
    },
    async deleteNetwork(id: number): Promise<boolean> {
      const [result] = await db.delete(correctionNetworks).where(eq(correctionNetworks.id, id))
      return result.affectedRows > 0
    },

    /** A field's choice of source; bumps its revision so its forecast is recomputed. */
    async setFieldChoice(fieldId: number, choice: { baseStationId: number | null; networkId: number | null }, revision: number): Promise<void> {
      await db.update(fields).set({ ...choice, revision, updatedAt: new Date() }).where(eq(fields.id, fieldId))
    },

    /** Every field with what the correction link needs (the start-up sweep, the source lists). */
    async fieldsForLinks(farmIds?: number[]) {
      if (farmIds && farmIds.length === 0) return []
      const q = db
        .select({
          id: fields.id,
          farmId: fields.farmId,
          boundary: fields.boundary,
          centroidLat: fields.centroidLat,
          centroidLon: fields.centroidLon,
          baseStationId: fields.baseStationId,
          networkId: fields.networkId,
          serviceLevelId: fields.serviceLevelId,
        })
        .from(fields)
      return farmIds ? q.where(inArray(fields.farmId, farmIds)).orderBy(asc(fields.id)) : q.orderBy(asc(fields.id))
    },

    async serviceLevelModels() {
      return db
        .select({
          id: serviceLevels.id,
          name: serviceLevels.name,
          sigmaUereM: serviceLevels.sigmaUereM,
          ppmH: serviceLevels.ppmH,
          ppmV: serviceLevels.ppmV,
          maxBaselineKm: serviceLevels.maxBaselineKm,
          needsBase: serviceLevels.needsBase,
        })
        .from(serviceLevels)
    },

    // ---- Kp feed ----------------------------------------------------------------------
    async kpBlocksBetween(fromMs: number, toMs: number): Promise<KpBlockRow[]> {
      return db
        .select()
        .from(kpBlocks)
        .where(Number.isFinite(toMs) ? and(gt(kpBlocks.blockEnd, new Date(fromMs)), lt(kpBlocks.blockStart, new Date(toMs))) : gt(kpBlocks.blockEnd, new Date(fromMs)))
        .orderBy(asc(kpBlocks.blockStart))
    },
    /** Replaces the blocks the feed covers (from its first block on) with the new ones. */
    async replaceKpFrom(fromMs: number, rows: Array<{ blockStart: Date; blockEnd: Date; kp: number; observed: boolean }>, fetchedAt: Date): Promise<void> {
      await db.delete(kpBlocks).where(gte(kpBlocks.blockStart, new Date(fromMs)))
      if (rows.length) await db.insert(kpBlocks).values(rows.map((r) => ({ ...r, fetchedAt })))
    },
    async pruneKpBefore(ms: number): Promise<void> {
      await db.delete(kpBlocks).where(lt(kpBlocks.blockEnd, new Date(ms)))
    },
    async feedStatus() {
      const [row] = await db.select().from(spaceWeatherFeed).where(eq(spaceWeatherFeed.id, 1)).limit(1)
      return row ?? null
    },
    async recordFeed(entry: { url: string; attemptAt: Date; ok: boolean; error: string | null }): Promise<void> {
      const values = {
        url: entry.url.slice(0, 1000),
        lastAttemptAt: entry.attemptAt,
        lastError: entry.ok ? null : (entry.error ?? 'failed').slice(0, 1000),
        ...(entry.ok ? { lastOkAt: entry.attemptAt } : {}),
      }
      await db.insert(spaceWeatherFeed).values({ id: 1, ...values }).onDuplicateKeyUpdate({ set: values })
    },
  }
}
export type CorrectionsRepository = ReturnType<typeof correctionsRepository>
