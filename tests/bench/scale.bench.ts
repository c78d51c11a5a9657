/**
 * `npm run bench:scale [-- --fields N] [--farms M] [--job-processes 2]`: the nightly
 * refresh of many fields, on real server processes against one MariaDB.
 *
 * 1. A fresh database `skyfurrow_scale` on the private MariaDB of this worktree (or
 *    DATABASE_URL), migrated and seeded with the demo, then the invented scale scenario
 *    (scaleScenario.ts): N fields (default 1,000, the demo's count towards them) over M
 *    farms (default 40) spread over about 500 x 330 km, each field with a tree line, a
 *    machine shed by every fifth; all four nominal constellations; the production engine
 *    settings (168 h, 5-minute epochs, 64 sample points).
 * 2. One server process (jobs and pages). Its start-up sweep computes every field, with no
 *    read load: the first refresh (wall and CPU time, per-field marginal cost).
 * 3. A recompute of every field (what a nightly refresh does when the orbit data changed),
 *    while autocannon reads GET /api/fields/:id/forecast (25 connections, over all fields)
 *    and the Outlook's farm day view GET /api/farms/:id/forecast?from&to (25 connections,
 *    over all farms): 50 concurrent clients. Then the same reads with nothing running.
 *    `--first-refresh-only` stops after the first refresh (and 10 s of reads with nothing
 *    running): the growth in the number of fields in less time.
 * 4. With `--job-processes 2`: one process with JOBS_ENABLED=false serves the pages and one,
 *    then two processes run jobs; the same recompute under the same reads each time; the
 *    speed-up of two job processes over one (and over the single process of step 3).
 *
 * Throughout: the peak resident memory of the server processes and of MariaDB (sampled
 * every 0.5 s from /proc), and at the end the rows and bytes of the largest tables
 * (information_schema after ANALYZE TABLE). CPU time is read from /proc (user + system,
 * all threads): on a shared machine it is steadier than wall time.
 *
 * Benchmarks are measurements, not tests: nothing here fails on a slow machine. Targets
 * (issue #15, 2-core machine): 1,000 fields in at most 3 minutes; read p95 under 50 ms
 * during the refresh; memory flat in the number of fields.
 */
import { cpus, loadavg } from 'node:os'
import { parseArgs } from 'node:util'
import { DateTime } from 'luxon'
import { defaultJobConcurrency } from '../../server/config.ts'
import { openDatabase, type DatabaseHandle } from '../../server/db/index.ts'
import { runMigrations } from '../../server/db/migrate.ts'
import { createRepositories } from '../../server/db/repositories/index.ts'
import { seedDemo } from '../../seed/index.ts'
import { freePort } from '../e2e/support.ts'
import { buildScaleScenario } from './scaleScenario.ts'
import {
  benchDatabaseUrl,
  cpuSeconds,
  groupPids,
  load,
  mariadbPid,
  percentile,
  sampleMemory,
  signInCookie,
  startServer,
  waitIdle,
  type LoadResult,
  type ServerProcess,
} from '../support/serverProcess.ts'

const { values: args } = parseArgs({
  options: {
    fields: { type: 'string', default: '1000' },
    farms: { type: 'string', default: '40' },
    'job-processes': { type: 'string', default: '1' },
    /** Only the first refresh (the start-up sweep, no reads): the growth in fields, quickly. */
    'first-refresh-only': { type: 'boolean', default: false },
  },
})
const FIELDS = Number(args.fields)
const FARMS = Number(args.farms)
const JOB_PROCESSES = Number(args['job-processes'])
const FIRST_ONLY = args['first-refresh-only'] === true
if (!(FIELDS > 0 && FARMS > 0 && JOB_PROCESSES >= 1)) throw new Error('--fields, --farms and --job-processes must be positive numbers.')
const jobConcurrency = process.env.BENCH_JOB_CONCURRENCY ?? String(defaultJobConcurrency)
const engineEnv = { JOB_CONCURRENCY: jobConcurrency, FORECAST_STEP_MIN: '5', FORECAST_SAMPLES: '64' }

interface JobTimes {
  startedMs: number
  finishedMs: number
  status: string
}

async function jobTimes(handle: DatabaseHandle, ids: number[] | null, sinceId: number): Promise<JobTimes[]> {
  const [rows] = (await handle.pool.query(
    ids
      ? 'SELECT status, started_at, finished_at FROM jobs WHERE id IN (?) ORDER BY finished_at'
      : "SELECT status, started_at, finished_at FROM jobs WHERE kind = 'forecast' AND id > ? ORDER BY finished_at",
    [ids ?? sinceId],
  )) as unknown as [Array<{ status: string; started_at: Date | null; finished_at: Date | null }>]
  return rows.map((r) => ({ status: r.status, startedMs: r.started_at?.getTime() ?? NaN, finishedMs: r.finished_at?.getTime() ?? NaN }))
}

/**
 * Steady cost of one more field: the time between the 10th and the 90th percentile of
 * job completions over the fields completed in between (leaves out start and tail).
 */
function marginalMs(times: JobTimes[]): number {
  const done = times.map((t) => t.finishedMs).filter(Number.isFinite).sort((a, b) => a - b)
  if (done.length < 10) return NaN
  const a = Math.floor(done.length * 0.1)
  const b = Math.floor(done.length * 0.9)
  return (done[b] - done[a]) / (b - a)
}

interface Refresh {
  wallMs: number
  serverCpuS: number
  dbCpuS: number
  marginalMs: number
  jobMedianMs: number
  done: number
  failed: number
  count: number
}

function summarise(times: JobTimes[], wallMs: number, serverCpuS: number, dbCpuS: number): Refresh {
  const durations = times.map((t) => t.finishedMs - t.startedMs).filter(Number.isFinite).sort((a, b) => a - b)
  return {
    wallMs,
    serverCpuS,
    dbCpuS,
    marginalMs: marginalMs(times),
    jobMedianMs: percentile(durations, 50),
    done: times.filter((t) => t.status === 'done').length,
    failed: times.filter((t) => t.status === 'failed').length,
    count: times.length,
  }
}

/** The start-up sweep of `server`: every field computed once, no reads running. */
async function sweepRefresh(handle: DatabaseHandle, server: ServerProcess, cookie: string, startedMs: number, cpu0: { server: number; db: number }, dbPid: number | null): Promise<Refresh> {
  await waitIdle(server.baseUrl, cookie, 5_000)
  const times = await jobTimes(handle, null, 0)
  // From the first job's start to the last one's end (the server's boot is not counted).
  const first = Math.min(...times.map((t) => t.startedMs).filter(Number.isFinite))
  const wallMs = Number.isFinite(first) ? Math.max(...times.map((t) => t.finishedMs).filter(Number.isFinite)) - first : Date.now() - startedMs
  return summarise(times, wallMs, cpuSeconds(groupPids(server.child.pid!)) - cpu0.server, (dbPid ? cpuSeconds([dbPid]) : NaN) - cpu0.db)
}

/** Recompute of every field through the API while the reads run; returns the refresh and the read figures. */
async function recomputeUnderReads(
  handle: DatabaseHandle,
  web: ServerProcess,
  jobServers: ServerProcess[],
  cookie: string,
  fieldIds: number[],
  readPaths: { field: string[]; day: string[] },
  dbPid: number | null,
): Promise<{ refresh: Refresh; field: LoadResult; day: LoadResult }> {
  const pids = () => [...new Set([web, ...jobServers].flatMap((s) => groupPids(s.child.pid!)))]
  const cpuServer0 = cpuSeconds(pids())
  const cpuDb0 = dbPid ? cpuSeconds([dbPid]) : NaN
  const started = Date.now()
  let finish: (ms: number) => void = () => {}
  const finished = new Promise<number>((r) => (finish = r))
  const fieldLoad = load(web.baseUrl, cookie, readPaths.field, finished, 25)
  const dayLoad = load(web.baseUrl, cookie, readPaths.day, finished, 25)
  const jobIds: number[] = []
  for (const id of fieldIds) {
    const res = await fetch(`${web.baseUrl}/api/fields/${id}/recompute`, {
      method: 'POST',
      headers: { Origin: web.baseUrl, Cookie: cookie, 'Content-Type': 'application/json' },
      body: '{}',
    })
    if (res.status !== 202) throw new Error(`recompute of field ${id}: HTTP ${res.status} ${await res.text()}`)
    jobIds.push(((await res.json()) as { id: number }).id)
  }
  await waitJobsInDb(handle, jobIds)
  const wallMs = Date.now() - started
  finish(wallMs)
  const [field, day] = await Promise.all([fieldLoad, dayLoad])
  const refresh = summarise(await jobTimes(handle, jobIds, 0), wallMs, cpuSeconds(pids()) - cpuServer0, (dbPid ? cpuSeconds([dbPid]) : NaN) - cpuDb0)
  return { refresh, field, day }
}

/** Waits until every job of `ids` is done or failed (one cheap query a second). */
async function waitJobsInDb(handle: DatabaseHandle, ids: number[]): Promise<void> {
  for (;;) {
    const [rows] = (await handle.pool.query("SELECT COUNT(*) AS n FROM jobs WHERE id IN (?) AND status NOT IN ('done', 'failed')", [ids])) as unknown as [
      Array<{ n: number }>,
    ]
    if (Number(rows[0].n) === 0) return
    await new Promise((r) => setTimeout(r, 1_000))
  }
}

async function tableSizes(handle: DatabaseHandle): Promise<Array<{ name: string; rows: number; bytes: number }>> {
  const names = ['forecast_hours', 'field_forecasts', 'jobs', 'fields', 'obstructions']
  await handle.pool.query(`ANALYZE TABLE ${names.join(', ')}`)
  const [rows] = (await handle.pool.query(
    'SELECT table_name AS name, table_rows AS approx, data_length + index_length AS bytes FROM information_schema.tables WHERE table_schema = DATABASE() AND table_name IN (?)',
    [names],
  )) as unknown as [Array<{ name: string; approx: number; bytes: number }>]
  const out: Array<{ name: string; rows: number; bytes: number }> = []
  for (const r of rows) {
    const [count] = (await handle.pool.query(`SELECT COUNT(*) AS n FROM \`${r.name}\``)) as unknown as [Array<{ n: number }>]
    out.push({ name: r.name, rows: Number(count[0].n), bytes: Number(r.bytes) })
  }
  return out.sort((a, b) => b.bytes - a.bytes)
}

async function main(): Promise<void> {
  const load0 = loadavg()
  const benchStarted = new Date()
  const url = benchDatabaseUrl('skyfurrow_scale')
  const handle = openDatabase(url, { connectionLimit: 4 })
  await runMigrations(handle.db)
  await seedDemo(handle.db)
  const repos = createRepositories(handle.db)
  for (const system of ['GPS', 'GLONASS', 'Galileo', 'BeiDou']) await repos.orbits.upsertActive({ system, orbitSetId: null, enabled: true })
  const built = Date.now()
  const scenario = await buildScaleScenario(handle.db, FIELDS, FARMS)
  const buildMs = Date.now() - built
  const fields = await repos.fields.listAll()
  const fieldIds = fields.map((f) => f.id)
  const farmIds = [...new Set(fields.map((f) => f.farmId))]
  const dbPid = mariadbPid()

  // The Outlook's day view: the farm's local day after today (well inside the stored week).
  const farmZones = new Map((await repos.farms.list({ page: 1, pageSize: 500, order: 'asc', sort: 'name' })).rows.map((f) => [f.id, f.timeZone]))
  const readPaths = {
    field: fieldIds.map((id) => `/api/fields/${id}/forecast`),
    day: farmIds.map((id) => {
      const day = DateTime.now().setZone(farmZones.get(id) ?? 'UTC').startOf('day').plus({ days: 1 })
      return `/api/farms/${id}/forecast?from=${encodeURIComponent(day.toUTC().toISO()!)}&to=${encodeURIComponent(day.plus({ days: 1 }).toUTC().toISO()!)}`
    }),
  }

  const servers: ServerProcess[] = []
  const allPids = () => [...new Set(servers.filter((s) => s.child.exitCode === null).flatMap((s) => groupPids(s.child.pid!)))]
  const serverMemory = sampleMemory(allPids)
  const dbMemory = sampleMemory(() => (dbPid ? [dbPid] : []))
  try {
    // Phase 1: one process, jobs and pages.
    const cpu0 = { server: 0, db: dbPid ? cpuSeconds([dbPid]) : NaN }
    const t0 = Date.now()
    const one = await startServer({ DATABASE_URL: url, ...engineEnv }, await freePort())
    servers.push(one)
    const cookie = await signInCookie(one.baseUrl, handle, one.output())
    const sweep = await sweepRefresh(handle, one, cookie, t0, cpu0, dbPid)
    const single = FIRST_ONLY ? null : await recomputeUnderReads(handle, one, [one], cookie, fieldIds, readPaths, dbPid)
    const idleField = load(one.baseUrl, cookie, readPaths.field, 10, 25)
    const idleDay = load(one.baseUrl, cookie, readPaths.day, 10, 25)
    const idle = { field: await idleField, day: await idleDay }
    const peakOne = { server: serverMemory.stop(), db: dbMemory.stop() }
    const sizes = await tableSizes(handle)

    // Phase 2: pages on one process, jobs on one other process (the fair baseline), then
    // on JOB_PROCESSES others.
    let multiBase: Awaited<ReturnType<typeof recomputeUnderReads>> | null = null
    let multi: Awaited<ReturnType<typeof recomputeUnderReads>> | null = null
    let peakMulti: { server: number; db: number } | null = null
    if (JOB_PROCESSES > 1 && !FIRST_ONLY) {
      one.stop()
      await new Promise((r) => setTimeout(r, 2_000))
      servers.length = 0
      const serverMemory2 = sampleMemory(allPids)
      const dbMemory2 = sampleMemory(() => (dbPid ? [dbPid] : []))
      const web = await startServer({ DATABASE_URL: url, ...engineEnv, JOBS_ENABLED: 'false' }, await freePort())
      servers.push(web)
      const workers: ServerProcess[] = []
      const addWorker = async () => {
        workers.push(await startServer({ DATABASE_URL: url, ...engineEnv }, await freePort()))
        servers.push(workers.at(-1)!)
      }
      await addWorker()
      const cookie2 = await signInCookie(web.baseUrl, handle, web.output())
      await waitIdle(web.baseUrl, cookie2, 3_000)
      multiBase = await recomputeUnderReads(handle, web, workers, cookie2, fieldIds, readPaths, dbPid)
      while (workers.length < JOB_PROCESSES) await addWorker()
      await waitIdle(web.baseUrl, cookie2, 3_000)
      multi = await recomputeUnderReads(handle, web, workers, cookie2, fieldIds, readPaths, dbPid)
      peakMulti = { server: serverMemory2.stop(), db: dbMemory2.stop() }
    }

    const s = (ms: number) => `${(ms / 1000).toFixed(1)} s`
    const ms = (x: number) => `${x.toFixed(1)} ms`
    const reads = (r: LoadResult) =>
      `${r.requests} req, ${r.rps.toFixed(0)}/s, ${r.errors + r.non2xx} errors; p50/p95/p99 ${ms(r.p50)} / ${ms(r.p95)} / ${ms(r.p99)}`
    const refreshRows = (label: string, r: Refresh): Array<[string, string]> => [
      [`${label}: wall`, `${s(r.wallMs)} (${r.done} done, ${r.failed} failed of ${r.count})`],
      [`${label}: CPU, server processes / MariaDB`, `${r.serverCpuS.toFixed(1)} s / ${r.dbCpuS.toFixed(1)} s`],
      [`${label}: per field, marginal wall / CPU (server + db)`, `${ms(r.marginalMs)} / ${ms((1000 * (r.serverCpuS + r.dbCpuS)) / Math.max(1, r.count))}`],
      [`${label}: one field job, median`, ms(r.jobMedianMs)],
    ]
    const forecastBytes = sizes.find((t) => t.name === 'forecast_hours')
    const rows: Array<[string, string]> = [
      ['taken', `${benchStarted.toISOString()}; load average at start ${load0.map((l) => l.toFixed(1)).join(' / ')}, at end ${loadavg().map((l) => l.toFixed(1)).join(' / ')}`],
      ['machine', `${cpus().length} cores, node ${process.version}`],
      ['scenario', `${scenario.fields} fields over ${scenario.farms} farms (built in ${s(buildMs)})`],
      ['engine settings', '168 h, 5 min epochs, 64 sample points, nominal GPS+GLONASS+Galileo+BeiDou'],
      ['job concurrency per job process (engine threads)', jobConcurrency],
      ...refreshRows('first refresh, start-up sweep, no reads', sweep),
      ...(single
        ? [
            ...refreshRows('recompute of all fields under reads, 1 process', single.refresh),
            ['  field forecast reads (25 conn.)', reads(single.field)] as [string, string],
            ['  farm day view reads (25 conn.)', reads(single.day)] as [string, string],
          ]
        : []),
      ['reads, nothing running: field forecast', reads(idle.field)],
      ['reads, nothing running: farm day view', reads(idle.day)],
      ['peak RSS, server process(es) / MariaDB', `${peakOne.server.toFixed(0)} MB / ${peakOne.db.toFixed(0)} MB`],
      ...sizes.map((t): [string, string] => [`stored: ${t.name}`, `${t.rows} rows, ${(t.bytes / 1_048_576).toFixed(1)} MB`]),
      ['stored per field (forecast_hours)', forecastBytes ? `${(forecastBytes.bytes / scenario.fields / 1024).toFixed(1)} kB` : '-'],
    ]
    if (single && multiBase && multi && peakMulti) {
      rows.push(
        ...refreshRows('recompute under reads, pages + 1 job process', multiBase.refresh),
        ['  field forecast reads (25 conn.)', reads(multiBase.field)],
        ['  farm day view reads (25 conn.)', reads(multiBase.day)],
        ...refreshRows(`recompute under reads, pages + ${JOB_PROCESSES} job processes`, multi.refresh),
        ['  field forecast reads (25 conn.)', reads(multi.field)],
        ['  farm day view reads (25 conn.)', reads(multi.day)],
        ['  peak RSS, all server processes / MariaDB', `${peakMulti.server.toFixed(0)} MB / ${peakMulti.db.toFixed(0)} MB`],
        [`speed-up, ${JOB_PROCESSES} job processes over 1 (pages apart in both)`, `${(multiBase.refresh.wallMs / multi.refresh.wallMs).toFixed(2)}x wall`],
        [`speed-up, pages + ${JOB_PROCESSES} job processes over one process doing both`, `${(single.refresh.wallMs / multi.refresh.wallMs).toFixed(2)}x wall`],
      )
    }
    rows.push(['targets (1,000 fields)', 'refresh <= 3 min; read p95 < 50 ms during the refresh; memory flat in the number of fields'])
    const w = Math.max(...rows.map((r) => r[0].length))
    console.log('\nSkyfurrow scale benchmark: refresh of all fields, reads during it')
    console.log(`| ${'measure'.padEnd(w)} | value |`)
    console.log(`| ${'-'.repeat(w)} | ----- |`)
    for (const [k, v] of rows) console.log(`| ${k.padEnd(w)} | ${v} |`)
  } finally {
    for (const server of servers) server.stop()
    await new Promise((r) => setTimeout(r, 500))
    await handle.close()
  }
}

await main()
process.exit(0)
