/**
 * `npm run bench:server`: the forecast jobs under load, on the real server process.
 *
 * 1. A fresh database `skyfurrow_bench` on the private MariaDB (or DATABASE_URL when set),
 *    migrated and seeded with the demo scenario; at least 12 fields (invented test plots
 *    are added when the demo has fewer).
 * 2. The server (tsx server/index.ts) with its default job concurrency (cores - 1; set
 *    BENCH_JOB_CONCURRENCY to try another) and the production engine
 *    settings (168 h, 5-minute epochs, 64 sample points, all nominal constellations).
 *    The start-up sweep computes every field once (warm-up; reported too).
 * 3. Measured: a recompute of every field, asked through POST /api/fields/:id/recompute,
 *    until the last job is done; meanwhile autocannon reads GET /api/fields/:id/forecast
 *    over all fields with 50 concurrent connections. Then the same reads with nothing
 *    running, for comparison. Latency percentiles come from every response.
 *
 * Benchmarks are measurements, not tests: nothing here fails on a slow machine. Targets
 * (this 2-core machine): all fields in under 30 s, forecast read p95 under 100 ms.
 */
import { cpus } from 'node:os'
import { defaultJobConcurrency } from '../../server/config.ts'
import { openDatabase } from '../../server/db/index.ts'
import { runMigrations } from '../../server/db/migrate.ts'
import { createRepositories } from '../../server/db/repositories/index.ts'
import { seedDemo } from '../../seed/index.ts'
import { freePort } from '../e2e/support.ts'
import { ensureForecastFields } from '../support/forecastFields.ts'
import {
  benchDatabaseUrl,
  load as loadPaths,
  percentile,
  queueRecomputes,
  signInCookie,
  startServer,
  stopCleanly,
  waitIdle,
  type LoadResult,
} from '../support/serverProcess.ts'

const CONNECTIONS = 50
const MIN_FIELDS = 12
const jobConcurrency = process.env.BENCH_JOB_CONCURRENCY ?? String(defaultJobConcurrency)

/** Reads of the fields' stored weeks at CONNECTIONS clients until `until` (the shared load runner). */
function load(baseUrl: string, cookie: string, fieldIds: number[], until: Promise<unknown> | number): Promise<LoadResult> {
  return loadPaths(baseUrl, cookie, fieldIds.map((id) => `/api/fields/${id}/forecast`), until, CONNECTIONS)
}

async function main(): Promise<void> {
  const url = benchDatabaseUrl()
  const handle = openDatabase(url, { connectionLimit: 4 })
  await runMigrations(handle.db)
  await seedDemo(handle.db)
  const repos = createRepositories(handle.db)
  // The demo tracks GPS and GLONASS only; the benchmark computes with all four nominal
  // constellations (more satellites, more work per epoch).
  for (const system of ['GPS', 'GLONASS', 'Galileo', 'BeiDou']) await repos.orbits.upsertActive({ system, orbitSetId: null, enabled: true })
  let fields = await repos.fields.listAll()
  if (fields.length < MIN_FIELDS) {
    const farms = (await repos.farms.list({ page: 1, pageSize: 200, order: 'asc' })).rows.length
    await ensureForecastFields(handle.db, Math.ceil(MIN_FIELDS / farms) + 1)
    fields = await repos.fields.listAll()
  }
  const fieldIds = fields.map((f) => f.id)

  const t0 = Date.now()
  const server = await startServer({ DATABASE_URL: url, JOB_CONCURRENCY: jobConcurrency, FORECAST_STEP_MIN: '5', FORECAST_SAMPLES: '64' }, await freePort())
  const { baseUrl } = server
  try {
    const startMs = Date.now() - t0

    // Demo sign-ins are refused in production: the bench signs in with an account of its own.
    const cookie = await signInCookie(baseUrl, handle, server.output())

    // Warm-up: the start-up sweep computes every field.
    const warmStart = Date.now()
    await waitIdle(baseUrl, cookie)
    const warmMs = Date.now() - warmStart

    // Measured: recompute every field while reads run at 50 connections.
    const recomputeStart = Date.now()
    const jobIds = (await queueRecomputes(baseUrl, cookie, fieldIds)).map((j) => j.id)
    const done = waitJobs(baseUrl, cookie, jobIds).then(() => Date.now() - recomputeStart)
    const busy = await load(baseUrl, cookie, fieldIds, done)
    const recomputeMs = await done
    const idle = await load(baseUrl, cookie, fieldIds, 10)

    const jobs = (await (await fetch(`${baseUrl}/api/jobs?kind=forecast&limit=500`, { headers: { Cookie: cookie } })).json()) as {
      items: Array<{ id: number; status: string; durationMs: number | null }>
    }
    const mine = jobs.items.filter((j) => jobIds.includes(j.id))
    const perJob = mine.map((j) => j.durationMs ?? 0).sort((a, b) => a - b)

    const ms = (x: number) => `${x.toFixed(1)} ms`
    const rows: Array<[string, string]> = [
      ['machine', `${cpus().length} cores, node ${process.version}`],
      ['fields', `${fieldIds.length}`],
      ['engine settings', '168 h, 5 min epochs, 64 sample points, nominal GPS+GLONASS+Galileo+BeiDou'],
      ['job concurrency (worker threads)', jobConcurrency],
      ['server start to healthy', `${(startMs / 1000).toFixed(1)} s`],
      ['start-up sweep, all fields (warm-up)', `${(warmMs / 1000).toFixed(1)} s`],
      ['recompute of all fields, under read load', `${(recomputeMs / 1000).toFixed(1)} s`],
      ['jobs done', `${mine.filter((j) => j.status === 'done').length} of ${jobIds.length}`],
      ['one field job, median / max', `${(percentile(perJob, 50) / 1000).toFixed(2)} s / ${((perJob.at(-1) ?? 0) / 1000).toFixed(2)} s`],
      [`forecast reads during recompute (${CONNECTIONS} conn.)`, `${busy.requests} requests, ${busy.rps.toFixed(0)}/s, ${busy.errors + busy.non2xx} errors`],
      ['  p50 / p95 / p99 / max', `${ms(busy.p50)} / ${ms(busy.p95)} / ${ms(busy.p99)} / ${ms(busy.max)}`],
      [`forecast reads, nothing running (${CONNECTIONS} conn., 10 s)`, `${idle.requests} requests, ${idle.rps.toFixed(0)}/s, ${idle.errors + idle.non2xx} errors`],
      ['  p50 / p95 / p99 / max', `${ms(idle.p50)} / ${ms(idle.p95)} / ${ms(idle.p99)} / ${ms(idle.max)}`],
      ['targets', 'all fields < 30 s; read p95 < 100 ms during the recompute'],
    ]
    const w = Math.max(...rows.map((r) => r[0].length))
    console.log('\nSkyfurrow server benchmark: forecast jobs and forecast reads')
    console.log(`| ${'measure'.padEnd(w)} | value |`)
    console.log(`| ${'-'.repeat(w)} | ----- |`)
    for (const [k, v] of rows) console.log(`| ${k.padEnd(w)} | ${v} |`)
  } finally {
    await stopCleanly(server)
    await handle.close()
  }
}

/**
 * Waits until every job of `ids` has finished. Polls the cheap summary (what the app's
 * header polls) rather than the job list, so that the waiting adds little to the load.
 */
async function waitJobs(baseUrl: string, cookie: string, ids: number[]): Promise<void> {
  for (;;) {
    const s = (await (await fetch(`${baseUrl}/api/jobs/summary`, { headers: { Cookie: cookie } })).json()) as { active: boolean }
    if (!s.active) {
      const list = (await (await fetch(`${baseUrl}/api/jobs?kind=forecast&limit=500`, { headers: { Cookie: cookie } })).json()) as {
        items: Array<{ id: number; status: string }>
      }
      const mine = list.items.filter((j) => ids.includes(j.id))
      if (mine.length === ids.length && mine.every((j) => j.status === 'done' || j.status === 'failed')) return
    }
    await new Promise((r) => setTimeout(r, 100))
  }
}

await main()
process.exit(0)
