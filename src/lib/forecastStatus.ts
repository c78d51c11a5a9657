/**
 * What the Outlook says about the forecasts it shows: whether they are being recomputed
 * (and how far), whether stored hours are out of date with no job queued, and the oldest
 * computation time. Pure.
 */
import type { FarmForecastResponse } from '@shared/schemas/forecast'

type FieldForecast = FarmForecastResponse['fields'][number]

export interface ForecastStatus {
  recomputing: boolean
  /** mean progress of the queued or running jobs (each a share 0..1), as a whole percentage */
  progressPct: number
  /** stored hours exist but were computed from older inputs or an older week, and no job is queued yet */
  outOfDate: boolean
  /** the oldest computation time among them (ISO), or null */
  computedAt: string | null
}

/** @example forecastStatus([]) // -> { recomputing: false, progressPct: 0, outOfDate: false, computedAt: null } */
export function forecastStatus(shown: readonly FieldForecast[]): ForecastStatus {
  const jobs = shown.map((f) => f.pendingJob).filter((j) => !!j)
  const recomputing = jobs.length > 0
  const progressPct = jobs.length === 0 ? 0 : Math.round((100 * jobs.reduce((s, j) => s + j!.progress, 0)) / jobs.length)
  const outOfDate = !recomputing && shown.some((f) => f.stale && f.hours.length > 0)
  const times = shown.map((f) => f.computedAt).filter((t): t is string => !!t)
  return { recomputing, progressPct, outOfDate, computedAt: times.length === 0 ? null : times.sort()[0] }
}
