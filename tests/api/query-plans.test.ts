// The hot queries use their indexes: the forecast read of a field, the farm day view of
// the Outlook, the job claim and the pending-job lookup of the enqueue are run through the
// real repositories (their SQL captured with Drizzle's query logger) on a database with
// enough rows that a full scan would cost, then EXPLAINed; a plan that reads a whole table
// (EXPLAIN type ALL, MariaDB Knowledge Base "EXPLAIN": "ALL: a full table scan") fails.
// The work types table is read whole on purpose (a handful of rows; their count and
// newest change are the read's cache stamp), so it is the one table allowed a scan.
import { inArray } from 'drizzle-orm'
import { drizzle } from 'drizzle-orm/mysql2'
import mysql from 'mysql2/promise'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { nominalConstellation } from '../../shared/precision/index.ts'
import { openDatabase, type DatabaseHandle } from '../../server/db/index.ts'
import { runMigrations } from '../../server/db/migrate.ts'
import { createRepositories } from '../../server/db/repositories/index.ts'
import * as schema from '../../server/db/schema.ts'
import { farms } from '../../server/db/schema.ts'
import { fields, jobs } from '../../server/db/schema-planning.ts'
import { engineTask } from '../../server/forecast/inputs.ts'
import { toStoredHour } from '../../server/forecast/storedHour.ts'
import { runEngineTask } from '../../server/jobs/engineWorker.ts'
import { seedDemo } from '../../seed/index.ts'
import { rectangle } from '../support/forecastFields.ts'

// Sixteen farms of 25 fields, a stored day each: the day view reads one farm's
// sixteenth of the stored rows (as a farm among many does).
const FARMS = 16
const FIELD_COUNT = 25
const HOURS = 24
const DONE_JOBS = 3000

let handle: DatabaseHandle
const farmIds: number[] = []
let farmId = 0
const fieldIds: number[] = []
const jobIds: number[] = []
const windowStartMs = Math.floor(Date.now() / 86_400_000) * 86_400_000
const window = { startMs: windowStartMs, endMs: windowStartMs + HOURS * 3_600_000, hours: HOURS }

/** Repositories whose every statement is recorded (SQL with its parameters filled in). */
function recordingRepos() {
  const statements: string[] = []
  const db = drizzle(handle.pool, {
    schema,
    mode: 'default',
    logger: { logQuery: (query: string, params: unknown[]) => statements.push(mysql.format(query, params as never[])) },
  })
  return { db, repos: createRepositories(db as never), statements }
}

interface PlanRow {
  id: number
  select_type: string
  table: string | null
  type: string | null
  key: string | null
  rows: number | null
}

async function plansOf(statements: string[]): Promise<Array<{ sql: string; plan: PlanRow[] }>> {
  const out: Array<{ sql: string; plan: PlanRow[] }> = []
  for (const sql of statements) {
    if (!/^\s*(select|update|delete)/i.test(sql)) continue
    const [plan] = (await handle.pool.query(`EXPLAIN ${sql}`)) as unknown as [PlanRow[]]
    out.push({ sql, plan })
  }
  return out
}

/** Plan rows that read a whole table (other than work_types). */
function fullScans(plans: Array<{ sql: string; plan: PlanRow[] }>) {
  return plans.flatMap((p) =>
    p.plan.filter((r) => r.type === 'ALL' && r.table !== null && !/^w$|work_types/.test(r.table)).map((r) => ({ table: r.table, sql: p.sql })),
  )
}

beforeAll(async () => {
  handle = openDatabase(process.env.DATABASE_URL!, { connectionLimit: 3 })
  await runMigrations(handle.db)
  await seedDemo(handle.db)
  const repos = createRepositories(handle.db)
  const level = (await repos.serviceLevels.list())[0]
  for (let f = 0; f < FARMS; f++) {
    farmIds.push(await repos.farms.insert({ name: `Query plan farm ${f + 1} (invented)`, timeZone: 'America/Chicago', address: '', notes: 'Invented for the query plan test.' }))
  }
  farmId = farmIds[0]
  for (let i = 0; i < FARMS * FIELD_COUNT; i++) {
    const lon = -95.2 + (i % 20) * 0.01
    const lat = 41.4 + Math.floor(i / 20) * 0.008
    const boundary = rectangle(lon, lat)
    fieldIds.push(
      await repos.fields.insert({
        farmId: farmIds[i % FARMS],
        name: `Plan plot ${i + 1}`,
        crop: 'corn',
        notes: '',
        serviceLevelId: level.id,
        antennaHeightM: 3,
        boundary: JSON.stringify(boundary),
        areaHa: 12,
        centroidLat: lat,
        centroidLon: lon,
      }),
    )
  }
  // One computed week (coarse settings: the plans depend on the rows, not on the figures),
  // stored for every field as a job would store it.
  const field = await repos.forecasts.fieldWithSigma(fieldIds[0])
  const task = engineTask({
    field: field!,
    obstructions: [],
    satellites: nominalConstellation('gps'),
    outages: [],
    workTypes: [],
    windowStartMs: window.startMs,
    windowHours: window.hours,
    settings: { stepMin: 60, sampleCount: 4, maskDeg: 10 },
  })
  const week = runEngineTask(task, () => {}, null)
  const computedAt = new Date()
  for (const id of fieldIds) {
    const rows = week.hours.map((h) => toStoredHour(id, h, { jobId: 1, inputsVersion: 'plan-test', orbitSummary: '', computedAt }))
    await handle.db.transaction((tx) => createRepositories(tx as never).forecasts.replaceField(id, 1, new Date(window.startMs), new Date(window.endMs), rows))
  }
  // A job history: many finished forecast jobs, a few queued.
  const now = new Date()
  for (let i = 0; i < DONE_JOBS; i += 500) {
    const batch = Array.from({ length: Math.min(500, DONE_JOBS - i) }, (_, k) => {
      const fieldId = fieldIds[(i + k) % fieldIds.length]
      return {
        kind: 'forecast',
        fieldId,
        farmId: farmIds[(i + k) % FARMS],
        dedupeKey: `forecast:${fieldId}`,
        inputsVersion: '',
        payloadJson: '{}',
        status: 'done' as const,
        progress: 1,
        attempts: 1,
        maxAttempts: 4,
        runAfter: now,
        finishedAt: now,
        createdAt: now,
        updatedAt: now,
      }
    })
    const [res] = await handle.db.insert(jobs).values(batch)
    for (let k = 0; k < batch.length; k++) jobIds.push(res.insertId + k)
  }
  await handle.pool.query('ANALYZE TABLE jobs, forecast_hours, field_forecasts, fields, farms')
}, 300_000)

afterAll(async () => {
  if (handle) {
    if (jobIds.length) await handle.db.delete(jobs).where(inArray(jobs.id, jobIds))
    if (farmIds.length) await handle.db.delete(jobs).where(inArray(jobs.farmId, farmIds))
    if (fieldIds.length) await handle.db.delete(fields).where(inArray(fields.id, fieldIds))
    if (farmIds.length) await handle.db.delete(farms).where(inArray(farms.id, farmIds))
    await handle.close()
  }
})

describe('hot queries read by index', () => {
  it('the forecast read of one field', async () => {
    const { repos, statements } = recordingRepos()
    const state = await repos.forecasts.readState(fieldIds[7])
    expect(state?.meta?.hours).toBe(window.hours)
    const hours = await repos.forecasts.hours([fieldIds[7]], new Date(window.startMs), new Date(window.endMs))
    expect(hours).toHaveLength(window.hours)
    const plans = await plansOf(statements)
    expect(plans.length).toBeGreaterThanOrEqual(2)
    expect(fullScans(plans)).toEqual([])
  })

  it("the Outlook's day view of a farm", async () => {
    const { repos, statements } = recordingRepos()
    const list = await repos.forecasts.fieldsOfFarm(farmId)
    expect(list).toHaveLength(FIELD_COUNT)
    const ids = list.map((f) => f.id)
    const meta = await repos.forecasts.storedMeta(ids)
    expect(meta.size).toBe(FIELD_COUNT)
    await repos.jobs.pendingForFields(ids)
    const hours = await repos.forecasts.hours(ids, new Date(window.startMs), new Date(window.endMs))
    expect(hours).toHaveLength(FIELD_COUNT * HOURS)
    const plans = await plansOf(statements)
    expect(plans.length).toBeGreaterThanOrEqual(4)
    expect(fullScans(plans)).toEqual([])
  })

  it('the job claim and the pending-job lookup of the enqueue', async () => {
    const { db, repos, statements } = recordingRepos()
    const { job } = await repos.jobs.enqueue({ kind: 'forecast', fieldId: fieldIds[3], farmId, dedupeKey: `forecast:${fieldIds[3]}`, runAfter: new Date(Date.now() + 86_400_000) }, 'reuse-pending')
    jobIds.push(job.id)
    await repos.jobs.pendingKeys()
    // The claim in a transaction rolled back: a due job of the test database stays queued.
    await db
      .transaction(async (tx) => {
        await createRepositories(tx as never).jobs.claimNext('plan-test:0:check', ['forecast'])
        tx.rollback()
      })
      .catch((error: unknown) => {
        if (!(error instanceof Error && /rollback/i.test(error.message))) throw error
      })
    const plans = await plansOf(statements)
    expect(plans.some((p) => /skip locked/i.test(p.sql))).toBe(true)
    expect(fullScans(plans)).toEqual([])
    // The first look for jobs of no field (deliveries, feeds) goes through (field_id, status),
    // so that it reads and locks no queued forecast job.
    const noField = plans.find((p) => /skip locked/i.test(p.sql) && /field_id` is null/i.test(p.sql))
    expect(noField?.plan.map((r) => r.key)).toEqual(['jobs_field_idx'])
  })
})
