// Job handlers by kind: 'forecast' (one field's 7-day forecast, computed on a worker
// thread and stored in one transaction), 'nightly-refresh' (rolls every field's window
// forward and prunes old rows) and 'orbit-feed' (fetches the configured orbit feed).
import { forecastWindow, FORECAST_WINDOW_HOURS } from '../../shared/schemas/forecast.ts'
import type { HourAggregate } from '../../shared/precision/index.ts'
import type { NewForecastHour } from '../db/repositories/forecasts.ts'
import type { Store } from '../db/repositories/index.ts'
import { emit } from '../events.ts'
import { feedUrlOf, fetchOrbitFeed } from '../services/orbitFeed.ts'
import { fetchKpFeed, kpFeedUrlOf } from '../services/spaceWeather.ts'
import { enqueueForecast, enqueueJob, withDeadlockRetry } from './enqueue.ts'
import { engineTask, inputsVersion, type EngineSettings } from './inputs.ts'
import { loadOrbitInputs } from './orbitInputs.ts'
import { fieldCorrection, loadCorrectionInputs, withCorrection } from './correctionInputs.ts'
import type { JobContext, JobHandler, JobOutcome } from './runner.ts'

/** Elevation mask of the stored forecasts (deg), the engine's default. */
export const FORECAST_MASK_DEG = 10

export function engineSettings(config: { forecastStepMin: number; forecastSampleCount: number }): EngineSettings {
  return { stepMin: config.forecastStepMin, sampleCount: config.forecastSampleCount, maskDeg: FORECAST_MASK_DEG }
}

/** One engine hour as a stored row. */
export function toStoredHour(
  fieldId: number,
  h: HourAggregate,
  meta: { jobId: number; inputsVersion: string; orbitSummary: string; computedAt: Date },
): NewForecastHour {
  return {
    fieldId,
    hourStart: new Date(h.startMs),
    satsMin: h.satellites.min,
    satsMedian: h.satellites.median,
    hdopMedian: h.hdop.median,
    hdopMax: h.hdop.max,
    vdopMedian: h.vdop.median,
    vdopMax: h.vdop.max,
    pdopMax: h.pdopMax,
    n1HdopMax: h.n1HdopMax,
    h95MedianM: h.h95M.median,
    h95MaxM: h.h95M.max,
    v95MedianM: h.v95M.median,
    v95MaxM: h.v95M.max,
    noFixShare: h.noFixShare,
    workJson: JSON.stringify(
      Object.fromEntries(h.workTypes.map((w) => [w.id, { share: w.share, shareN1: w.shareN1, state: w.state, ...(w.reason ? { reason: w.reason } : {}) }])),
    ),
    extraJson: JSON.stringify({ samples: h.samples, ...(h.spaceWeather !== undefined ? { spaceWeather: h.spaceWeather } : {}) }),
    orbitSummary: meta.orbitSummary.slice(0, 255),
    inputsVersion: meta.inputsVersion,
    jobId: meta.jobId,
    computedAt: meta.computedAt,
  }
}

/** Everything a field's forecast depends on, read from the database, with its version. */
export async function forecastInputsOf(store: Store, fieldId: number, settings: EngineSettings, nowMs: number) {
  const repos = store.repos
  const field = await repos.forecasts.fieldWithSigma(fieldId)
  if (!field) return null
  const window = forecastWindow(nowMs, FORECAST_WINDOW_HOURS)
  const [obstructions, workTypes, orbits, corrections] = await Promise.all([
    repos.forecasts.obstructionsOfFarm(field.farmId),
    repos.forecasts.activeWorkTypes(),
    loadOrbitInputs(store),
    loadCorrectionInputs(store, window),
  ])
  const correction = fieldCorrection(field, workTypes, corrections)
  const version = inputsVersion({
    field,
    obstructions,
    orbitVersion: orbits.version,
    outages: orbits.outages,
    workTypes,
    windowStartMs: window.startMs,
    windowHours: window.hours,
    settings,
    correction: correction.version,
  })
  return { field, obstructions, workTypes, orbits, window, version, correction }
}

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
    if (
      meta &&
      meta.hours === window.hours &&
      meta.minVersion === version &&
      meta.maxVersion === version &&
      meta.firstHour?.getTime() === window.startMs
    ) {
      return { summary: 'Already up to date; nothing recomputed.', inputsVersion: version, data: { skipped: true } }
    }
  }
  const task = withCorrection(engineTask({
    field,
    obstructions: inputs.obstructions,
    satellites: inputs.orbits.satellites,
    outages: inputs.orbits.outages,
    workTypes: inputs.workTypes,
    windowStartMs: window.startMs,
    windowHours: window.hours,
    settings,
  }), inputs.correction)
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
 * one already covers its field) and prunes hours older than the window and old job rows.
 */
export const nightlyRefreshHandler: JobHandler = async (ctx) => {
  const { store } = ctx
  const window = forecastWindow(Date.now())
  await enqueueJob(store, { kind: 'orbit-feed', dedupeKey: `orbit-feed:${dayOf(Date.now())}`, payload: { reason: 'nightly' }, maxAttempts: 4 }, 'once')
  await enqueueSpaceWeather(store)
  const pruned = await store.transaction((repos) => repos.forecasts.pruneBefore(new Date(window.startMs)))
  const prunedJobs = await store.repos.jobs.pruneFinished(new Date(Date.now() - 14 * 86_400_000))
  const fieldList = await store.repos.forecasts.fieldIds()
  let queued = 0
  for (const [i, f] of fieldList.entries()) {
    const { created } = await enqueueForecast(store, { fieldId: f.id, farmId: f.farmId, reason: 'nightly' }, 'reuse-pending')
    if (created) queued++
    ctx.progress((i + 1) / fieldList.length)
  }
  return {
    summary: `Window rolled to ${new Date(window.startMs).toISOString().slice(0, 10)}: ${queued} field forecasts queued, ${pruned} old hours and ${prunedJobs} old jobs removed.`,
    data: { queued, pruned, prunedJobs },
  }
}

/** Queues today's Kp feed fetch once (the nightly refresh and the start-up). */
export function enqueueSpaceWeather(store: Store) {
  return enqueueJob(store, { kind: 'space-weather', dedupeKey: `space-weather:${dayOf(Date.now())}`, payload: { reason: 'nightly' }, maxAttempts: 4 }, 'once')
}

export function defaultHandlers(extra: Record<string, JobHandler> = {}): Record<string, JobHandler> {
  return { forecast: forecastHandler, 'nightly-refresh': nightlyRefreshHandler, 'orbit-feed': orbitFeedHandler, 'space-weather': spaceWeatherHandler, ...extra }
}
