// Queries on orbit sets (the stored files), their satellites, the active choice per
// constellation, and the run records of the orbit feed (job rows of kind 'orbit-feed').
import { and, asc, desc, eq, inArray, isNotNull } from 'drizzle-orm'
import type { DbOrTx } from '../index.ts'
import { activeOrbits, jobs, orbitSatellites, orbitSets, type JobRow, type OrbitSetRow } from '../schema-planning.ts'

export interface NewOrbitSet {
  name: string
  source: 'upload' | 'feed'
  format: string
  content: string
  satelliteCount: number
  skippedCount: number
  reportJson: string
  oldestEpoch: Date | null
  newestEpoch: Date | null
  uploadedBy: number | null
}

export interface OrbitSatelliteRow {
  satId: string
  name: string
  system: string
  epoch: Date
}

export type OrbitSetSummaryRow = Omit<OrbitSetRow, 'content'>

export interface ActiveOrbitRow {
  system: string
  orbitSetId: number | null
  enabled: boolean
  updatedAt: Date
}

/** Every column but the (possibly large) file content. */
const summaryColumns = {
  id: orbitSets.id,
  name: orbitSets.name,
  source: orbitSets.source,
  format: orbitSets.format,
  satelliteCount: orbitSets.satelliteCount,
  skippedCount: orbitSets.skippedCount,
  reportJson: orbitSets.reportJson,
  oldestEpoch: orbitSets.oldestEpoch,
  newestEpoch: orbitSets.newestEpoch,
  uploadedBy: orbitSets.uploadedBy,
  createdAt: orbitSets.createdAt,
}

export const ORBIT_FEED_JOB_KIND = 'orbit-feed'

export function orbitsRepository(db: DbOrTx) {
  return {
    async listSets(): Promise<OrbitSetSummaryRow[]> {
      return db.select(summaryColumns).from(orbitSets).orderBy(desc(orbitSets.createdAt), desc(orbitSets.id))
    },

    async findSet(id: number): Promise<OrbitSetRow | null> {
      const [row] = await db.select().from(orbitSets).where(eq(orbitSets.id, id)).limit(1)
      return row ?? null
    },

    async findSets(ids: number[]): Promise<OrbitSetRow[]> {
      if (ids.length === 0) return []
      return db.select().from(orbitSets).where(inArray(orbitSets.id, ids))
    },

    async newestFeedSet(): Promise<OrbitSetSummaryRow | null> {
      const [row] = await db
        .select(summaryColumns)
        .from(orbitSets)
        .where(eq(orbitSets.source, 'feed'))
        .orderBy(desc(orbitSets.createdAt), desc(orbitSets.id))
        .limit(1)
      return row ?? null
    },

    async insertSet(set: NewOrbitSet, satellites: OrbitSatelliteRow[]): Promise<number> {
      const [result] = await db.insert(orbitSets).values(set)
      const id = result.insertId
      for (let i = 0; i < satellites.length; i += 500) {
        await db.insert(orbitSatellites).values(satellites.slice(i, i + 500).map((s) => ({ ...s, orbitSetId: id })))
      }
      return id
    },

    async deleteSet(id: number): Promise<boolean> {
      const [result] = await db.delete(orbitSets).where(eq(orbitSets.id, id))
      return result.affectedRows > 0
    },

    async satellitesOf(orbitSetId: number): Promise<OrbitSatelliteRow[]> {
      return db
        .select({ satId: orbitSatellites.satId, name: orbitSatellites.name, system: orbitSatellites.system, epoch: orbitSatellites.epoch })
        .from(orbitSatellites)
        .where(eq(orbitSatellites.orbitSetId, orbitSetId))
        .orderBy(asc(orbitSatellites.system), asc(orbitSatellites.satId))
    },

    /** Satellites per system for each of the given sets. */
    async systemCounts(orbitSetIds: number[]): Promise<Map<number, Record<string, number>>> {
      const map = new Map<number, Record<string, number>>(orbitSetIds.map((id) => [id, {}]))
      if (orbitSetIds.length === 0) return map
      const rows = await db
        .select({ orbitSetId: orbitSatellites.orbitSetId, system: orbitSatellites.system })
        .from(orbitSatellites)
        .where(inArray(orbitSatellites.orbitSetId, orbitSetIds))
      for (const r of rows) {
        const counts = map.get(r.orbitSetId)!
        counts[r.system] = (counts[r.system] ?? 0) + 1
      }
      return map
    },

    async activeRows(): Promise<ActiveOrbitRow[]> {
      return db.select().from(activeOrbits).orderBy(asc(activeOrbits.system))
    },

    /** Locks the active-orbit rows for the rest of the transaction. */
    async lockActiveRows(): Promise<void> {
      await db.select({ system: activeOrbits.system }).from(activeOrbits).for('update')
    },

    async upsertActive(row: { system: string; orbitSetId: number | null; enabled: boolean }): Promise<void> {
      await db
        .insert(activeOrbits)
        .values({ ...row, updatedAt: new Date() })
        .onDuplicateKeyUpdate({ set: { orbitSetId: row.orbitSetId, enabled: row.enabled, updatedAt: new Date() } })
    },

    async isSetActive(orbitSetId: number): Promise<string[]> {
      const rows = await db
        .select({ system: activeOrbits.system })
        .from(activeOrbits)
        .where(and(eq(activeOrbits.orbitSetId, orbitSetId), isNotNull(activeOrbits.orbitSetId)))
      return rows.map((r) => r.system)
    },

    /** Records the start of an orbit-feed run as a job row (kind 'orbit-feed', status running). */
    async startFeedRun(url: string, createdBy: number | null): Promise<number> {
      const now = new Date()
      const [result] = await db.insert(jobs).values({
        kind: ORBIT_FEED_JOB_KIND,
        payloadJson: JSON.stringify({ url }),
        status: 'running',
        attempts: 1,
        maxAttempts: 1,
        runAfter: now,
        startedAt: now,
        heartbeatAt: now,
        lockedBy: 'orbit-feed-run',
        createdBy,
      })
      return Number(result.insertId)
    },

    async finishFeedRun(jobId: number, outcome: { ok: boolean; error: string | null; resultJson: string }): Promise<void> {
      await db
        .update(jobs)
        .set({
          status: outcome.ok ? 'done' : 'failed',
          progress: 1,
          finishedAt: new Date(),
          error: outcome.error,
          resultJson: outcome.resultJson,
          lockedBy: null,
          updatedAt: new Date(),
        })
        .where(eq(jobs.id, jobId))
    },

    /** The newest finished orbit-feed run (by this app or by the job queue). */
    async lastFeedRun(): Promise<JobRow | null> {
      const [row] = await db
        .select()
        .from(jobs)
        .where(and(eq(jobs.kind, ORBIT_FEED_JOB_KIND), inArray(jobs.status, ['done', 'failed'])))
        .orderBy(desc(jobs.finishedAt), desc(jobs.id))
        .limit(1)
      return row ?? null
    },
  }
}
export type OrbitsRepository = ReturnType<typeof orbitsRepository>
