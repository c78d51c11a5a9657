// Queries for forecast jobs and the stored forecast hours: the inputs of a field's forecast
// (field, farm obstructions, active work types with their sigma), which fields a change
// affects, and the per-field replacement of the stored hours in one transaction.
import { and, asc, count, eq, getTableColumns, gte, inArray, lt, or, sql } from 'drizzle-orm'
import type { DbOrTx } from '../index.ts'
import { farms } from '../schema.ts'
import {
  fieldForecasts,
  fields,
  forecastHours,
  obstructions,
  serviceLevels,
  workTypes,
  type FieldRow,
  type ForecastHourRow,
  type ObstructionRow,
  type WorkTypeRow,
} from '../schema-planning.ts'

export type NewForecastHour = Omit<ForecastHourRow, 'computedAt'> & { computedAt: Date }

export interface StoredForecastMeta {
  fieldId: number
  hours: number
  firstHour: Date | null
  lastHour: Date | null
  /** Lowest and highest inputs version stored (equal when the forecast is one piece). */
  minVersion: string | null
  maxVersion: string | null
  computedAt: Date | null
  orbitSummary: string | null
  maxJobId: number | null
}

/** A forecast job of a field that has not finished. */
export interface PendingForecastJob {
  id: number
  status: 'queued' | 'running'
  progress: number
}

export interface FieldReadState {
  field: { id: number; name: string; farmId: number }
  /** the farm's IANA time zone (its forecast window) */
  timeZone: string
  meta: StoredForecastMeta | undefined
  pending: PendingForecastJob | null
  workTypesStamp: string
}

/** A row of readState's query as the driver returns it. */
interface RawReadState {
  id: number
  name: string
  farmId: number
  timeZone: string
  hours: number | null
  /** DATETIME values come as text ('YYYY-MM-DD hh:mm:ss.fff', UTC) through Drizzle's connection */
  firstHour: string | null
  lastHour: string | null
  minVersion: string | null
  maxVersion: string | null
  computedAt: string | null
  orbitSummary: string | null
  maxJobId: number | string | null
  pending: string | PendingForecastJob | null
  workTypesStamp: string
}

/** A DATETIME read as text (UTC, the connection's zone) as a Date. */
function utcDate(text: string | null): Date | null {
  return text === null ? null : new Date(`${text.replace(' ', 'T')}Z`)
}

/** Hours written per INSERT statement. */
const UPSERT_ROWS = 24

/** An upsert overwrites every column but the key (field, hour) with the new row's value. */
const upsertSet = Object.fromEntries(
  Object.entries(getTableColumns(forecastHours))
    .filter(([key]) => key !== 'fieldId' && key !== 'hourStart')
    .map(([key, column]) => [key, sql`VALUES(${sql.identifier(column.name)})`]),
)

/**
 * Rewrites the field_forecasts rows of `fieldIds` from their stored hours (and removes the
 * rows of fields with no hours left), in the caller's transaction.
 */
async function summarize(db: DbOrTx, fieldIds: number[]): Promise<void> {
  const ids = sql.join(
    fieldIds.map((id) => sql`${id}`),
    sql`, `,
  )
  await db.execute(sql`
    INSERT INTO field_forecasts (field_id, hours, first_hour, last_hour, min_version, max_version, computed_at, orbit_summary, max_job_id)
    SELECT field_id, COUNT(*), MIN(hour_start), MAX(hour_start), MIN(inputs_version), MAX(inputs_version), MAX(computed_at), MAX(orbit_summary), MAX(job_id)
    FROM forecast_hours WHERE field_id IN (${ids}) GROUP BY field_id
    ON DUPLICATE KEY UPDATE hours = VALUES(hours), first_hour = VALUES(first_hour), last_hour = VALUES(last_hour),
      min_version = VALUES(min_version), max_version = VALUES(max_version), computed_at = VALUES(computed_at),
      orbit_summary = VALUES(orbit_summary), max_job_id = VALUES(max_job_id)`)
  await db.delete(fieldForecasts).where(
    and(
      inArray(fieldForecasts.fieldId, fieldIds),
      sql`NOT EXISTS (SELECT 1 FROM forecast_hours h WHERE h.field_id = ${fieldForecasts.fieldId})`,
    ),
  )
}

export function forecastsRepository(db: DbOrTx) {
  return {
    /** The field with the sigma of its service level and its farm's name and time zone, or null. */
    async fieldWithSigma(fieldId: number): Promise<(FieldRow & { sigmaUereM: number; farmName: string; farmTimeZone: string }) | null> {
      const [row] = await db
        .select({ field: fields, sigmaUereM: serviceLevels.sigmaUereM, farmName: farms.name, farmTimeZone: farms.timeZone })
        .from(fields)
        .innerJoin(serviceLevels, eq(serviceLevels.id, fields.serviceLevelId))
        .innerJoin(farms, eq(farms.id, fields.farmId))
        .where(eq(fields.id, fieldId))
        .limit(1)
      return row ? { ...row.field, sigmaUereM: row.sigmaUereM, farmName: row.farmName, farmTimeZone: row.farmTimeZone } : null
    },

    async obstructionsOfFarm(farmId: number): Promise<ObstructionRow[]> {
      return db.select().from(obstructions).where(eq(obstructions.farmId, farmId)).orderBy(asc(obstructions.id))
    },

    /** Active work types in display order, each with the sigma of its service level. */
    async activeWorkTypes(): Promise<Array<WorkTypeRow & { sigmaUereM: number }>> {
      const rows = await db
        .select({ wt: workTypes, sigmaUereM: serviceLevels.sigmaUereM })
        .from(workTypes)
        .innerJoin(serviceLevels, eq(serviceLevels.id, workTypes.serviceLevelId))
        .where(eq(workTypes.active, true))
        .orderBy(asc(workTypes.sortOrder), asc(workTypes.name), asc(workTypes.id))
      return rows.map((r) => ({ ...r.wt, sigmaUereM: r.sigmaUereM }))
    },

    /** The fields of a farm (or every field) with the sigma of their service level (the start-up sweep). */
    async allFieldsWithSigma(farmId?: number): Promise<Array<FieldRow & { sigmaUereM: number }>> {
      const rows = await db
        .select({ field: fields, sigmaUereM: serviceLevels.sigmaUereM })
        .from(fields)
        .innerJoin(serviceLevels, eq(serviceLevels.id, fields.serviceLevelId))
        .where(farmId === undefined ? undefined : eq(fields.farmId, farmId))
        .orderBy(asc(fields.id))
      return rows.map((r) => ({ ...r.field, sigmaUereM: r.sigmaUereM }))
    },

    /** Every farm's IANA time zone by farm id (the farms' forecast windows). */
    async farmZones(): Promise<Map<number, string>> {
      const rows = await db.select({ id: farms.id, timeZone: farms.timeZone }).from(farms)
      return new Map(rows.map((r) => [r.id, r.timeZone]))
    },

    /** Ids (and farms) of fields: all, of a farm, or using some service levels. */
    async fieldIds(filter: { farmId?: number; serviceLevelIds?: number[] } = {}): Promise<Array<{ id: number; farmId: number }>> {
      if (filter.serviceLevelIds && filter.serviceLevelIds.length === 0) return []
      const where = filter.farmId
        ? eq(fields.farmId, filter.farmId)
        : filter.serviceLevelIds
          ? inArray(fields.serviceLevelId, filter.serviceLevelIds)
          : undefined
      return db.select({ id: fields.id, farmId: fields.farmId }).from(fields).where(where).orderBy(asc(fields.id))
    },

    /** Whether any active work type uses one of the service levels. */
    async workTypesUseLevels(serviceLevelIds: number[]): Promise<boolean> {
      if (serviceLevelIds.length === 0) return false
      const [{ n }] = await db
        .select({ n: count() })
        .from(workTypes)
        .where(and(inArray(workTypes.serviceLevelId, serviceLevelIds), eq(workTypes.active, true)))
      return n > 0
    },

    async fieldBasics(fieldIds: number[]): Promise<Map<number, { id: number; name: string; farmId: number }>> {
      const map = new Map<number, { id: number; name: string; farmId: number }>()
      if (fieldIds.length === 0) return map
      const rows = await db
        .select({ id: fields.id, name: fields.name, farmId: fields.farmId })
        .from(fields)
        .where(inArray(fields.id, fieldIds))
      for (const r of rows) map.set(r.id, r)
      return map
    },

    /**
     * What a read of a field's stored week needs, in one round trip: the field's name and
     * farm, what is stored (field_forecasts), its pending forecast job (a running one
     * first) and a stamp that changes whenever the work types do.
     */
    async readState(fieldId: number): Promise<FieldReadState | null> {
      const [rows] = (await db.execute(sql`
        SELECT f.id, f.name, f.farm_id AS farmId, fa.time_zone AS timeZone,
          s.hours, s.first_hour AS firstHour, s.last_hour AS lastHour, s.min_version AS minVersion,
          s.max_version AS maxVersion, s.computed_at AS computedAt, s.orbit_summary AS orbitSummary, s.max_job_id AS maxJobId,
          (SELECT JSON_OBJECT('id', j.id, 'status', j.status, 'progress', j.progress) FROM jobs j
            WHERE j.field_id = f.id AND j.kind = 'forecast' AND j.status IN ('queued', 'running')
            ORDER BY j.status = 'running' DESC, j.id DESC LIMIT 1) AS pending,
          (SELECT CONCAT(COUNT(*), '/', COALESCE(MAX(w.id), 0), '/', COALESCE(MAX(w.updated_at), '')) FROM work_types w) AS workTypesStamp
        FROM fields f JOIN farms fa ON fa.id = f.farm_id LEFT JOIN field_forecasts s ON s.field_id = f.id
        WHERE f.id = ${fieldId}`)) as unknown as [RawReadState[]]
      const row = rows[0]
      if (!row) return null
      return {
        field: { id: row.id, name: row.name, farmId: row.farmId },
        timeZone: row.timeZone,
        meta:
          row.hours === null
            ? undefined
            : {
                fieldId: row.id,
                hours: row.hours,
                firstHour: utcDate(row.firstHour),
                lastHour: utcDate(row.lastHour),
                minVersion: row.minVersion,
                maxVersion: row.maxVersion,
                computedAt: utcDate(row.computedAt),
                orbitSummary: row.orbitSummary,
                maxJobId: row.maxJobId === null ? null : Number(row.maxJobId),
              },
        // The driver may hand JSON_OBJECT's value over parsed or as text.
        pending: typeof row.pending === 'string' ? (JSON.parse(row.pending) as PendingForecastJob) : row.pending,
        workTypesStamp: row.workTypesStamp,
      }
    },

    async fieldsOfFarm(farmId: number): Promise<Array<{ id: number; name: string; farmId: number }>> {
      return db
        .select({ id: fields.id, name: fields.name, farmId: fields.farmId })
        .from(fields)
        .where(eq(fields.farmId, farmId))
        .orderBy(asc(fields.name), asc(fields.id))
    },

    /** What is stored per field: hour count, first/last hour, versions, when, by which job. */
    async storedMeta(fieldIds?: number[]): Promise<Map<number, StoredForecastMeta>> {
      const map = new Map<number, StoredForecastMeta>()
      if (fieldIds && fieldIds.length === 0) return map
      const rows = await db
        .select()
        .from(fieldForecasts)
        .where(fieldIds ? inArray(fieldForecasts.fieldId, fieldIds) : undefined)
      for (const r of rows) map.set(r.fieldId, r)
      return map
    },

    /** Stored hours of fields in [from, to), ordered by field and hour. */
    async hours(fieldIds: number[], from: Date, to: Date): Promise<ForecastHourRow[]> {
      if (fieldIds.length === 0) return []
      return db
        .select()
        .from(forecastHours)
        .where(and(inArray(forecastHours.fieldId, fieldIds), gte(forecastHours.hourStart, from), lt(forecastHours.hourStart, to)))
        .orderBy(asc(forecastHours.fieldId), asc(forecastHours.hourStart))
    },

    /**
     * Replaces a field's stored forecast with `rows` (one job's result). Call inside a
     * transaction: the field row is locked first (FOR UPDATE), so two jobs of one field
     * store one after the other; a result older than what is stored (lower job id) is not
     * written. Hours outside [windowStart, windowEnd) are deleted; the window's hours are
     * upserted. Returns what happened.
     */
    async replaceField(
      fieldId: number,
      jobId: number,
      windowStart: Date,
      windowEnd: Date,
      rows: NewForecastHour[],
    ): Promise<'stored' | 'field-gone' | 'newer-stored'> {
      const [field] = await db.select({ id: fields.id }).from(fields).where(eq(fields.id, fieldId)).for('update')
      if (!field) return 'field-gone'
      // What is stored, from its summary row (kept in these same transactions).
      const [stored] = await db
        .select({ newest: fieldForecasts.maxJobId })
        .from(fieldForecasts)
        .where(eq(fieldForecasts.fieldId, fieldId))
      if (stored?.newest != null && stored.newest > jobId) return 'newer-stored'
      // The field row is locked, so the set of its hours cannot change under us: delete the
      // ones outside the window by key (record locks only, no gap locks on other fields).
      const outside = await db
        .select({ hourStart: forecastHours.hourStart })
        .from(forecastHours)
        .where(
          and(
            eq(forecastHours.fieldId, fieldId),
            or(lt(forecastHours.hourStart, windowStart), gte(forecastHours.hourStart, windowEnd)),
          ),
        )
      if (outside.length) {
        await db.delete(forecastHours).where(
          and(
            eq(forecastHours.fieldId, fieldId),
            inArray(
              forecastHours.hourStart,
              outside.map((o) => o.hourStart),
            ),
          ),
        )
      }
      // A day per statement: the server answers other requests between them instead of
      // building one statement of several thousand values in one go.
      for (let i = 0; i < rows.length; i += UPSERT_ROWS) {
        await db
          .insert(forecastHours)
          .values(rows.slice(i, i + UPSERT_ROWS))
          .onDuplicateKeyUpdate({ set: upsertSet })
      }
      await summarize(db, [fieldId])
      return 'stored'
    },

    /** Deletes stored hours that start before `before` (older than the window). Call inside a transaction. */
    async pruneBefore(before: Date): Promise<number> {
      const gone = await db
        .selectDistinct({ fieldId: forecastHours.fieldId })
        .from(forecastHours)
        .where(lt(forecastHours.hourStart, before))
      if (gone.length === 0) return 0
      const [res] = await db.delete(forecastHours).where(lt(forecastHours.hourStart, before))
      await summarize(
        db,
        gone.map((g) => g.fieldId),
      )
      return res.affectedRows
    },
  }
}
export type ForecastsRepository = ReturnType<typeof forecastsRepository>
