/**
 * Parts shared by the server benchmarks (scale.bench.ts) and the multi-process job tests: the private
 * MariaDB, the server process, a bench sign-in, read load with autocannon, waiting for
 * an idle queue, and process figures (CPU time, resident memory) read from /proc (Linux proc(5):
 * /proc/<pid>/stat fields 14-15 utime/stime in clock ticks, /proc/<pid>/status VmRSS and
 * VmHWM in kB).
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process'
import { existsSync, readdirSync, readFileSync } from 'node:fs'
import { join, resolve } from 'node:path'
import autocannon from 'autocannon'
import type { Job } from '../../shared/schemas/jobs.ts'
import type { openDatabase } from '../../server/db/index.ts'
import { createRepositories } from '../../server/db/repositories/index.ts'

export const root = resolve(import.meta.dirname, '..', '..')

/** The bench database `name` on the private MariaDB (fresh), or DATABASE_URL when set. */
export function benchDatabaseUrl(name = 'skyfurrow_bench'): string {
  if (process.env.DATABASE_URL) return process.env.DATABASE_URL
  const out = spawnSync('node', ['server/setup/db.mjs', name, '--fresh'], { cwd: root, encoding: 'utf8' })
  if (out.status !== 0) throw new Error(`could not start the private MariaDB:\n${out.stderr}`)
  return out.stdout.trim().split('\n').pop()!
}

/** Pid of the private MariaDB (null when the bench uses DATABASE_URL or it is not found). */
export function mariadbPid(): number | null {
  const file = join(root, '.data', 'mariadb', 'mysqld.pid')
  if (process.env.DATABASE_URL || !existsSync(file)) return null
  const pid = Number(readFileSync(file, 'utf8').trim())
  return Number.isInteger(pid) && pid > 0 ? pid : null
}

export function percentile(sorted: number[], p: number): number {
  if (sorted.length === 0) return NaN
  const i = Math.min(sorted.length - 1, Math.max(0, Math.ceil((p / 100) * sorted.length) - 1))
  return sorted[i]
}

export interface LoadResult {
  requests: number
  errors: number
  non2xx: number
  p50: number
  p95: number
  p99: number
  max: number
  rps: number
}

/**
 * Runs autocannon over `paths` with `connections` until `until` resolves (or for
 * `seconds`), collecting every latency.
 */
export function load(
  baseUrl: string,
  cookie: string,
  paths: string[],
  until: Promise<unknown> | number,
  connections = 50,
): Promise<LoadResult> {
  return new Promise((resolveLoad, reject) => {
    const latencies: number[] = []
    const started = Date.now()
    const instance = autocannon(
      {
        url: baseUrl,
        connections,
        duration: typeof until === 'number' ? until : 3600,
        // What the app's own requests carry (a browser always offers compression).
        headers: { cookie, accept: 'application/json', 'accept-encoding': 'gzip, deflate, br' },
        requests: paths.map((path) => ({ method: 'GET' as const, path })),
      },
      (error, result) => {
        if (error) return reject(error)
        const sorted = latencies.sort((a, b) => a - b)
        const seconds = (Date.now() - started) / 1000
        resolveLoad({
          requests: sorted.length,
          errors: result.errors,
          non2xx: result.non2xx,
          p50: percentile(sorted, 50),
          p95: percentile(sorted, 95),
          p99: percentile(sorted, 99),
          max: sorted[sorted.length - 1] ?? NaN,
          rps: sorted.length / seconds,
        })
      },
    )
    instance.on('response', (_client: unknown, _status: number, _bytes: number, ms: number) => latencies.push(ms))
    if (typeof until !== 'number') void until.finally(() => instance.stop())
  })
}

export interface ServerProcess {
  child: ChildProcess
  baseUrl: string
  output: () => string
  /** Resolves with the exit code (null when killed by a signal) once the process has exited. */
  exited: Promise<number | null>
  stop: () => void
}

/**
 * Starts `tsx server/index.ts` in a process group of its own (so that tsx's node child
 * goes with it) and waits until it is healthy and, with `readyLine`, until it has printed
 * that line (its jobs, recovery and start-up check have started).
 */
export async function startServer(env: Record<string, string>, port: number, options: { readyLine?: string; timeoutMs?: number } = {}): Promise<ServerProcess> {
  let output = ''
  const child: ChildProcess = spawn(join(root, 'node_modules', '.bin', 'tsx'), ['server/index.ts'], {
    cwd: root,
    env: {
      ...process.env,
      NODE_ENV: 'production',
      PORT: String(port),
      HOST: '127.0.0.1',
      FAKE_SMTP_PORT: '0',
      SMTP_URL: '',
      PUBLIC_URL: '',
      LOG_LEVEL: 'warn',
      ...env,
    },
    stdio: ['ignore', 'pipe', 'pipe'],
    detached: true,
  })
  child.stdout?.on('data', (c: Buffer) => (output += c.toString()))
  child.stderr?.on('data', (c: Buffer) => (output += c.toString()))
  const exited = new Promise<number | null>((done) => child.once('exit', (code) => done(code)))
  const signal = (name: NodeJS.Signals) => {
    try {
      process.kill(-child.pid!, name)
    } catch {
      // gone
    }
  }
  const stop = () => signal('SIGTERM')
  // A server left running when this process ends goes with it.
  const leftBehind = () => signal('SIGKILL')
  process.once('exit', leftBehind)
  void exited.then(() => process.off('exit', leftBehind))
  const baseUrl = `http://127.0.0.1:${port}`
  const deadline = Date.now() + (options.timeoutMs ?? 120_000)
  for (;;) {
    if (child.exitCode !== null) throw new Error(`the server exited with ${child.exitCode}:\n${output}`)
    try {
      if ((await fetch(`${baseUrl}/api/health`)).ok && (!options.readyLine || output.includes(options.readyLine))) break
    } catch {
      // not yet
    }
    if (Date.now() > deadline) throw new Error(`the server did not start:\n${output}`)
    await new Promise((r) => setTimeout(r, 200))
  }
  return { child, baseUrl, output: () => output, exited, stop }
}

/** SIGKILL to the server's whole process group; resolves once it has exited. */
export async function killHard(server: ServerProcess): Promise<void> {
  try {
    process.kill(-server.child.pid!, 'SIGKILL')
  } catch {
    // already gone
  }
  await server.exited
}

/** SIGTERM (a clean stop), SIGKILL after 15 s; resolves once the server has exited. */
export async function stopCleanly(server: ServerProcess): Promise<void> {
  server.stop()
  const timer = setTimeout(() => void killHard(server), 15_000)
  await server.exited
  clearTimeout(timer)
}

/** Signs in through the API as a user would; returns the session's Cookie header. */
export async function signInAs(baseUrl: string, email: string, password: string): Promise<string> {
  const res = await fetch(`${baseUrl}/api/auth/sign-in`, {
    method: 'POST',
    headers: { 'Content-Type': 'application/json', Origin: baseUrl },
    body: JSON.stringify({ email, password }),
  })
  if (res.status !== 200) throw new Error(`sign-in of ${email} answered ${res.status}: ${await res.text()}`)
  return res.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ')
}

/** Queues a recompute of each field through the API (POST /api/fields/:id/recompute, 202); returns the jobs. */
export async function queueRecomputes(baseUrl: string, cookie: string, fieldIds: number[]): Promise<Job[]> {
  const queued: Job[] = []
  for (const id of fieldIds) {
    const res = await fetch(`${baseUrl}/api/fields/${id}/recompute`, {
      method: 'POST',
      headers: { 'Content-Type': 'application/json', Origin: baseUrl, Cookie: cookie },
      body: '{}',
    })
    if (res.status !== 202) throw new Error(`the recompute of field ${id} answered ${res.status}: ${await res.text()}`)
    queued.push((await res.json()) as Job)
  }
  return queued
}

/**
 * A session for the bench: the server runs in production mode (as deployed), where the
 * demo accounts may not sign in, so the bench gives itself an office account.
 */
export async function signInCookie(baseUrl: string, handle: ReturnType<typeof openDatabase>, output: string): Promise<string> {
  const { hashPassword } = await import('../../server/auth/password.ts')
  const repos = createRepositories(handle.db)
  const email = 'bench.office@skyfurrow.example'
  const password = 'bench-password-not-secret'
  const existing = await repos.users.findByEmail(email)
  if (existing) await repos.users.update(existing.id, { passwordHash: await hashPassword(password), active: true })
  else await repos.users.insert({ email, name: 'Bench office', role: 'office', passwordHash: await hashPassword(password) })
  try {
    return await signInAs(baseUrl, email, password)
  } catch (error) {
    throw new Error(`bench sign-in failed: ${(error as Error).message}\n${output}`)
  }
}

/** Waits until the job queue is idle (work may still be appearing for `appearMs` after start). */
export async function waitIdle(baseUrl: string, cookie: string, appearMs = 3_000): Promise<void> {
  const appear = Date.now() + appearMs
  for (;;) {
    const s = (await (await fetch(`${baseUrl}/api/jobs/summary`, { headers: { Cookie: cookie } })).json()) as { active: boolean }
    if (!s.active && Date.now() > appear) return
    await new Promise((r) => setTimeout(r, 200))
  }
}

const TICKS_PER_S = 100 // USER_HZ on Linux

/** Pids of the process group `pgid` (the server's tsx wrapper and its node child). */
export function groupPids(pgid: number): number[] {
  const pids: number[] = []
  for (const name of readdirSync('/proc')) {
    if (!/^\d+$/.test(name)) continue
    try {
      const stat = readFileSync(`/proc/${name}/stat`, 'utf8')
      const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ')
      if (Number(fields[2]) === pgid) pids.push(Number(name))
    } catch {
      // gone meanwhile
    }
  }
  return pids
}

/** CPU seconds (user + system, all threads) used so far by the processes `pids`. */
export function cpuSeconds(pids: number[]): number {
  let ticks = 0
  for (const pid of pids) {
    try {
      const stat = readFileSync(`/proc/${pid}/stat`, 'utf8')
      const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ')
      ticks += Number(fields[11]) + Number(fields[12])
    } catch {
      // gone
    }
  }
  return ticks / TICKS_PER_S
}

/** Resident memory (MB) of the processes `pids`, now (VmRSS) and at their peak (VmHWM). */
export function residentMb(pids: number[]): { rss: number; peak: number } {
  let rss = 0
  let peak = 0
  for (const pid of pids) {
    try {
      const status = readFileSync(`/proc/${pid}/status`, 'utf8')
      rss += Number(/VmRSS:\s+(\d+)/.exec(status)?.[1] ?? 0) / 1024
      peak += Number(/VmHWM:\s+(\d+)/.exec(status)?.[1] ?? 0) / 1024
    } catch {
      // gone
    }
  }
  return { rss, peak }
}

/** Samples the resident memory of `pids()` every `everyMs` and keeps the highest sum. */
export function sampleMemory(pids: () => number[], everyMs = 500): { stop: () => number } {
  let max = 0
  const timer = setInterval(() => (max = Math.max(max, residentMb(pids()).rss)), everyMs)
  return {
    stop: () => {
      clearInterval(timer)
      return Math.max(max, residentMb(pids()).rss)
    },
  }
}
