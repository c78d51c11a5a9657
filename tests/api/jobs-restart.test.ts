// Restart safety with a real server process: recomputes of several fields are queued
// through the API, the server is killed with SIGKILL while they run, and a new server
// process finishes every job. Afterwards each field has exactly the window's hours (no
// duplicates, no partial set, one inputs version) and no job is left running.
import { and, inArray } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { openDatabase, type DatabaseHandle } from '../../server/db/index.ts'
import { runMigrations } from '../../server/db/migrate.ts'
import { createRepositories } from '../../server/db/repositories/index.ts'
import { jobs } from '../../server/db/schema-planning.ts'
import { seedDemo } from '../../seed/index.ts'
import { freePort } from '../e2e/support.ts'
import { ensureForecastFields, fieldWindow } from '../support/forecastFields.ts'
import { demo, DEMO_PASSWORD } from '../support/server.ts'
import { killHard, queueRecomputes, signInAs, startServer, stopCleanly, type ServerProcess } from '../support/serverProcess.ts'

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

async function until<T>(probe: () => Promise<T | null | undefined | false>, what: string, timeoutMs = 120_000): Promise<T> {
  const end = Date.now() + timeoutMs
  for (;;) {
    const v = await probe()
    if (v) return v
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}\n${output().slice(-3000)}`)
    await new Promise((r) => setTimeout(r, 50))
  }
}

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
    const repos = createRepositories(db.db)
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
    }, 'jobs running on the first server')
    await killHard(first)
    const leftRunning = (await ours()).filter((r) => r.status === 'running')
    expect(leftRunning.length).toBeGreaterThan(0)

    // A new process on the same database.
    const second = await start()
    await until(async () => {
      const rows = await ours()
      const open = await db.db.select().from(jobs).where(and(inArray(jobs.fieldId, fieldIds), inArray(jobs.status, ['running', 'queued'])))
      return open.length === 0 && rows.every((r) => r.status === 'done' || r.status === 'failed' || r.status === 'superseded') && rows
    }, 'every job of the fields to finish on the second server')
    const rows = await ours()
    expect(rows.map((r) => [r.id, r.status, r.error])).toEqual(rows.map((r) => [r.id, 'done', null]))
    // The jobs the dead process held were run again by the new one.
    for (const left of leftRunning) {
      const row = rows.find((r) => r.id === left.id)!
      expect(row.lockedBy).toBeNull()
      expect(row.attempts).toBeGreaterThanOrEqual(2)
    }
    expect(await db.db.select().from(jobs).where(and(inArray(jobs.id, ids), inArray(jobs.status, ['running', 'queued'])))).toEqual([])

    // Exactly the window's hours per field, consecutive, one inputs version, from the last job.
    const meta = await repos.forecasts.storedMeta(fieldIds)
    for (const id of fieldIds) {
      // The week of the field's farm: its local days.
      const window = await fieldWindow(db.db, id)
      const m = meta.get(id)!
      expect(m.hours, `hours of field ${id}`).toBe(window.hours)
      expect(m.firstHour?.getTime()).toBe(window.startMs)
      expect(m.lastHour?.getTime()).toBe(window.endMs - 3_600_000)
      expect(m.minVersion).toBe(m.maxVersion)
      const hours = await repos.forecasts.hours([id], new Date(window.startMs), new Date(window.endMs))
      expect(hours).toHaveLength(window.hours)
      expect(new Set(hours.map((h) => h.hourStart.getTime())).size).toBe(window.hours)
      // Every hour of the field came from one job that completed: the field's job of this
      // test, or a later background recompute of the same field. A server's start-up check
      // runs while the runner already claims jobs, and queues a field again when its only
      // job is running (a running job may have read older inputs), so a later 'start-up'
      // job can legitimately write the same week after ours (as can the hourly new-day
      // check's job when a farm's midnight passes during the test).
      const job = queued.find((j) => j.fieldId === id)!
      const writers = [...new Set(hours.map((h) => h.jobId))]
      expect(writers, `jobs that wrote field ${id}`).toHaveLength(1)
      if (writers[0] !== job.id) {
        const [writer] = await db.db.select().from(jobs).where(inArray(jobs.id, writers as number[]))
        expect(writer.id).toBeGreaterThan(job.id)
        expect([writer.kind, writer.fieldId, writer.status]).toEqual(['forecast', id, 'done'])
        expect(['start-up', 'nightly', 'new-day']).toContain((JSON.parse(writer.payloadJson) as { reason: string }).reason)
      }
    }
    // No job of the fields ran to completion twice: one 'done' row per job id, and every
    // field's done jobs wrote their week once (no duplicate hour rows, checked above).
    const doneOfFields = await db.db.select().from(jobs).where(and(inArray(jobs.fieldId, fieldIds), inArray(jobs.status, ['done'])))
    expect(new Set(doneOfFields.map((j) => j.id)).size).toBe(doneOfFields.length)
    for (const j of doneOfFields) expect(j.lockedBy, `job ${j.id} is done and released`).toBeNull()
    expect(output()).toMatch(/queued again/)
    await stopCleanly(second)
  })
})
