// Several server processes on one MariaDB: one serves the pages with JOBS_ENABLED=false,
// two run jobs. Recomputes of several fields are queued through the page process; one job
// process is killed with SIGKILL while it holds a job. The other job process takes over
// what the dead one held (its recovery check finds the lock holder's pid gone) and every
// job ends done: none is lost, each job not held by the dead process ran exactly once
// (one attempt), the page process ran none, and every field has exactly its window's
// hours, from one completed job (its job of this test, or a later background recompute).
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
import { groupPids, killHard, queueRecomputes, signInAs, startServer, type ServerProcess } from '../support/serverProcess.ts'
import { expectOneCompleteWeek } from '../support/weekChecks.ts'

let db: DatabaseHandle
let fieldIds: number[] = []
const servers: ServerProcess[] = []

const env = () => ({
  DATABASE_URL: process.env.DATABASE_URL!,
  NODE_ENV: 'test',
  LOG_LEVEL: 'info',
  JOB_CONCURRENCY: '1',
  FORECAST_STEP_MIN: '5',
  FORECAST_SAMPLES: '64',
})

/** The pid in a runner id (host:pid:token). */
const pidOf = (lockedBy: string | null) => (lockedBy ? Number(lockedBy.split(':')[1]) : NaN)

/** Each process's last output, for a wait that timed out. */
const lastOutputs = () => servers.map((s) => s.output().slice(-1500)).join('\n---\n')

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

describe('two job processes and a page process', () => {
  it('SIGKILL of one job process mid-run: no job lost, none run twice, the page process runs none', { timeout: 600_000 }, async () => {
    const web = await startServer({ ...env(), JOBS_ENABLED: 'false' }, await freePort())
    servers.push(web)
    const a = await startServer({ ...env(), JOBS_ENABLED: 'true' }, await freePort())
    servers.push(a)
    const b = await startServer({ ...env(), JOBS_ENABLED: 'true' }, await freePort())
    servers.push(b)
    const webPids = new Set(groupPids(web.child.pid!))
    const aPids = new Set(groupPids(a.child.pid!))

    // Sign in and queue a recompute of each field through the page process, as a user would.
    const cookie = await signInAs(web.baseUrl, demo.office, DEMO_PASSWORD)
    const queued = await queueRecomputes(web.baseUrl, cookie, fieldIds)
    const ids = queued.map((j) => j.id)
    const ours = () => db.db.select().from(jobs).where(inArray(jobs.id, ids))

    // Who held which job, as seen while they run.
    const holders = new Map<number, Set<number>>()
    const watch = async () => {
      const rows = await ours()
      for (const r of rows) if (r.status === 'running' && r.lockedBy) (holders.get(r.id) ?? holders.set(r.id, new Set()).get(r.id)!).add(pidOf(r.lockedBy))
      return rows
    }

    // Kill process A while it holds one of our jobs and some are still to do.
    const heldByA = await until(async () => {
      const rows = await watch()
      const mine = rows.filter((r) => r.status === 'running' && aPids.has(pidOf(r.lockedBy)))
      return mine.length > 0 && rows.filter((r) => r.status === 'done').length < rows.length - 1 && mine.map((r) => r.id)
    }, 'a job running on process A', 300_000, lastOutputs)
    await killHard(a)
    const stillHeld = (await ours()).filter((r) => heldByA.includes(r.id) && r.status === 'running')
    expect(stillHeld.length).toBeGreaterThan(0)

    // Process B finishes everything, the dead process's jobs included.
    await until(async () => {
      const rows = await watch()
      return rows.every((r) => r.status === 'done' || r.status === 'failed') && rows
    }, 'every job to finish on process B', 300_000, lastOutputs)
    const rows = await ours()
    expect(rows.map((r) => [r.id, r.status, r.error])).toEqual(rows.map((r) => [r.id, 'done', null]))
    const killedIn = new Set(stillHeld.map((r) => r.id))
    for (const r of rows) {
      if (killedIn.has(r.id)) expect(r.attempts, `job ${r.id}, held by the killed process`).toBe(2)
      else expect(r.attempts, `job ${r.id}`).toBe(1)
    }
    for (const [id, pids] of holders) for (const pid of pids) expect(webPids.has(pid), `job ${id} ran on the page process`).toBe(false)
    expect(await db.db.select().from(jobs).where(and(inArray(jobs.id, ids), inArray(jobs.status, ['running', 'queued'])))).toEqual([])

    // Once no job of the fields is left (a background recompute may follow ours): one
    // complete week per field, from one completed job.
    await until(async () => {
      const open = await db.db.select().from(jobs).where(and(inArray(jobs.fieldId, fieldIds), inArray(jobs.status, ['running', 'queued'])))
      return open.length === 0
    }, 'every job of the fields to finish', 300_000, lastOutputs)
    await expectOneCompleteWeek(db.db, fieldIds, queued)
    // The page process still serves while jobs ran elsewhere.
    expect((await fetch(`${web.baseUrl}/api/jobs/summary`, { headers: { Cookie: cookie } })).status).toBe(200)
  })
})
