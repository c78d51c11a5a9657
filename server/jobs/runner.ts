// The job runner of one server process: claims job rows from MariaDB (FOR UPDATE SKIP
// LOCKED, so several processes share one queue), runs them through p-queue with the
// configured concurrency, writes heartbeats and progress, retries failures with
// exponential backoff, and on start-up requeues jobs that a dead process left running.
import { randomUUID } from 'node:crypto'
import { hostname } from 'node:os'
import PQueue from 'p-queue'
import type { Config } from '../config.ts'
import type { Store } from '../db/repositories/index.ts'
import type { JobRow } from '../db/schema-planning.ts'
import type { Logger } from '../logger.ts'
import { onEnqueued } from '../queue/enqueue.ts'
import type { EnginePool } from './enginePool.ts'

/** What a handler gets for one run of a job. */
export interface JobContext {
  job: JobRow
  payload: Record<string, unknown>
  store: Store
  config: Config
  logger: Logger
  pool: EnginePool
  /** Reports progress 0..1 (written with the next heartbeat). */
  progress(fraction: number): void
  /** Aborted when the job was taken from this process (or the process stops). */
  signal: AbortSignal
}

export interface JobOutcome {
  /** One sentence for the Jobs page. */
  summary: string
  inputsVersion?: string
  data?: Record<string, unknown>
}

export type JobHandler = (ctx: JobContext) => Promise<JobOutcome>

export interface RunnerOptions {
  store: Store
  config: Config
  logger: Logger
  pool: EnginePool
  handlers: Record<string, JobHandler>
  /** How often to look for due jobs without a wake-up (retries, other processes' jobs). */
  pollMs?: number
  heartbeatMs?: number
  /** A running job whose heartbeat is older than this is taken to be abandoned. */
  staleAfterMs?: number
  /** First retry delay; doubles with every attempt, at most maxRetryDelayMs. */
  retryBaseMs?: number
  maxRetryDelayMs?: number
}

/** Runner ids alive in this process (a second runner in the same process is not "gone"). */
const liveIds = new Set<string>()

/** Runner ids look like host:pid:token. */
const isRunnerId = (lockedBy: string | null) => lockedBy !== null && lockedBy.split(':').length >= 3

/** Whether the process that holds `lockedBy` is certainly gone (same host only; else heartbeats decide). */
export function lockHolderGone(lockedBy: string | null, pidAlive: (pid: number) => boolean = isPidAlive): boolean {
  if (!lockedBy) return true
  if (!isRunnerId(lockedBy)) return false
  const parts = lockedBy.split(':')
  if (parts.length < 3) return false
  const [host, pidText] = parts
  const pid = Number(pidText)
  if (host !== hostname() || !Number.isInteger(pid)) return false
  if (pid === process.pid) return !liveIds.has(lockedBy)
  return !pidAlive(pid)
}

function isPidAlive(pid: number): boolean {
  try {
    process.kill(pid, 0)
    return true
  } catch (error) {
    return (error as NodeJS.ErrnoException).code === 'EPERM'
  }
}

/**
 * A short message for the Jobs page: database errors wrapped by Drizzle carry the whole
 * statement, so the innermost cause's message (with its code) is used.
 */
export function errorText(error: unknown): string {
  let e: unknown = error
  let text = error instanceof Error ? error.message : String(error)
  for (let depth = 0; e && depth < 5; depth++) {
    const cause = (e as { cause?: unknown }).cause
    if (!cause) break
    e = cause
    const code = (cause as { code?: string }).code
    if (cause instanceof Error) text = code ? `${cause.message} (${code})` : cause.message
  }
  return text.length > 1000 ? `${text.slice(0, 1000)}…` : text
}

/** Delay before retry number `attempts` (1-based): base * 2^(attempts-1), capped. */
export function retryDelayMs(attempts: number, baseMs: number, maxMs: number): number {
  return Math.min(maxMs, baseMs * 2 ** Math.max(0, attempts - 1))
}

export class JobRunner {
  readonly id = `${hostname()}:${process.pid}:${randomUUID().slice(0, 8)}`
  private readonly queue: PQueue
  private readonly store: Store
  private readonly opts: Required<Omit<RunnerOptions, 'store' | 'config' | 'logger' | 'pool' | 'handlers'>>
  private readonly controllers = new Map<number, AbortController>()
  private pumping = false
  private pumpAgain = false
  private stopped = true
  private pollTimer: NodeJS.Timeout | undefined
  private recoverTimer: NodeJS.Timeout | undefined
  private unwake: (() => void) | undefined

  constructor(private readonly deps: RunnerOptions) {
    this.store = deps.store
    this.queue = new PQueue({ concurrency: deps.config.jobConcurrency })
    this.opts = {
      pollMs: deps.pollMs ?? 2_000,
      heartbeatMs: deps.heartbeatMs ?? 1_000,
      staleAfterMs: deps.staleAfterMs ?? 30_000,
      retryBaseMs: deps.retryBaseMs ?? 5_000,
      maxRetryDelayMs: deps.maxRetryDelayMs ?? 10 * 60_000,
    }
  }

  /** Requeues what dead processes left running, then starts claiming. */
  async start(): Promise<void> {
    if (!this.stopped) return
    this.stopped = false
    liveIds.add(this.id)
    await this.recoverAbandoned()
    this.unwake = onEnqueued(() => this.wake())
    this.pollTimer = setInterval(() => this.wake(), this.opts.pollMs)
    this.pollTimer.unref()
    this.recoverTimer = setInterval(() => {
      void this.recoverAbandoned().catch((error) => this.deps.logger.warn('job recovery check failed', error))
    }, Math.max(5_000, this.opts.staleAfterMs / 2))
    this.recoverTimer.unref()
    this.wake()
  }

  /**
   * Stops claiming, aborts the jobs running here and puts them back in the queue (the
   * attempt does not count), and waits for the handlers to return.
   */
  async stop(): Promise<void> {
    if (this.stopped) return
    this.stopped = true
    clearInterval(this.pollTimer)
    clearInterval(this.recoverTimer)
    this.unwake?.()
    // A claim in flight finishes first, so the release below covers the job it took.
    while (this.pumping) await new Promise((r) => setTimeout(r, 5))
    for (const c of this.controllers.values()) c.abort(new Error('The server is shutting down.'))
    this.queue.clear()
    await this.store.repos.jobs.release(this.id).catch((error) => this.deps.logger.warn('could not release running jobs', error))
    await Promise.race([this.queue.onIdle(), new Promise((r) => setTimeout(r, 5_000))])
    liveIds.delete(this.id)
  }

  /** Jobs running in this process. */
  get running(): number {
    return this.queue.pending
  }

  /** Resolves when this process has nothing running and nothing due could be claimed. */
  async idle(): Promise<void> {
    for (;;) {
      await this.queue.onIdle()
      while (this.pumping) await new Promise((r) => setTimeout(r, 20))
      if (this.queue.pending === 0 && this.queue.size === 0) {
        // One more claim attempt: if it finds nothing, we are idle.
        await this.pump()
        if (this.queue.pending === 0 && this.queue.size === 0) return
      }
    }
  }

  /** Looks for work now (after an enqueue, a finished job or a poll tick). */
  wake(): void {
    if (this.stopped) return
    void this.pump().catch((error) => this.deps.logger.warn('claiming jobs failed', error))
  }

  private async pump(): Promise<void> {
    if (this.pumping) {
      this.pumpAgain = true
      return
    }
    this.pumping = true
    try {
      do {
        this.pumpAgain = false
        while (!this.stopped && this.queue.pending + this.queue.size < this.deps.config.jobConcurrency) {
          const job = await this.store.transaction((repos) => repos.jobs.claimNext(this.id, Object.keys(this.deps.handlers)))
          if (!job) break
          // Look for the next job once this one has left the queue (not before: until then it
          // still counts against the concurrency, and the claim would wait for the poll tick).
          void this.queue.add(() => this.runJob(job)).finally(() => this.wake())
        }
      } while (this.pumpAgain && !this.stopped)
    } finally {
      this.pumping = false
    }
  }

  /** Requeues running jobs whose process is gone (same host) or whose heartbeat is stale. */
  async recoverAbandoned(): Promise<{ requeued: number; failed: number }> {
    const now = Date.now()
    const running = await this.store.repos.jobs.running()
    const abandoned = running.filter((j) => {
      if (j.lockedBy === this.id) return false
      if (j.lockedBy && liveIds.has(j.lockedBy)) return false
      if (lockHolderGone(j.lockedBy)) return true
      // Rows written by other code (e.g. a feed run started from the Orbits page) carry no
      // runner id and no heartbeat: they get a much longer grace period.
      const limit = isRunnerId(j.lockedBy) ? this.opts.staleAfterMs : 20 * this.opts.staleAfterMs
      return !j.heartbeatAt || now - j.heartbeatAt.getTime() > limit
    })
    if (abandoned.length === 0) return { requeued: 0, failed: 0 }
    const result = await this.store.repos.jobs.requeueAbandoned(abandoned)
    if (result.requeued || result.failed) {
      this.deps.logger.info(
        `jobs left running by a stopped process: ${result.requeued} queued again${result.failed ? `, ${result.failed} failed (attempts used up)` : ''}`,
      )
      this.wake()
    }
    return result
  }

  private async runJob(job: JobRow): Promise<void> {
    const { logger } = this.deps
    const controller = new AbortController()
    this.controllers.set(job.id, controller)
    let progress = 0
    let written = -1
    const beat = async () => {
      const value = progress
      const ours = await this.store.repos.jobs.heartbeat(job.id, this.id, value !== written ? value : undefined)
      written = value
      if (!ours && !controller.signal.aborted) controller.abort(new Error('The job was taken over by another process.'))
    }
    const timer = setInterval(() => void beat().catch((error) => logger.warn(`heartbeat of job ${job.id} failed`, error)), this.opts.heartbeatMs)
    timer.unref()
    const started = Date.now()
    try {
      const handler = this.deps.handlers[job.kind]
      if (!handler) throw new Error(`No handler for jobs of kind "${job.kind}".`)
      let payload: Record<string, unknown> = {}
      try {
        payload = JSON.parse(job.payloadJson) as Record<string, unknown>
      } catch {
        throw new Error('The job payload is not valid JSON.')
      }
      const outcome = await handler({
        job,
        payload,
        store: this.store,
        config: this.deps.config,
        logger,
        pool: this.deps.pool,
        progress: (f) => {
          progress = Math.max(progress, Math.max(0, Math.min(1, f)))
        },
        signal: controller.signal,
      })
      if (controller.signal.aborted) return
      const done = await this.store.repos.jobs.complete(job.id, this.id, {
        resultJson: JSON.stringify({ summary: outcome.summary, ms: Date.now() - started, ...(outcome.data ?? {}) }),
        inputsVersion: outcome.inputsVersion,
      })
      if (!done) logger.warn(`job ${job.id} finished but was no longer ours`)
    } catch (error) {
      if (controller.signal.aborted) return // released or taken over: not a failure of the job
      const message = errorText(error)
      const retry = job.attempts < job.maxAttempts
      const retryAt = retry ? new Date(Date.now() + retryDelayMs(job.attempts, this.opts.retryBaseMs, this.opts.maxRetryDelayMs)) : null
      logger.warn(`job ${job.id} (${job.kind}) failed on attempt ${job.attempts} of ${job.maxAttempts}: ${message}`)
      await this.store.repos.jobs
        .fail(job.id, this.id, message.slice(0, 4000), retryAt)
        .catch((e) => logger.error(`could not record the failure of job ${job.id}`, e))
    } finally {
      clearInterval(timer)
      this.controllers.delete(job.id)
    }
  }
}
