// Restart safety with a real server process: recomputes of several fields are queued
// through the API, the server is killed with SIGKILL while they run, and a new server
// process finishes every job. Afterwards each field has exactly the window's hours (no
// duplicates, no partial set, one inputs version) and no job is left running.
import { and, inArray } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { openDatabase, type DatabaseHandle } from '../../server/db/index.ts'
import { runMigrations } from '../../server/db/migrate.ts'
import { jobs } from '../../server/db/schema-planning.ts'
import { seedDemo } from '../../seed/index.ts'
import { freePort } from '../e2e/support.ts'
import { until } from '../support/fileJobs.ts'
import { ensureForecastFields } from '../support/forecastFields.ts'
import { demo, DEMO_PASSWORD } from '../support/server.ts'
import { killHard, queueRecomputes, signInAs, startServer, stopCleanly, type ServerProcess } from '../support/serverProcess.ts'
import { expectOneCompleteWeek } from '../support/weekChecks.ts'

let db: DatabaseHandle
let fieldIds: number[] = []
const servers: ServerProcess[] = []
/** What every server of the test printed, for the failure messages. */
const output = () => servers.map((s) => s.output()).join('\n---\n')

async function start(): Promise<ServerProcess> {
  const server = await startServer(
    {
      NODE_ENV: 'test',
      LOG_LEVEL: 'info',
      JOB_CONCURRENCY: '2',
      FORECAST_STEP_MIN: '5',
      // Twice the usual sample points, so a job lasts long enough to be caught mid-run.
      FORECAST_SAMPLES: '128',
    },
    await freePort(),
    // Ready once its jobs, recovery and start-up check have started.
    { readyLine: 'Skyfurrow listening', timeoutMs: 90_000 },
  )
  servers.push(server)
  return server
}

/** The servers' last output, for a wait that timed out. */
const lastOutput = () => output().slice(-3000)

beforeAll(async () => {
  if (!process.env.DATABASE_URL) throw new Error('This test needs DATABASE_URL (a migrated test database).')
  db = openDatabase(process.env.DATABASE_URL, { connectionLimit: 3 })
  await runMigrations(db.db)
  await seedDemo(db.db)
  fieldIds = (await ensureForecastFields(db.db, 2)).slice(0, 8)
})

afterAll(async () => {
  for (const s of servers) await killHard(s)
  await db?.close()
})

describe('restart safety', () => {
  it('kill -9 in the middle of recomputes, start again: every job completes, every field has exactly its window', { timeout: 400_000 }, async () => {
    const first = await start()
    // Sign in and queue a recompute of each field through the API, as a user would.
    const cookie = await signInAs(first.baseUrl, demo.office, DEMO_PASSWORD)
    const queued = await queueRecomputes(first.baseUrl, cookie, fieldIds)
    const ids = queued.map((j) => j.id)
    const ours = () => db.db.select().from(jobs).where(inArray(jobs.id, ids))

    // Wait until the first server is in the middle: jobs claimed and running, some not done.
    // (On a quiet machine a job can finish before its first progress report is written, so
    // being claimed counts as running.)
    await until(async () => {
      const rows = await ours()
      const running = rows.filter((r) => r.status === 'running')
      const done = rows.filter((r) => r.status === 'done')
      return running.length > 0 && done.length < rows.length - 2
    }, 'jobs running on the first server', 120_000, lastOutput)
    await killHard(first)
    const leftRunning = (await ours()).filter((r) => r.status === 'running')
    expect(leftRunning.length).toBeGreaterThan(0)

    // A new process on the same database.
    const second = await start()
    await until(async () => {
      const rows = await ours()
      const open = await db.db.select().from(jobs).where(and(inArray(jobs.fieldId, fieldIds), inArray(jobs.status, ['running', 'queued'])))
      return open.length === 0 && rows.every((r) => r.status === 'done' || r.status === 'failed' || r.status === 'superseded') && rows
    }, 'every job of the fields to finish on the second server', 120_000, lastOutput)
    const rows = await ours()
    expect(rows.map((r) => [r.id, r.status, r.error])).toEqual(rows.map((r) => [r.id, 'done', null]))
    // The jobs the dead process held were run again by the new one.
    for (const left of leftRunning) {
      const row = rows.find((r) => r.id === left.id)!
      expect(row.lockedBy).toBeNull()
      expect(row.attempts).toBeGreaterThanOrEqual(2)
    }
    expect(await db.db.select().from(jobs).where(and(inArray(jobs.id, ids), inArray(jobs.status, ['running', 'queued'])))).toEqual([])

    // Exactly the farm's window per field, consecutive, one inputs version, from one completed job.
    await expectOneCompleteWeek(db.db, fieldIds, queued)
    // No job of the fields ran to completion twice: one 'done' row per job id, and every
    // field's done jobs wrote their week once (no duplicate hour rows, checked above).
    const doneOfFields = await db.db.select().from(jobs).where(and(inArray(jobs.fieldId, fieldIds), inArray(jobs.status, ['done'])))
    expect(new Set(doneOfFields.map((j) => j.id)).size).toBe(doneOfFields.length)
    for (const j of doneOfFields) expect(j.lockedBy, `job ${j.id} is done and released`).toBeNull()
    expect(output()).toMatch(/queued again/)
    await stopCleanly(second)
  })
})
