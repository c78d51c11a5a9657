// Job handlers by kind: 'forecast' (one field's 7-day forecast, computed on a worker
// thread and stored in one transaction), 'nightly-refresh' (queues every field, fetches
// the feeds and prunes old rows), 'new-day' (hourly: queues the fields of the farms whose
// local day has turned, so each farm's week rolls at its own midnight), 'orbit-feed' and
// 'space-weather' (fetch the configured feeds).
import { forecastWindow } from '../../shared/schemas/forecast.ts'
import { allFarmsWindowSpan } from '../forecast/windows.ts'
import { withDeadlockRetry } from '../db/retry.ts'
import { emit } from '../events.ts'
import { engineSettings, forecastInputsOf, storedWeekHoldsWindow, storedWeekIsCurrent } from '../forecast/fieldInputs.ts'
import { engineTask } from '../forecast/inputs.ts'
import { toStoredHour } from '../forecast/storedHour.ts'
import { enqueueForecast, enqueueJob } from '../queue/enqueue.ts'
import { feedUrlOf, fetchOrbitFeed } from '../services/orbitFeed.ts'
import { FINISHED_JOB_RETENTION_DAYS } from '../queue/retention.ts'
import { boundaryGeometry, terrainGridFor } from '../terrain/store.ts'
import { fetchKpFeed, kpFeedUrlOf } from '../services/spaceWeather.ts'
import { withCorrection } from '../forecast/correctionInputs.ts'
import type { Store } from '../db/repositories/index.ts'
import type { JobContext, JobHandler, JobOutcome } from './runner.ts'

export const forecastHandler: JobHandler = async (ctx: JobContext): Promise<JobOutcome> => {
  const { job, store, config } = ctx
  if (job.fieldId === null) throw new Error('A forecast job needs a field.')
  const settings = engineSettings(config)
  const inputs = await forecastInputsOf(store, job.fieldId, settings, Date.now())
  if (!inputs) return { summary: 'The field no longer exists; nothing to compute.' }
  const { field, window, version } = inputs
  ctx.progress(0.02)
  if (ctx.payload.force !== true) {
    const meta = (await store.repos.forecasts.storedMeta([field.id])).get(field.id)
    if (storedWeekIsCurrent(meta, window, version)) {
      return { summary: 'Already up to date; nothing recomputed.', inputsVersion: version, data: { skipped: true } }
    }
  }
  const task = withCorrection(
    engineTask({
      field,
      obstructions: inputs.obstructions,
      satellites: inputs.orbits.satellites,
      outages: inputs.orbits.outages,
      workTypes: inputs.workTypes,
      windowStartMs: window.startMs,
      windowHours: window.hours,
      settings,
      terrain: inputs.terrain ? await terrainGridFor(store.repos, inputs.terrain, boundaryGeometry(field.boundary)) : null,
    }),
    inputs.correction,
  )
  const result = await ctx.pool.run(task, (f) => ctx.progress(0.05 + 0.9 * f))
  if (ctx.signal.aborted) throw ctx.signal.reason
  if (result.hours.length !== window.hours) {
    throw new Error(`The engine returned ${result.hours.length} hours instead of ${window.hours}.`)
  }
  const computedAt = new Date()
  const rows = result.hours.map((h) =>
    toStoredHour(field.id, h, { jobId: job.id, inputsVersion: version, orbitSummary: inputs.orbits.summary, computedAt }),
  )
  // One transaction per field; two fields stored at the same moment can deadlock on
  // neighbouring index gaps, which MariaDB resolves by rolling one back: retry that one.
  const outcome = await withDeadlockRetry(store, (repos) =>
    repos.forecasts.replaceField(field.id, job.id, new Date(window.startMs), new Date(window.endMs), rows),
  )
  if (outcome === 'field-gone') return { summary: 'The field was deleted while computing; nothing stored.' }
  if (outcome === 'newer-stored') {
    return { summary: 'A newer forecast of this field was stored meanwhile; this result was dropped.', inputsVersion: version }
  }
  void emit('forecast.stored', { fieldId: field.id, jobId: job.id })
  return {
    summary: `${rows.length} hours stored (${result.samplePoints} sample points, ${result.satellitesUsed} satellites).`,
    inputsVersion: version,
    data: { hours: rows.length, samplePoints: result.samplePoints, satellites: result.satellitesUsed },
  }
}

/**
 * Fetches the configured orbit feed (the app's local fake feed by default) into a new orbit
 * set; the orbit data service then emits 'orbits.changed', which queues every field. One
 * fetch attempt per run: the runner retries with its own backoff and keeps the error.
 */
export const orbitFeedHandler: JobHandler = async (ctx) => {
  const result = await fetchOrbitFeed(ctx.store, feedUrlOf(ctx.config), { retries: 0, createdBy: ctx.job.createdBy })
  if (!result.ok) throw new Error(result.message)
  return { summary: result.message, data: { ...result } }
}

/** Fetches the Kp forecast feed (the app's local fake feed by default); the runner retries a failure. */
export const spaceWeatherHandler: JobHandler = async (ctx) => {
  const result = await fetchKpFeed(ctx.store, kpFeedUrlOf(ctx.config))
  if (!result.ok) throw new Error(result.message)
  return { summary: result.message, data: { ...result } }
}

/** The date (UTC) a daily job belongs to, for its dedupe key. */
const dayOf = (ms: number) => new Date(ms).toISOString().slice(0, 10)

/**
 * Fetches the orbit feed (a job of its own), queues a forecast of every field (a queued
 * one already covers its field) and prunes hours older than every farm's window and old
 * job rows.
 */
export const nightlyRefreshHandler: JobHandler = async (ctx) => {
  const { store } = ctx
  const window = await allFarmsWindowSpan(store.repos, Date.now())
  await enqueueJob(store, { kind: 'orbit-feed', dedupeKey: `orbit-feed:${dayOf(Date.now())}`, payload: { reason: 'nightly' }, maxAttempts: 4 }, 'once')
  await enqueueSpaceWeather(store)
  const pruned = await store.transaction((repos) => repos.forecasts.pruneBefore(new Date(window.startMs)))
  const prunedJobs = await store.repos.jobs.pruneFinished(new Date(Date.now() - FINISHED_JOB_RETENTION_DAYS * 86_400_000))
  const fieldList = await store.repos.forecasts.fieldIds()
  let queued = 0
  for (const [i, f] of fieldList.entries()) {
    const { created } = await enqueueForecast(store, { fieldId: f.id, farmId: f.farmId, reason: 'nightly' }, 'reuse-pending')
    if (created) queued++
    ctx.progress((i + 1) / fieldList.length)
  }
  return {
    summary: `${queued} field forecasts queued; ${pruned} hours from before ${new Date(window.startMs).toISOString().slice(0, 16)} UTC (the earliest farm's week) and ${prunedJobs} old jobs removed.`,
    data: { queued, pruned, prunedJobs },
  }
}

/**
 * Queues a forecast of each field whose stored week is not its farm's current window
 * (the farm's local day turned since it was computed, or nothing is stored), farm by farm.
 */
export const newDayHandler: JobHandler = async (ctx) => {
  const { store } = ctx
  const nowMs = Date.now()
  const zones = await store.repos.forecasts.farmZones()
  let queued = 0
  let farmsRolled = 0
  for (const [farmId, zone] of zones) {
    const window = forecastWindow(nowMs, zone)
    const fieldList = await store.repos.forecasts.fieldIds({ farmId })
    const meta = await store.repos.forecasts.storedMeta(fieldList.map((f) => f.id))
    const behind = fieldList.filter((f) => !storedWeekHoldsWindow(meta.get(f.id), window))
    if (behind.length) farmsRolled++
    for (const f of behind) {
      const { created } = await enqueueForecast(store, { fieldId: f.id, farmId, reason: 'new-day' }, 'reuse-pending')
      if (created) queued++
    }
  }
  return { summary: `${queued} field forecasts queued on ${farmsRolled} farms whose week moved on.`, data: { queued, farms: farmsRolled } }
}

/** Queues today's Kp feed fetch once (the nightly refresh and the start-up). */
export function enqueueSpaceWeather(store: Store) {
  return enqueueJob(store, { kind: 'space-weather', dedupeKey: `space-weather:${dayOf(Date.now())}`, payload: { reason: 'nightly' }, maxAttempts: 4 }, 'once')
}

export function defaultHandlers(extra: Record<string, JobHandler> = {}): Record<string, JobHandler> {
  return { forecast: forecastHandler, 'nightly-refresh': nightlyRefreshHandler, 'new-day': newDayHandler, 'orbit-feed': orbitFeedHandler, 'space-weather': spaceWeatherHandler, ...extra }
}
