// Queries on background job rows. Claiming uses SELECT ... FOR UPDATE SKIP LOCKED inside a
// transaction, so several processes on one database never take the same job; enqueueing
// supersedes (or keeps) queued jobs with the same dedupe key.
import { and, asc, count, desc, eq, gte, inArray, isNotNull, isNull, lt, lte, min, notInArray, or, sql, sum, type SQL } from 'drizzle-orm'
import type { JobStatus } from '../../../shared/schemas/jobs.ts'
import type { DbOrTx } from '../index.ts'
import { farms, users } from '../schema.ts'
import { fields, jobs, type JobRow } from '../schema-planning.ts'

export interface NewJob {
  kind: string
  fieldId?: number | null
  farmId?: number | null
  dedupeKey?: string | null
  payload?: Record<string, unknown>
  inputsVersion?: string
  maxAttempts?: number
  runAfter?: Date
  createdBy?: number | null
}

/** How an enqueue treats jobs with the same dedupe key. */
export type EnqueueMode =
  /** queued jobs with the key become 'superseded'; the new job is queued */
  | 'supersede'
  /** when a queued or running job with the key exists, it is returned and nothing is added */
  | 'reuse-pending'
  /** when any job with the key exists (whatever its status), nothing is added */
  | 'once'

export interface JobListRow extends JobRow {
  fieldName: string | null
  farmName: string | null
  createdByName: string | null
}

export function jobsRepository(db: DbOrTx) {
  return {
    async findById(id: number): Promise<JobRow | null> {
      const [row] = await db.select().from(jobs).where(eq(jobs.id, id)).limit(1)
      return row ?? null
    },

    /**
     * Enqueues a job. Call inside a transaction: the rows with the key are locked first
     * (FOR UPDATE), so two processes enqueueing the same key serialise (or one of them
     * gets a deadlock error and retries). Returns the job that now stands for the request
     * and whether it is new.
     */
    async enqueue(job: NewJob, mode: EnqueueMode): Promise<{ job: JobRow; created: boolean; superseded: number[] }> {
      let superseded: number[] = []
      if (job.dedupeKey) {
        const existing = await db
          .select()
          .from(jobs)
          .where(
            mode === 'once'
              ? eq(jobs.dedupeKey, job.dedupeKey)
              : and(eq(jobs.dedupeKey, job.dedupeKey), inArray(jobs.status, ['queued', 'running'])),
          )
          .orderBy(desc(jobs.id))
          .for('update')
        if (mode === 'once' && existing.length > 0) return { job: existing[0], created: false, superseded }
        if (mode === 'reuse-pending') {
          const pending = existing.find((j) => j.status === 'queued') ?? existing.find((j) => j.status === 'running')
          // A running job may have read its inputs already: only a queued one can stand in.
          if (pending && pending.status === 'queued') return { job: pending, created: false, superseded }
        }
        if (mode === 'supersede') {
          superseded = existing.filter((j) => j.status === 'queued').map((j) => j.id)
          if (superseded.length) {
            await db
              .update(jobs)
              .set({ status: 'superseded', finishedAt: new Date(), updatedAt: new Date() })
              .where(and(inArray(jobs.id, superseded), eq(jobs.status, 'queued')))
          }
        }
      }
      const now = new Date()
      const [result] = await db.insert(jobs).values({
        kind: job.kind,
        fieldId: job.fieldId ?? null,
        farmId: job.farmId ?? null,
        dedupeKey: job.dedupeKey ?? null,
        inputsVersion: job.inputsVersion ?? '',
        payloadJson: JSON.stringify(job.payload ?? {}),
        status: 'queued',
        progress: 0,
        attempts: 0,
        maxAttempts: job.maxAttempts ?? 4,
        runAfter: job.runAfter ?? now,
        createdBy: job.createdBy ?? null,
        createdAt: now,
        updatedAt: now,
      })
      const [row] = await db.select().from(jobs).where(eq(jobs.id, result.insertId)).limit(1)
      return { job: row, created: true, superseded }
    },

    /**
     * Claims the next due job for `workerId`: locks candidate rows with SKIP LOCKED (rows
     * another transaction holds are passed over, never waited for), skips a job whose
     * dedupe key already has a running job (one recompute of a field at a time), and
     * marks the chosen one running. Jobs of no field (plan deliveries, feed fetches, the
     * nightly and new-day checks: short, and often awaited by a person) go first, so that
     * a plan sent during a refresh of every field does not wait behind it; then the oldest
     * due job. Call inside a transaction.
     */
    async claimNext(workerId: string, kinds?: readonly string[]): Promise<JobRow | null> {
      const now = new Date()
      const due: SQL[] = [eq(jobs.status, 'queued'), lte(jobs.runAfter, now)]
      if (kinds && kinds.length) due.push(inArray(jobs.kind, [...kinds]))
      const lockDue = (extra?: SQL) =>
        db
          .select()
          .from(jobs)
          .where(and(...due, extra))
          .orderBy(asc(jobs.runAfter), asc(jobs.id))
          .limit(20)
          .for('update', { skipLocked: true })
      /** The first candidate whose dedupe key has no running job. */
      const firstFree = async (candidates: JobRow[]): Promise<JobRow | undefined> => {
        const keys = [...new Set(candidates.map((c) => c.dedupeKey).filter((k): k is string => k !== null))]
        const busy = new Set<string>()
        if (keys.length) {
          const running = await db
            .select({ key: jobs.dedupeKey })
            .from(jobs)
            .where(and(inArray(jobs.dedupeKey, keys), eq(jobs.status, 'running')))
          for (const r of running) if (r.key) busy.add(r.key)
        }
        return candidates.find((c) => c.dedupeKey === null || !busy.has(c.dedupeKey))
      }
      // The first read goes through the (field_id, status) index: no forecast job's row is
      // read or locked by it.
      const job = (await firstFree(await lockDue(isNull(jobs.fieldId)))) ?? (await firstFree(await lockDue()))
      if (!job) return null
      await db
        .update(jobs)
        .set({
          status: 'running',
          lockedBy: workerId,
          heartbeatAt: now,
          startedAt: now,
          finishedAt: null,
          progress: 0,
          attempts: sql`${jobs.attempts} + 1`,
          updatedAt: now,
        })
        .where(eq(jobs.id, job.id))
      return { ...job, status: 'running', lockedBy: workerId, heartbeatAt: now, startedAt: now, finishedAt: null, progress: 0, attempts: job.attempts + 1 }
    },

    /** Heartbeat and progress of a running job; false when the job is no longer ours. */
    async heartbeat(id: number, workerId: string, progress?: number): Promise<boolean> {
      const now = new Date()
      const [result] = await db
        .update(jobs)
        .set({ heartbeatAt: now, updatedAt: now, ...(progress !== undefined ? { progress: Math.max(0, Math.min(1, progress)) } : {}) })
        .where(and(eq(jobs.id, id), eq(jobs.lockedBy, workerId), eq(jobs.status, 'running')))
      return result.affectedRows > 0
    },

    /** Marks a running job of ours done; false when it was taken from us meanwhile. */
    async complete(id: number, workerId: string, result: { resultJson: string; inputsVersion?: string }): Promise<boolean> {
      const now = new Date()
      const [res] = await db
        .update(jobs)
        .set({
          status: 'done',
          progress: 1,
          finishedAt: now,
          heartbeatAt: now,
          lockedBy: null,
          error: null,
          resultJson: result.resultJson,
          ...(result.inputsVersion !== undefined ? { inputsVersion: result.inputsVersion } : {}),
          updatedAt: now,
        })
        .where(and(eq(jobs.id, id), eq(jobs.lockedBy, workerId), eq(jobs.status, 'running')))
      return res.affectedRows > 0
    },

    /** A failed run: queued again after `retryAt`, or failed for good when retryAt is null. */
    async fail(id: number, workerId: string, error: string, retryAt: Date | null): Promise<boolean> {
      const now = new Date()
      const [res] = await db
        .update(jobs)
        .set(
          retryAt
            ? { status: 'queued', runAfter: retryAt, lockedBy: null, heartbeatAt: null, error, progress: 0, updatedAt: now }
            : { status: 'failed', finishedAt: now, lockedBy: null, error, updatedAt: now },
        )
        .where(and(eq(jobs.id, id), eq(jobs.lockedBy, workerId), eq(jobs.status, 'running')))
      return res.affectedRows > 0
    },

    /** Puts our own running jobs back in the queue (clean shutdown); the attempt is not counted. */
    async release(workerId: string): Promise<number> {
      const [res] = await db
        .update(jobs)
        .set({
          status: 'queued',
          lockedBy: null,
          heartbeatAt: null,
          progress: 0,
          attempts: sql`GREATEST(${jobs.attempts} - 1, 0)`,
          runAfter: new Date(),
          updatedAt: new Date(),
        })
        .where(and(eq(jobs.lockedBy, workerId), eq(jobs.status, 'running')))
      return res.affectedRows
    },

    /** Running jobs (for the dead-process check at start-up). */
    async running(): Promise<JobRow[]> {
      return db.select().from(jobs).where(eq(jobs.status, 'running')).orderBy(asc(jobs.id))
    },

    /**
     * Requeues the given running jobs (their process is gone): queued again, or failed when
     * they have used up their attempts. Only rows still running under the same lock change.
     */
    async requeueAbandoned(rows: Pick<JobRow, 'id' | 'lockedBy' | 'attempts' | 'maxAttempts'>[]): Promise<{ requeued: number; failed: number }> {
      let requeued = 0
      let failed = 0
      const now = new Date()
      for (const row of rows) {
        const lock = row.lockedBy === null ? sql`${jobs.lockedBy} IS NULL` : eq(jobs.lockedBy, row.lockedBy)
        const out = row.attempts >= row.maxAttempts
        const [res] = await db
          .update(jobs)
          .set(
            out
              ? {
                  status: 'failed',
                  finishedAt: now,
                  lockedBy: null,
                  error: `The server stopped while running this job ${row.attempts} times; it was not tried again.`,
                  updatedAt: now,
                }
              : { status: 'queued', lockedBy: null, heartbeatAt: null, progress: 0, runAfter: now, updatedAt: now },
          )
          .where(and(eq(jobs.id, row.id), eq(jobs.status, 'running'), lock))
        if (res.affectedRows > 0) {
          if (out) failed++
          else requeued++
        }
      }
      return { requeued, failed }
    },

    /** Queued or running jobs by dedupe key (e.g. to know which fields already wait). */
    async pendingKeys(): Promise<Set<string>> {
      const rows = await db
        .selectDistinct({ key: jobs.dedupeKey })
        .from(jobs)
        .where(and(inArray(jobs.status, ['queued', 'running']), isNotNull(jobs.dedupeKey)))
      return new Set(rows.map((r) => r.key!))
    },

    /** The newest queued or running job of each field given (for the forecast API). */
    async pendingForFields(fieldIds: number[]): Promise<Map<number, JobRow>> {
      const map = new Map<number, JobRow>()
      if (fieldIds.length === 0) return map
      const rows = await db
        .select()
        .from(jobs)
        .where(and(inArray(jobs.fieldId, fieldIds), inArray(jobs.status, ['queued', 'running']), eq(jobs.kind, 'forecast')))
        .orderBy(asc(jobs.id))
      for (const r of rows) {
        const seen = map.get(r.fieldId!)
        // A running job shows progress; otherwise the newest queued one.
        if (!seen || seen.status !== 'running') map.set(r.fieldId!, r)
      }
      return map
    },

    async list(filter: { status?: JobStatus; kind?: string; fieldId?: number; limit: number }): Promise<JobListRow[]> {
      const where: SQL[] = []
      if (filter.status) where.push(eq(jobs.status, filter.status))
      if (filter.kind) where.push(eq(jobs.kind, filter.kind))
      if (filter.fieldId) where.push(eq(jobs.fieldId, filter.fieldId))
      const rows = await db
        .select({ job: jobs, fieldName: fields.name, farmName: farms.name, createdByName: users.name })
        .from(jobs)
        .leftJoin(fields, eq(fields.id, jobs.fieldId))
        .leftJoin(farms, eq(farms.id, jobs.farmId))
        .leftJoin(users, eq(users.id, jobs.createdBy))
        .where(where.length ? and(...where) : undefined)
        // Running first, then queued, then the most recent.
        .orderBy(sql`FIELD(${jobs.status}, 'queued', 'running') DESC`, desc(jobs.id))
        .limit(filter.limit)
      return rows.map((r) => ({ ...r.job, fieldName: r.fieldName, farmName: r.farmName, createdByName: r.createdByName }))
    },

    async countsByStatus(): Promise<Record<JobStatus, number>> {
      const rows = await db.select({ status: jobs.status, n: count() }).from(jobs).groupBy(jobs.status)
      const out: Record<JobStatus, number> = { queued: 0, running: 0, done: 0, failed: 0, superseded: 0 }
      for (const r of rows) out[r.status] = r.n
      return out
    },

    /** Figures for the header progress bar (see JobSummary), over jobs of the given kinds. */
    async summary(kinds: readonly string[], now = new Date()): Promise<{ running: number; queued: number; runningProgress: number; finishedInBatch: number; failedRecently: number }> {
      const [active] = await db
        .select({
          running: sql<number>`SUM(${jobs.status} = 'running')`,
          queued: sql<number>`SUM(${jobs.status} = 'queued')`,
          runningProgress: sum(sql`CASE WHEN ${jobs.status} = 'running' THEN ${jobs.progress} ELSE 0 END`),
          oldest: min(jobs.createdAt),
        })
        .from(jobs)
        .where(and(inArray(jobs.status, ['queued', 'running']), inArray(jobs.kind, [...kinds])))
      const [{ failedRecently }] = await db
        .select({ failedRecently: count() })
        .from(jobs)
        .where(and(eq(jobs.status, 'failed'), inArray(jobs.kind, [...kinds]), gte(jobs.finishedAt, new Date(now.getTime() - 86_400_000))))
      const running = Number(active?.running ?? 0)
      const queued = Number(active?.queued ?? 0)
      let finishedInBatch = 0
      if (active?.oldest) {
        const [{ n }] = await db
          .select({ n: count() })
          .from(jobs)
          .where(and(inArray(jobs.status, ['done', 'failed']), inArray(jobs.kind, [...kinds]), gte(jobs.createdAt, active.oldest)))
        finishedInBatch = n
      }
      return { running, queued, runningProgress: Number(active?.runningProgress ?? 0), finishedInBatch, failedRecently }
    },

    /** Deletes finished jobs older than `before` (never queued or running ones). */
    async pruneFinished(before: Date): Promise<number> {
      const [res] = await db
        .delete(jobs)
        .where(and(notInArray(jobs.status, ['queued', 'running']), lt(jobs.updatedAt, before)))
      return res.affectedRows
    },

    /** Marks queued jobs of a field superseded (the field was deleted). */
    async supersedeQueuedOfField(fieldId: number): Promise<number> {
      const [res] = await db
        .update(jobs)
        .set({ status: 'superseded', finishedAt: new Date(), updatedAt: new Date() })
        .where(and(eq(jobs.fieldId, fieldId), eq(jobs.status, 'queued')))
      return res.affectedRows
    },

    /** Jobs not in a final state, for tests and diagnostics. */
    async unfinishedCount(): Promise<number> {
      const [{ n }] = await db
        .select({ n: count() })
        .from(jobs)
        .where(or(eq(jobs.status, 'queued'), eq(jobs.status, 'running')))
      return n
    },
  }
}
export type JobsRepository = ReturnType<typeof jobsRepository>
