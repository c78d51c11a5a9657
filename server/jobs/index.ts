// The forecast jobs of one server process: the engine thread pool, the runner, the
// triggers, the start-up staleness sweep and the nightly refresh timer.
//
//   const jobs = await startJobs({ store, config, logger })   // server/index.ts
//   ...
//   await jobs.stop()                                           // on SIGTERM
import { forecastWindow, windowSpan } from '../../shared/schemas/forecast.ts'
import type { Config } from '../config.ts'
import type { Store } from '../db/repositories/index.ts'
import type { Logger } from '../logger.ts'
import { enqueueForecast, enqueueJob } from '../queue/enqueue.ts'
import { EnginePool } from './enginePool.ts'
import { engineSettings, storedWeekIsCurrent } from '../forecast/fieldInputs.ts'
import { defaultHandlers, enqueueSpaceWeather } from './handlers.ts'
import { correctionsWithin, fieldCorrection, loadCorrectionInputs } from '../forecast/correctionInputs.ts'
import { inputsVersion } from '../forecast/inputs.ts'
import { loadOrbitInputs } from '../forecast/orbitInputs.ts'
import { JobRunner, type JobHandler } from './runner.ts'
import { registerForecastTriggers } from './triggers.ts'
import { terrainOfField, terrainVersionOf } from '../terrain/store.ts'

export interface JobsHandle {
  runner: JobRunner | null
  pool: EnginePool | null
  /** Fields queued by the start-up sweep. */
  sweep: { checked: number; queued: number }
  stop(): Promise<void>
}

/**
 * Fields whose stored forecast is missing, incomplete, from another window (their farm's
 * local week) or from other inputs (a different version), queued for a recompute (a
 * queued job already covers a field).
 */
export async function stalenessSweep(store: Store, config: Config, nowMs = Date.now()): Promise<{ checked: number; queued: number }> {
  const settings = engineSettings(config)
  const zones = await store.repos.forecasts.farmZones()
  const farmIds = [...new Set((await store.repos.forecasts.fieldIds()).map((f) => f.farmId))]
  const span = windowSpan(nowMs, farmIds.map((id) => zones.get(id)!))
  if (!span) return { checked: 0, queued: 0 }
  const [workTypes, orbits, corrections] = await Promise.all([
    store.repos.forecasts.activeWorkTypes(),
    loadOrbitInputs(store),
    loadCorrectionInputs(store, span),
  ])
  let checked = 0
  let queued = 0
  // Farm by farm, so that memory does not grow with the number of fields (boundaries can be large).
  for (const farmId of farmIds) {
    const fields = await store.repos.forecasts.allFieldsWithSigma(farmId)
    const [obstructions, meta] = await Promise.all([
      store.repos.forecasts.obstructionsOfFarm(farmId),
      store.repos.forecasts.storedMeta(fields.map((f) => f.id)),
    ])
    const window = forecastWindow(nowMs, zones.get(farmId)!)
    const farmCorrections = correctionsWithin(corrections, window)
    for (const field of fields) {
      checked++
      const version = inputsVersion({
        field,
        obstructions,
        orbitVersion: orbits.version,
        outages: orbits.outages,
        workTypes,
        windowStartMs: window.startMs,
        windowHours: window.hours,
        settings,
        terrain: terrainVersionOf(await terrainOfField(store.repos, field)),
        correction: fieldCorrection(field, workTypes, farmCorrections).version,
      })
      if (storedWeekIsCurrent(meta.get(field.id), window, version)) continue
      const { created } = await enqueueForecast(store, { fieldId: field.id, farmId: field.farmId, reason: 'start-up' }, 'reuse-pending')
      if (created) queued++
    }
  }
  return { checked, queued }
}

/** Milliseconds from `now` to the next server-local `HH:MM`. */
export function msUntilLocalTime(hhmm: string, now = new Date()): number {
  const [h, m] = hhmm.split(':').map(Number)
  const next = new Date(now)
  next.setHours(h, m, 0, 0)
  if (next.getTime() <= now.getTime()) next.setDate(next.getDate() + 1)
  return next.getTime() - now.getTime()
}

/** The local date (YYYY-MM-DD) a nightly refresh belongs to: its dedupe key. */
export function nightlyKey(now = new Date()): string {
  const y = now.getFullYear()
  const mo = String(now.getMonth() + 1).padStart(2, '0')
  const d = String(now.getDate()).padStart(2, '0')
  return `nightly:${y}-${mo}-${d}`
}

/** Queues today's nightly refresh once, whichever process asks first. */
export function enqueueNightly(store: Store, now = new Date()) {
  return enqueueJob(store, { kind: 'nightly-refresh', dedupeKey: nightlyKey(now), payload: { reason: 'nightly' } }, 'once')
}

/** The UTC hour a new-day check belongs to: its dedupe key. */
export const newDayKey = (nowMs = Date.now()) => `new-day:${new Date(nowMs).toISOString().slice(0, 13)}`

/** Queues this hour's new-day check once, whichever process asks first. */
export function enqueueNewDay(store: Store, nowMs = Date.now()) {
  return enqueueJob(store, { kind: 'new-day', dedupeKey: newDayKey(nowMs), payload: { reason: 'new-day' } }, 'once')
}

/** Milliseconds from `nowMs` to a few seconds past the next full UTC hour (every zone's midnight is on or near one). */
export const msUntilNextHour = (nowMs = Date.now()) => 3_600_000 - (nowMs % 3_600_000) + 5_000

/** Runs `action` after `delay()` ms, again and again; returns a function that stops it. */
function repeat(delay: () => number, action: () => Promise<unknown>, what: string, logger: Logger): () => void {
  let timer: NodeJS.Timeout | undefined
  const schedule = () => {
    timer = setTimeout(() => {
      void action().catch((error) => logger.warn(`could not queue ${what}`, error))
      schedule()
    }, delay())
    timer.unref()
  }
  schedule()
  return () => clearTimeout(timer)
}

export async function startJobs(deps: {
  store: Store
  config: Config
  logger: Logger
  handlers?: Record<string, JobHandler>
  /** Skip the start-up sweep (tests that want an empty queue). */
  sweep?: boolean
  /** Skip the nightly refresh and the hourly new-day check (tests that run only their own jobs). */
  schedule?: boolean
}): Promise<JobsHandle> {
  const { store, config, logger } = deps
  const offTriggers = registerForecastTriggers(store, logger)
  if (!config.jobsEnabled) {
    logger.info('jobs are disabled in this process (JOBS_ENABLED=false); changes are queued for another process')
    return { runner: null, pool: null, sweep: { checked: 0, queued: 0 }, stop: async () => offTriggers() }
  }
  const pool = new EnginePool(config.jobConcurrency)
  const runner = new JobRunner({ store, config, logger, pool, handlers: defaultHandlers(deps.handlers) })
  await runner.start()
  let sweep = { checked: 0, queued: 0 }
  if (deps.sweep !== false) {
    try {
      // Today's Kp forecast before the sweep, so the first forecasts carry it.
      await enqueueSpaceWeather(store)
      sweep = await stalenessSweep(store, config)
      if (sweep.queued) logger.info(`start-up check: ${sweep.queued} of ${sweep.checked} field forecasts queued for a recompute`)
    } catch (error) {
      logger.warn('the start-up forecast check failed', error)
    }
  }
  // The nightly refresh at the configured server-local time; and, since each farm's week
  // starts at its own local midnight, an hourly check that queues the fields of the farms
  // whose day has turned.
  const timers =
    deps.schedule === false
      ? []
      : [
          repeat(() => msUntilLocalTime(config.nightlyRefreshTime) + 1_000, () => enqueueNightly(store), 'the nightly refresh', logger),
          repeat(() => msUntilNextHour(), () => enqueueNewDay(store), 'the new-day check', logger),
        ]
  return {
    runner,
    pool,
    sweep,
    stop: async () => {
      for (const stopTimer of timers) stopTimer()
      offTriggers()
      await runner.stop()
      await pool.close()
    },
  }
}
