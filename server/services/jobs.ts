// Jobs: the list for office and admin, the summary for the header's progress bar, and the
// manual recompute of a field's forecast.
import type { SessionUser } from '../../shared/schemas/auth.ts'
import { jobKinds, type Job, type JobList, type JobListQuery, type JobSummary, type StorageReport } from '../../shared/schemas/jobs.ts'
import { allFarmsWindowSpan } from '../forecast/windows.ts'
import { assertFarmVisible } from '../auth/access.ts'
import type { JobListRow } from '../db/repositories/jobs.ts'
import type { JobRow } from '../db/schema-planning.ts'
import { notFound } from '../http/errors.ts'
import { enqueueForecast } from '../queue/enqueue.ts'
import type { ServiceContext } from './context.ts'
import { FINISHED_JOB_RETENTION_DAYS } from '../queue/retention.ts'

function parseJson(text: string | null): Record<string, unknown> {
  if (!text) return {}
  try {
    const v = JSON.parse(text) as unknown
    return v && typeof v === 'object' ? (v as Record<string, unknown>) : {}
  } catch {
    return {}
  }
}

export function toJob(row: JobRow & Partial<Pick<JobListRow, 'fieldName' | 'farmName' | 'createdByName'>>): Job {
  const payload = parseJson(row.payloadJson)
  const result = parseJson(row.resultJson)
  return {
    id: row.id,
    kind: row.kind,
    status: row.status,
    progress: row.status === 'done' ? 1 : row.progress,
    fieldId: row.fieldId,
    fieldName: row.fieldName ?? null,
    farmId: row.farmId,
    farmName: row.farmName ?? null,
    reason: typeof payload.reason === 'string' ? payload.reason : null,
    attempts: row.attempts,
    maxAttempts: row.maxAttempts,
    runAfter: row.runAfter.toISOString(),
    createdAt: row.createdAt.toISOString(),
    startedAt: row.startedAt?.toISOString() ?? null,
    finishedAt: row.finishedAt?.toISOString() ?? null,
    durationMs: typeof result.ms === 'number' ? result.ms : null,
    error: row.error,
    result: typeof result.summary === 'string' ? result.summary : null,
    createdByName: row.createdByName ?? null,
  }
}

export function createJobsService(ctx: ServiceContext) {
  const { store } = ctx

  return {
    async list(query: JobListQuery): Promise<JobList> {
      const [rows, counts] = await Promise.all([store.repos.jobs.list(query), store.repos.jobs.countsByStatus()])
      return { items: rows.map(toJob), counts }
    },

    async summary(): Promise<JobSummary> {
      const s = await store.repos.jobs.summary(jobKinds)
      const total = s.finishedInBatch + s.running + s.queued
      const active = s.running + s.queued > 0
      return {
        running: s.running,
        queued: s.queued,
        failedRecently: s.failedRecently,
        progress: active ? Math.min(1, (s.finishedInBatch + s.runningProgress) / total) : 1,
        active,
      }
    },

    /** Sizes of the stored tables and the pruning rules (the Jobs page's storage section). */
    async storage(): Promise<StorageReport> {
      const tables = await store.repos.storage.tables()
      return {
        tables,
        totalBytes: tables.reduce((sum, t) => sum + t.dataBytes + t.indexBytes, 0),
        jobRetentionDays: FINISHED_JOB_RETENTION_DAYS,
        windowStart: new Date((await allFarmsWindowSpan(store.repos, Date.now())).startMs).toISOString(),
      }
    },

    /** Queues a recompute of the field now (even when its inputs did not change). */
    async recompute(user: SessionUser, fieldId: number): Promise<Job> {
      const basics = (await store.repos.forecasts.fieldBasics([fieldId])).get(fieldId)
      if (!basics) throw notFound('The field')
      assertFarmVisible(user, basics.farmId)
      const { job } = await enqueueForecast(store, {
        fieldId,
        farmId: basics.farmId,
        reason: 'manual',
        force: true,
        createdBy: user.id,
      })
      return toJob({ ...job, fieldName: basics.name, createdByName: user.name })
    },
  }
}
export type JobsService = ReturnType<typeof createJobsService>
