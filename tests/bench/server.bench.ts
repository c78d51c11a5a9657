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
import { spawn, spawnSync, type ChildProcess } from 'node:child_process'
import { cpus } from 'node:os'
import { join, resolve } from 'node:path'
import { defaultJobConcurrency } from '../../server/config.ts'
import { openDatabase } from '../../server/db/index.ts'
import { runMigrations } from '../../server/db/migrate.ts'
import { createRepositories } from '../../server/db/repositories/index.ts'
import { seedDemo } from '../../seed/index.ts'
import { freePort } from '../e2e/support.ts'
import { ensureForecastFields } from '../support/forecastFields.ts'
import { load as loadPaths, percentile, type LoadResult } from '../support/serverProcess.ts'

const root = resolve(import.meta.dirname, '..', '..')
const CONNECTIONS = 50
const MIN_FIELDS = 12
const jobConcurrency = process.env.BENCH_JOB_CONCURRENCY ?? String(defaultJobConcurrency)

function databaseUrl(): string {
  if (process.env.DATABASE_URL) return process.env.DATABASE_URL
  const out = spawnSync('node', ['server/setup/db.mjs', 'skyfurrow_bench', '--fresh'], { cwd: root, encoding: 'utf8' })
  if (out.status !== 0) throw new Error(`could not start the private MariaDB:\n${out.stderr}`)
  return out.stdout.trim().split('\n').pop()!
}

/** Reads of the fields' stored weeks at CONNECTIONS clients until `until` (the shared load runner). */
function load(baseUrl: string, cookie: string, fieldIds: number[], until: Promise<unknown> | number): Promise<LoadResult> {
  return loadPaths(baseUrl, cookie, fieldIds.map((id) => `/api/fields/${id}/forecast`), until, CONNECTIONS)
}

async function main(): Promise<void> {
  const url = databaseUrl()
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

  const port = await freePort()
  const baseUrl = `http://127.0.0.1:${port}`
  let output = ''
  const t0 = Date.now()
  const child: ChildProcess = spawn(join(root, 'node_modules', '.bin', 'tsx'), ['server/index.ts'], {
    cwd: root,
    env: {
      ...process.env,
      DATABASE_URL: url,
      NODE_ENV: 'production',
      PORT: String(port),
      HOST: '127.0.0.1',
      FAKE_SMTP_PORT: '0',
      SMTP_URL: '',
      PUBLIC_URL: '',
      LOG_LEVEL: 'warn',
      JOB_CONCURRENCY: jobConcurrency,
      FORECAST_STEP_MIN: '5',
      FORECAST_SAMPLES: '64',
    },
    stdio: ['ignore', 'pipe', 'pipe'],
    detached: true,
  })
  child.stdout?.on('data', (c: Buffer) => (output += c.toString()))
  child.stderr?.on('data', (c: Buffer) => (output += c.toString()))
  const stop = () => {
    try {
      process.kill(-child.pid!, 'SIGTERM')
    } catch {
      // gone
    }
  }
  process.on('exit', stop)
  try {
    for (;;) {
      if (child.exitCode !== null) throw new Error(`the server exited:\n${output}`)
      try {
        if ((await fetch(`${baseUrl}/api/health`)).ok) break
      } catch {
        // not yet
      }
      await new Promise((r) => setTimeout(r, 200))
    }
    const startMs = Date.now() - t0

    // Sign in (the demo office account; demo sign-ins are refused in production, so the
    // bench signs in with an account of its own... see below).
    const cookie = await signInCookie(baseUrl, handle, output)

    // Warm-up: the start-up sweep computes every field.
    const warmStart = Date.now()
    await waitIdle(baseUrl, cookie)
    const warmMs = Date.now() - warmStart

    // Measured: recompute every field while reads run at 50 connections.
    const jobIds: number[] = []
    const recomputeStart = Date.now()
    for (const id of fieldIds) {
      const res = await fetch(`${baseUrl}/api/fields/${id}/recompute`, {
        method: 'POST',
        headers: { Origin: baseUrl, Cookie: cookie, 'Content-Type': 'application/json' },
        body: '{}',
      })
      if (res.status !== 202) throw new Error(`recompute of field ${id}: HTTP ${res.status} ${await res.text()}`)
      jobIds.push(((await res.json()) as { id: number }).id)
    }
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
    stop()
    await new Promise((r) => setTimeout(r, 500))
    await handle.close()
  }
}

/**
 * A session for the bench: the server runs in production mode (as deployed), where the
 * demo accounts may not sign in, so the bench gives itself an office account.
 */
async function signInCookie(baseUrl: string, handle: ReturnType<typeof openDatabase>, output: string): Promise<string> {
  const { hashPassword } = await import('../../server/auth/password.ts')
  const repos = createRepositories(handle.db)
  const email = 'bench.office@skyfurrow.example'
  const password = 'bench-password-not-secret'
  const existing = await repos.users.findByEmail(email)
  if (existing) await repos.users.update(existing.id, { passwordHash: await hashPassword(password), active: true })
  else await repos.users.insert({ email, name: 'Bench office', role: 'office', passwordHash: await hashPassword(password) })
  const res = await fetch(`${baseUrl}/api/auth/sign-in`, {
    method: 'POST',
    headers: { 'Content-Type': 'application/json', Origin: baseUrl },
    body: JSON.stringify({ email, password }),
  })
  if (res.status !== 200) throw new Error(`bench sign-in failed: ${res.status} ${await res.text()}\n${output}`)
  return res.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ')
}

async function waitIdle(baseUrl: string, cookie: string): Promise<void> {
  // The sweep may still be enqueueing just after start: wait for work to appear or 3 s.
  const appear = Date.now() + 3_000
  for (;;) {
    const s = (await (await fetch(`${baseUrl}/api/jobs/summary`, { headers: { Cookie: cookie } })).json()) as { active: boolean }
    if (!s.active && Date.now() > appear) return
    await new Promise((r) => setTimeout(r, 200))
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
