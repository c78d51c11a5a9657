// The check the restart and multi-process job tests make of the stored weeks.
import { eq } from 'drizzle-orm'
import { expect } from 'vitest'
import type { Database } from '../../server/db/index.ts'
import { createRepositories } from '../../server/db/repositories/index.ts'
import { jobs } from '../../server/db/schema-planning.ts'
import { fieldWindow } from './forecastFields.ts'

/**
 * The product's rule for a stored week after recomputes: each field holds exactly its
 * farm's window (every hour once, consecutive), of one inputs version, written by one job
 * that completed: the field's job in `queued`, or a later background recompute of the
 * same field. (A server's start-up check runs while its runner already claims jobs and
 * queues a field again when its only job is running, since a running job may have read
 * older inputs; the hourly new-day check does the same when a farm's midnight passes; so
 * a later 'start-up', 'nightly' or 'new-day' job may legitimately write the week after ours.)
 */
export async function expectOneCompleteWeek(db: Database, fieldIds: number[], queued: Array<{ id: number; fieldId: number | null }>): Promise<void> {
  const repos = createRepositories(db)
  const meta = await repos.forecasts.storedMeta(fieldIds)
  for (const id of fieldIds) {
    const window = await fieldWindow(db, id)
    const m = meta.get(id)
    expect(m?.hours, `hours of field ${id}`).toBe(window.hours)
    expect(m?.firstHour?.getTime(), `first hour of field ${id}`).toBe(window.startMs)
    expect(m?.lastHour?.getTime(), `last hour of field ${id}`).toBe(window.endMs - 3_600_000)
    expect(m?.minVersion, `inputs versions of field ${id}`).toBe(m?.maxVersion)
    const hours = await repos.forecasts.hours([id], new Date(window.startMs), new Date(window.endMs))
    expect(hours).toHaveLength(window.hours)
    expect(new Set(hours.map((h) => h.hourStart.getTime())).size).toBe(window.hours)
    const job = queued.find((j) => j.fieldId === id)!
    const writers = [...new Set(hours.map((h) => h.jobId))]
    expect(writers, `jobs that wrote field ${id}`).toHaveLength(1)
    if (writers[0] === job.id) continue
    const [writer] = await db.select().from(jobs).where(eq(jobs.id, writers[0]!))
    expect(writer.id).toBeGreaterThan(job.id)
    expect([writer.kind, writer.fieldId, writer.status]).toEqual(['forecast', id, 'done'])
    expect(['start-up', 'nightly', 'new-day']).toContain((JSON.parse(writer.payloadJson) as { reason: string }).reason)
  }
}
