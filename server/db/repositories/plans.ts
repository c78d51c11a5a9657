// Queries on weekly plans: revisions (one per composed content of a farm's week), sends
// (one row per recipient and delivery, unique by idempotency key), schedules and opt-outs.
import { and, asc, desc, eq, inArray, sql, type SQL } from 'drizzle-orm'
import type { DbOrTx } from '../index.ts'
import { farmClients, farms, users } from '../schema.ts'
import { planOptOuts, planRevisions, planSchedules, planSends, type PlanRevisionRow, type PlanSendRow } from '../schema-planning.ts'

export interface NewPlanRevision {
  farmId: number
  weekStart: string
  revision: number
  note: string
  subject: string
  html: string
  textBody: string
  ics: string
  createdBy: number | null
}

export interface NewPlanSend {
  revisionId: number
  recipient: string
  userId: number | null
  idempotencyKey: string
  sentBy: number | null
  automatic: boolean
}

export interface PlanSendListRow extends PlanSendRow {
  farmId: number
  farmName: string
  weekStart: string
  revision: number
  sentByName: string | null
}

export interface PlanClientRow {
  id: number
  name: string
  email: string
  units: 'metric' | 'imperial'
  active: boolean
}

export type PlanScheduleRow = typeof planSchedules.$inferSelect

/** A MariaDB duplicate-key error (ER_DUP_ENTRY), possibly wrapped by Drizzle. */
export function isDuplicate(error: unknown): boolean {
  let e: unknown = error
  for (let depth = 0; e && depth < 4; depth++) {
    if ((e as { code?: string }).code === 'ER_DUP_ENTRY') return true
    e = (e as { cause?: unknown }).cause
  }
  return false
}

export function plansRepository(db: DbOrTx) {
  const sendColumns = {
    send: planSends,
    farmId: planRevisions.farmId,
    farmName: farms.name,
    weekStart: planRevisions.weekStart,
    revision: planRevisions.revision,
    sentByName: users.name,
  }
  const sendQuery = (where: SQL | undefined) =>
    db
      .select(sendColumns)
      .from(planSends)
      .innerJoin(planRevisions, eq(planRevisions.id, planSends.revisionId))
      .innerJoin(farms, eq(farms.id, planRevisions.farmId))
      .leftJoin(users, eq(users.id, planSends.sentBy))
      .where(where)
  type SendSelect = Awaited<ReturnType<typeof sendQuery>>[number]
  const flat = ({ send, ...rest }: SendSelect): PlanSendListRow => ({ ...send, ...rest })

  return {
    /** The farm's client users (active or not: the caller decides). */
    async clientsOfFarm(farmId: number): Promise<PlanClientRow[]> {
      return db
        .select({ id: users.id, name: users.name, email: users.email, units: users.units, active: users.active })
        .from(farmClients)
        .innerJoin(users, eq(users.id, farmClients.userId))
        .where(and(eq(farmClients.farmId, farmId), eq(users.role, 'client')))
        .orderBy(asc(users.name), asc(users.id))
    },

    async usersByEmail(emails: string[]): Promise<Map<string, { id: number; units: 'metric' | 'imperial' }>> {
      if (emails.length === 0) return new Map()
      const rows = await db.select({ id: users.id, email: users.email, units: users.units }).from(users).where(inArray(users.email, emails))
      return new Map(rows.map((r) => [r.email.toLowerCase(), { id: r.id, units: r.units }]))
    },

    async latestRevision(farmId: number, weekStart: string, lock = false): Promise<PlanRevisionRow | null> {
      const q = db
        .select()
        .from(planRevisions)
        .where(and(eq(planRevisions.farmId, farmId), eq(planRevisions.weekStart, weekStart)))
        .orderBy(desc(planRevisions.revision))
        .limit(1)
      const [row] = lock ? await q.for('update') : await q
      return row ?? null
    },

    async findRevision(id: number): Promise<(PlanRevisionRow & { farmName: string; createdByName: string | null }) | null> {
      const [row] = await db
        .select({ rev: planRevisions, farmName: farms.name, createdByName: users.name })
        .from(planRevisions)
        .innerJoin(farms, eq(farms.id, planRevisions.farmId))
        .leftJoin(users, eq(users.id, planRevisions.createdBy))
        .where(eq(planRevisions.id, id))
        .limit(1)
      return row ? { ...row.rev, farmName: row.farmName, createdByName: row.createdByName } : null
    },

    async insertRevision(rev: NewPlanRevision): Promise<number> {
      const [result] = await db.insert(planRevisions).values(rev)
      return result.insertId
    },

    /** Inserts a send row unless its idempotency key exists; true when it was inserted. */
    async insertSendOnce(send: NewPlanSend): Promise<{ id: number; inserted: boolean }> {
      try {
        const [result] = await db.insert(planSends).values({ ...send, status: 'queued' })
        return { id: result.insertId, inserted: true }
      } catch (error) {
        // A duplicate key fails this statement only; the transaction goes on.
        if (!isDuplicate(error)) throw error
      }
      const [row] = await db.select({ id: planSends.id }).from(planSends).where(eq(planSends.idempotencyKey, send.idempotencyKey))
      return { id: row.id, inserted: false }
    },

    async findSend(id: number, lock = false): Promise<PlanSendRow | null> {
      const q = db.select().from(planSends).where(eq(planSends.id, id)).limit(1)
      const [row] = lock ? await q.for('update') : await q
      return row ?? null
    },

    async findSendDetail(id: number): Promise<PlanSendListRow | null> {
      const [row] = await sendQuery(eq(planSends.id, id)).limit(1)
      return row ? flat(row) : null
    },

    async sendsOfRevision(revisionId: number): Promise<PlanSendListRow[]> {
      return (await sendQuery(eq(planSends.revisionId, revisionId)).orderBy(asc(planSends.id))).map(flat)
    },

    /** The sends of every revision of a farm's week, keyed by recipient: any key already used. */
    async keysLike(prefix: string): Promise<string[]> {
      const rows = await db
        .select({ key: planSends.idempotencyKey })
        .from(planSends)
        .where(sql`${planSends.idempotencyKey} LIKE ${prefix.replace(/[\\%_]/g, (c) => `\\${c}`) + '%'}`)
      return rows.map((r) => r.key)
    },

    async listSends(filter: { farmId?: number; weekStart?: string; limit?: number }): Promise<PlanSendListRow[]> {
      const where: SQL[] = []
      if (filter.farmId) where.push(eq(planRevisions.farmId, filter.farmId))
      if (filter.weekStart) where.push(eq(planRevisions.weekStart, filter.weekStart))
      const rows = await sendQuery(where.length ? and(...where) : undefined)
        .orderBy(desc(planSends.createdAt), desc(planSends.id))
        .limit(filter.limit ?? 500)
      return rows.map(flat)
    },

    async markSending(id: number): Promise<void> {
      await db
        .update(planSends)
        .set({ attempts: sql`${planSends.attempts} + 1`, updatedAt: new Date() })
        .where(eq(planSends.id, id))
    },

    async markSent(id: number, messageId: string, at: Date): Promise<void> {
      await db.update(planSends).set({ status: 'sent', messageId, sentAt: at, error: null, updatedAt: at }).where(eq(planSends.id, id))
    },

    async markError(id: number, error: string, final: boolean): Promise<void> {
      await db
        .update(planSends)
        .set({ error: error.slice(0, 4000), ...(final ? { status: 'failed' as const } : {}), updatedAt: new Date() })
        .where(eq(planSends.id, id))
    },

    async markOptedOut(id: number): Promise<void> {
      await db.update(planSends).set({ status: 'opted-out', updatedAt: new Date() }).where(eq(planSends.id, id))
    },

    // ---- opt-outs -----------------------------------------------------------------
    async optOuts(farmId: number): Promise<Array<{ farmId: number; email: string; optedOutAt: Date }>> {
      return db.select().from(planOptOuts).where(eq(planOptOuts.farmId, farmId)).orderBy(asc(planOptOuts.email))
    },

    async isOptedOut(farmId: number, email: string): Promise<boolean> {
      const [row] = await db
        .select({ email: planOptOuts.email })
        .from(planOptOuts)
        .where(and(eq(planOptOuts.farmId, farmId), eq(planOptOuts.email, email.toLowerCase())))
        .limit(1)
      return Boolean(row)
    },

    async addOptOut(farmId: number, email: string): Promise<boolean> {
      try {
        await db.insert(planOptOuts).values({ farmId, email: email.toLowerCase() })
        return true
      } catch (error) {
        if (!isDuplicate(error)) throw error
        return false
      }
    },

    async removeOptOut(farmId: number, email: string): Promise<boolean> {
      const [result] = await db
        .delete(planOptOuts)
        .where(and(eq(planOptOuts.farmId, farmId), eq(planOptOuts.email, email.toLowerCase())))
      return result.affectedRows > 0
    },

    // ---- schedules ----------------------------------------------------------------
    async schedule(farmId: number, lock = false): Promise<PlanScheduleRow | null> {
      const q = db.select().from(planSchedules).where(eq(planSchedules.farmId, farmId)).limit(1)
      const [row] = lock ? await q.for('update') : await q
      return row ?? null
    },

    async upsertSchedule(farmId: number, input: { enabled: boolean; weekday: number; localTime: string }): Promise<void> {
      await db
        .insert(planSchedules)
        .values({ farmId, ...input })
        .onDuplicateKeyUpdate({ set: { ...input, updatedAt: new Date() } })
    },

    async setLastSentWeek(farmId: number, weekStart: string): Promise<void> {
      await db.update(planSchedules).set({ lastSentWeek: weekStart, updatedAt: new Date() }).where(eq(planSchedules.farmId, farmId))
    },

    /** Enabled schedules with their farm's zone. */
    async enabledSchedules(): Promise<Array<PlanScheduleRow & { timeZone: string }>> {
      const rows = await db
        .select({ s: planSchedules, timeZone: farms.timeZone })
        .from(planSchedules)
        .innerJoin(farms, eq(farms.id, planSchedules.farmId))
        .where(eq(planSchedules.enabled, true))
      return rows.map((r) => ({ ...r.s, timeZone: r.timeZone }))
    },
  }
}
export type PlansRepository = ReturnType<typeof plansRepository>
