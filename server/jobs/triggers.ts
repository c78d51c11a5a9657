// What queues forecast recomputes: domain events after a change has been committed.
// A crash between the change and the enqueue is caught by the start-up staleness sweep
// (the stored inputs version no longer matches).
import { allFarmsWindowSpan } from '../forecast/windows.ts'
import type { JobReason } from '../../shared/schemas/jobs.ts'
import type { Store } from '../db/repositories/index.ts'
import { on } from '../events.ts'
import type { Logger } from '../logger.ts'
import { enqueueForecast } from '../queue/enqueue.ts'

const HOUR_MS = 3_600_000

async function enqueueAll(store: Store, list: Array<{ id: number; farmId: number }>, reason: JobReason): Promise<number> {
  let n = 0
  for (const f of list) {
    const { created } = await enqueueForecast(store, { fieldId: f.id, farmId: f.farmId, reason })
    if (created) n++
  }
  return n
}

/**
 * Fields an outage over [fromMs, toMs) can affect: those whose stored or current window
 * overlaps it (every field when it overlaps any farm's current week).
 */
export async function fieldsForOutage(store: Store, fromMs: number, toMs: number, nowMs = Date.now()) {
  const all = await store.repos.forecasts.fieldIds()
  const current = await allFarmsWindowSpan(store.repos, nowMs)
  if (fromMs < current.endMs && toMs > current.startMs) return all
  const meta = await store.repos.forecasts.storedMeta()
  return all.filter((f) => {
    const m = meta.get(f.id)
    if (!m?.firstHour || !m.lastHour) return false
    return fromMs < m.lastHour.getTime() + HOUR_MS && toMs > m.firstHour.getTime()
  })
}

/** Fields whose forecast a change of these service levels (or of work types: 'all') affects. */
export async function fieldsForPlanning(store: Store, serviceLevelIds: number[] | 'all') {
  const repos = store.repos.forecasts
  if (serviceLevelIds === 'all' || (await repos.workTypesUseLevels(serviceLevelIds))) return repos.fieldIds()
  return repos.fieldIds({ serviceLevelIds })
}

/** Registers the listeners; returns a function that removes them. */
export function registerForecastTriggers(store: Store, logger: Logger): () => void {
  const offs = [
    on('field.changed', async ({ fieldId, farmId, deleted }) => {
      if (deleted) await store.repos.jobs.supersedeQueuedOfField(fieldId)
      else await enqueueForecast(store, { fieldId, farmId, reason: 'field' })
    }),
    on('obstructions.changed', async ({ farmId }) => {
      const n = await enqueueAll(store, await store.repos.forecasts.fieldIds({ farmId }), 'obstructions')
      logger.debug(`obstructions of farm ${farmId} changed: ${n} forecasts queued`)
    }),
    on('terrain.changed', async ({ farmId }) => {
      const n = await enqueueAll(store, await store.repos.forecasts.fieldIds({ farmId }), 'terrain')
      logger.debug(`elevation model of farm ${farmId} changed: ${n} forecasts queued`)
    }),
    on('orbits.changed', async ({ reason }) => {
      const n = await enqueueAll(store, await store.repos.forecasts.fieldIds(), 'orbits')
      logger.info(`orbit data changed (${reason}): ${n} forecasts queued`)
    }),
    on('outages.changed', async ({ fromMs, toMs }) => {
      const n = await enqueueAll(store, await fieldsForOutage(store, fromMs, toMs), 'outages')
      logger.info(`outages changed: ${n} forecasts queued`)
    }),
    on('planning.changed', async ({ serviceLevelIds }) => {
      const n = await enqueueAll(store, await fieldsForPlanning(store, serviceLevelIds), 'planning')
      logger.info(`work types or service levels changed: ${n} forecasts queued`)
    }),
  ]
  return () => offs.forEach((off) => off())
}
