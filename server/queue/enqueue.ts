// The queue's small interface: writing job rows, one transaction per enqueue, retried when
// two processes enqueue the same key at once (MariaDB then reports a deadlock for one of
// them, which is safe to retry). Services and jobs both enqueue through it; it knows
// nothing of how jobs run. A process that runs jobs registers a wake-up (onEnqueued) so
// that new work starts at once instead of at the next poll.
import type { JobReason } from '../../shared/schemas/jobs.ts'
import type { EnqueueMode, NewJob } from '../db/repositories/jobs.ts'
import type { Store } from '../db/repositories/index.ts'
import { withDeadlockRetry } from '../db/retry.ts'
import type { JobRow } from '../db/schema-planning.ts'

export const forecastKey = (fieldId: number) => `forecast:field:${fieldId}`

const wakeups = new Set<() => void>()

/** Called after every enqueue that added a job (the local runner claims it right away). */
export function onEnqueued(wake: () => void): () => void {
  wakeups.add(wake)
  return () => wakeups.delete(wake)
}

/** Wakes the local runners after a transaction that wrote job rows through the repository. */
export function wakeJobRunners(): void {
  for (const wake of wakeups) wake()
}

export async function enqueueJob(store: Store, job: NewJob, mode: EnqueueMode): Promise<{ job: JobRow; created: boolean }> {
  const result = await withDeadlockRetry(store, (repos) => repos.jobs.enqueue(job, mode))
  if (result.created) wakeJobRunners()
  return result
}

/** Reasons of forecast jobs nobody is waiting for. */
const BACKGROUND_REASONS = new Set<JobReason>(['nightly', 'start-up'])
const USER_FIRST_MS = 10 * 60_000

export interface ForecastRequest {
  fieldId: number
  farmId: number
  reason: JobReason
  /** recompute even when the stored forecast has the same inputs version */
  force?: boolean
  createdBy?: number | null
}

/**
 * Queues a recompute of a field's forecast. `supersede` (changes, manual requests): a
 * queued job of the field is marked superseded by the new one. `reuse-pending` (nightly,
 * start-up sweep): a queued job of the field already covers it.
 */
export function enqueueForecast(store: Store, req: ForecastRequest, mode: 'supersede' | 'reuse-pending' = 'supersede') {
  return enqueueJob(
    store,
    {
      kind: 'forecast',
      fieldId: req.fieldId,
      farmId: req.farmId,
      dedupeKey: forecastKey(req.fieldId),
      payload: { reason: req.reason, force: req.force ?? false },
      createdBy: req.createdBy ?? null,
      // Jobs are claimed in runAfter order: what a person just changed or asked for goes
      // ahead of the background refreshes (nightly, start-up check) already waiting.
      runAfter: BACKGROUND_REASONS.has(req.reason) ? new Date() : new Date(Date.now() - USER_FIRST_MS),
    },
    mode,
  )
}
