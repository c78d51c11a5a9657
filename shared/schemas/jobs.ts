import { z } from 'zod'

// Background jobs (forecast recomputes, the nightly refresh, orbit feed fetches):
// GET /api/jobs (office/admin), GET /api/jobs/summary (everyone signed in, for the header
// progress bar), POST /api/fields/:id/recompute (admin/office/contractor) -> 202 + Job.

export const jobStatuses = ['queued', 'running', 'done', 'failed', 'superseded'] as const
export type JobStatus = (typeof jobStatuses)[number]

export const jobKinds = ['forecast', 'nightly-refresh', 'new-day', 'orbit-feed', 'space-weather'] as const
export type JobKind = (typeof jobKinds)[number]

/** Why a forecast job was queued (shown in the Jobs list). */
export const jobReasons = [
  'manual',
  'field',
  'obstructions',
  'terrain',
  'orbits',
  'outages',
  'planning',
  'nightly',
  'new-day',
  'start-up',
] as const
export type JobReason = (typeof jobReasons)[number]

export interface Job {
  id: number
  kind: string
  status: JobStatus
  /** 0..1 while running; 1 when done. */
  progress: number
  fieldId: number | null
  fieldName: string | null
  farmId: number | null
  farmName: string | null
  reason: string | null
  attempts: number
  maxAttempts: number
  /** A queued job waits until this time (retries back off). */
  runAfter: string
  createdAt: string
  startedAt: string | null
  finishedAt: string | null
  /** Wall time of the last run (ms), when finished. */
  durationMs: number | null
  /** The last error (kept while a retry is pending). */
  error: string | null
  /** What the job produced, in a sentence (e.g. "168 hours stored"). */
  result: string | null
  createdByName: string | null
}

export const jobListQuerySchema = z.object({
  status: z
    .enum(jobStatuses, { error: `Filter by one of: ${jobStatuses.join(', ')}` })
    .optional(),
  kind: z.enum(jobKinds, { error: `Filter by one of: ${jobKinds.join(', ')}` }).optional(),
  fieldId: z.coerce.number().int().positive().optional(),
  limit: z.coerce.number().int().min(1, 'limit is at least 1').max(500, 'limit is at most 500').default(100),
})
export type JobListQuery = z.infer<typeof jobListQuerySchema>

export interface JobList {
  items: Job[]
  /** Counts per status over all jobs kept. */
  counts: Record<JobStatus, number>
}

/** GET /api/jobs/summary: enough for a progress bar. */
export interface JobSummary {
  running: number
  queued: number
  /** Failed in the last 24 h. */
  failedRecently: number
  /**
   * 0..1 over the current batch (jobs queued since the oldest unfinished one):
   * (finished + progress of running) / all; 1 when nothing is waiting.
   */
  progress: number
  active: boolean
}

/** One table of the database as GET /api/jobs/storage reports it. */
export interface StoredTable {
  name: string
  /** MariaDB's estimate for InnoDB tables (information_schema.TABLES.TABLE_ROWS) */
  rowsApprox: number
  dataBytes: number
  indexBytes: number
}

/** GET /api/jobs/storage (office and admin): the size of what is stored, and what is pruned when. */
export interface StorageReport {
  tables: StoredTable[]
  totalBytes: number
  /** Finished jobs older than this many days are removed by the nightly refresh. */
  jobRetentionDays: number
  /** The nightly refresh removes forecast hours before the current window. */
  windowStart: string
}
