// Queries on passes: lists with their field, farm, work type and machine; the locking read
// that keeps a machine from being booked twice; the at-risk columns.
import { and, asc, eq, gt, inArray, lt, ne, sql, type SQL } from 'drizzle-orm'
import { alias } from 'drizzle-orm/mysql-core'
import { activePassStatuses, type PassStatus } from '../../../shared/schemas/passes.ts'
import type { DbOrTx } from '../index.ts'
import { farms, users } from '../schema.ts'
import { fields, machines, passes, workTypes, type PassRow } from '../schema-planning.ts'

export interface NewPass {
  fieldId: number
  workTypeId: number
  machineId: number | null
  startAt: Date
  durationMin: number
  status: PassStatus
  atRisk: boolean
  atRiskReason: string | null
  suggestedStartAt: Date | null
  notes: string
  createdBy: number | null
  statusChangedAt?: Date | null
  statusChangedBy?: number | null
}

/** A pass with the names and settings pages and messages need. */
export interface PassDetailRow extends PassRow {
  farmId: number
  farmName: string
  timeZone: string
  fieldName: string
  fieldAreaHa: number
  workTypeName: string
  requireN1: boolean
  machineName: string | null
  crew: string | null
  machineOperatorId: number | null
  statusChangedByName: string | null
}

export interface PassFilter {
  /** restrict to these farms (a client's linked farms) */
  onlyFarmIds?: number[]
  farmId?: number
  fieldId?: number
  machineId?: number
  /** passes on the machines this user operates */
  operatorUserId?: number
  /** passes overlapping [from, to) */
  from?: Date
  to?: Date
  statuses?: readonly PassStatus[]
  atRisk?: boolean
  limit?: number
}

/** Longest pass the API accepts (7 days): bounds the index range of overlap queries. */
const MAX_DURATION_MS = 7 * 24 * 3_600_000

/** `start_at + duration` as SQL. */
const endAt = sql`DATE_ADD(${passes.startAt}, INTERVAL ${passes.durationMin} MINUTE)`

/** Conditions for "overlaps [from, to)": start < to and end > from. */
function overlapping(from: Date | undefined, to: Date | undefined): SQL[] {
  const out: SQL[] = []
  if (to) out.push(lt(passes.startAt, to))
  if (from) {
    out.push(sql`${endAt} > ${from}`)
    // Lets the (…, start_at) indexes bound the scan from below.
    out.push(gt(passes.startAt, new Date(from.getTime() - MAX_DURATION_MS)))
  }
  return out
}

/** The user who last set a pass's status. */
const statusUser = alias(users, 'status_user')

const detailColumns = {
  pass: passes,
  farmId: fields.farmId,
  farmName: farms.name,
  timeZone: farms.timeZone,
  fieldName: fields.name,
  fieldAreaHa: fields.areaHa,
  workTypeName: workTypes.name,
  requireN1: workTypes.requireN1,
  machineName: machines.name,
  crew: machines.crew,
  machineOperatorId: machines.operatorUserId,
  statusChangedByName: statusUser.name,
}

type DetailSelect = {
  pass: PassRow
  farmId: number
  farmName: string
  timeZone: string
  fieldName: string
  fieldAreaHa: number
  workTypeName: string
  requireN1: boolean
  machineName: string | null
  crew: string | null
  machineOperatorId: number | null
  statusChangedByName: string | null
}

const flatten = ({ pass, ...rest }: DetailSelect): PassDetailRow => ({ ...pass, ...rest })

export function passesRepository(db: DbOrTx) {
  function detailQuery(where: SQL | undefined) {
    return db
      .select(detailColumns)
      .from(passes)
      .innerJoin(fields, eq(fields.id, passes.fieldId))
      .innerJoin(farms, eq(farms.id, fields.farmId))
      .innerJoin(workTypes, eq(workTypes.id, passes.workTypeId))
      .leftJoin(machines, eq(machines.id, passes.machineId))
      .leftJoin(statusUser, eq(statusUser.id, passes.statusChangedBy))
      .where(where)
  }

  return {
    async findById(id: number): Promise<PassDetailRow | null> {
      const [row] = await detailQuery(eq(passes.id, id)).limit(1)
      return row ? flatten(row) : null
    },

    /** Passes matching the filter, earliest first. */
    async list(filter: PassFilter = {}): Promise<PassDetailRow[]> {
      if (filter.onlyFarmIds && filter.onlyFarmIds.length === 0) return []
      if (filter.statuses && filter.statuses.length === 0) return []
      const where: SQL[] = overlapping(filter.from, filter.to)
      if (filter.onlyFarmIds) where.push(inArray(fields.farmId, filter.onlyFarmIds))
      if (filter.farmId) where.push(eq(fields.farmId, filter.farmId))
      if (filter.fieldId) where.push(eq(passes.fieldId, filter.fieldId))
      if (filter.machineId) where.push(eq(passes.machineId, filter.machineId))
      if (filter.operatorUserId) where.push(eq(machines.operatorUserId, filter.operatorUserId))
      if (filter.statuses) where.push(inArray(passes.status, [...filter.statuses]))
      if (filter.atRisk !== undefined) where.push(eq(passes.atRisk, filter.atRisk))
      const rows = await detailQuery(where.length ? and(...where) : undefined)
        .orderBy(asc(passes.startAt), asc(passes.id))
        .limit(filter.limit ?? 5000)
      return rows.map(flatten)
    },

    /**
     * Locks the machine's row (FOR UPDATE) so that bookings of one machine run one after
     * the other; false when the machine does not exist. Call inside a transaction.
     */
    async lockMachine(machineId: number): Promise<boolean> {
      const rows = await db.select({ id: machines.id }).from(machines).where(eq(machines.id, machineId)).for('update')
      return rows.length > 0
    },

    /**
     * The machine's planned, confirmed or started passes overlapping [from, to), read with
     * SELECT ... FOR UPDATE (a locking read sees the latest committed bookings and locks
     * them and the index range until the transaction ends). Call inside a transaction.
     */
    async lockMachineBookings(machineId: number, from: Date, to: Date, exceptPassId?: number): Promise<PassRow[]> {
      const where = [
        eq(passes.machineId, machineId),
        inArray(passes.status, [...activePassStatuses]),
        ...overlapping(from, to),
      ]
      if (exceptPassId) where.push(ne(passes.id, exceptPassId))
      return db
        .select()
        .from(passes)
        .where(and(...where))
        .orderBy(asc(passes.startAt))
        .for('update')
    },

    /** Spans the machine is booked (planned, confirmed or started) overlapping [from, to). */
    async machineBusy(machineId: number, from: Date, to: Date, exceptPassId?: number): Promise<Array<{ startMs: number; endMs: number }>> {
      const where = [eq(passes.machineId, machineId), inArray(passes.status, [...activePassStatuses]), ...overlapping(from, to)]
      if (exceptPassId) where.push(ne(passes.id, exceptPassId))
      const rows = await db
        .select({ startAt: passes.startAt, durationMin: passes.durationMin })
        .from(passes)
        .where(and(...where))
      return rows.map((r) => ({ startMs: r.startAt.getTime(), endMs: r.startAt.getTime() + r.durationMin * 60_000 }))
    },

    async insert(pass: NewPass): Promise<number> {
      const [result] = await db.insert(passes).values(pass)
      return result.insertId
    },

    /** A change a person made: updated_at moves and the version goes up by one. */
    async update(id: number, changes: Partial<NewPass>): Promise<void> {
      await db
        .update(passes)
        .set({ ...changes, version: sql`${passes.version} + 1`, updatedAt: new Date() })
        .where(eq(passes.id, id))
    },

    /** Locks the pass row until the transaction ends; null when there is no such pass. */
    async lockPass(id: number): Promise<{ id: number; version: number } | null> {
      const [row] = await db.select({ id: passes.id, version: passes.version }).from(passes).where(eq(passes.id, id)).for('update')
      return row ?? null
    },

    /**
     * Writes the at-risk columns. updated_at moves too: the pass as people and calendar
     * feeds see it (LAST-MODIFIED, DTSTAMP) has changed.
     */
    async setRisk(id: number, risk: { atRisk: boolean; atRiskReason: string | null; suggestedStartAt: Date | null }): Promise<void> {
      await db.update(passes).set({ ...risk, updatedAt: new Date() }).where(eq(passes.id, id))
    },
  }
}
export type PassesRepository = ReturnType<typeof passesRepository>
