import { z } from 'zod'
import type { HourState } from './planning'

// Stored field forecasts: one row per field per UTC hour, replaced whole by each forecast
// job. GET /api/fields/:id/forecast?from&to and GET /api/farms/:id/forecast?from&to.

/** Hours in the forecast window (7 days). */
export const FORECAST_WINDOW_HOURS = 168
const HOUR_MS = 3_600_000
const DAY_MS = 24 * HOUR_MS

/**
 * The forecast window at `nowMs`: 168 hours from 00:00 UTC of the current UTC day. Every
 * field shares it; the nightly refresh rolls it forward.
 *
 * @example
 * forecastWindow(Date.UTC(2026, 11, 2, 15, 30))
 * // -> { startMs: Date.UTC(2026, 11, 2), endMs: Date.UTC(2026, 11, 9), hours: 168 }
 */
export function forecastWindow(nowMs: number, hours = FORECAST_WINDOW_HOURS): { startMs: number; endMs: number; hours: number } {
  const startMs = Math.floor(nowMs / DAY_MS) * DAY_MS
  return { startMs, endMs: startMs + hours * HOUR_MS, hours }
}

const isoTime = (name: string) =>
  z
    .string()
    .trim()
    .refine((v) => !Number.isNaN(Date.parse(v)) && /^\d{4}-\d{2}-\d{2}/.test(v), `${name} must be an ISO 8601 time, e.g. 2026-12-07T00:00:00Z`)
    .transform((v) => new Date(v))

/** ?from&to (ISO 8601); both optional (default: the stored window); at most 31 days apart. */
export const forecastQuerySchema = z
  .object({ from: isoTime('from').optional(), to: isoTime('to').optional() })
  .refine((q) => !q.from || !q.to || q.from < q.to, { message: 'from must be before to', path: ['to'] })
  .refine((q) => !q.from || !q.to || q.to.getTime() - q.from.getTime() <= 31 * DAY_MS, {
    message: 'from and to may be at most 31 days apart',
    path: ['to'],
  })
export type ForecastQuery = z.infer<typeof forecastQuerySchema>

/** Share of the field meeting a work type in an hour, and the hour's state. */
export interface WorkTypeHour {
  /** 0..1 of the field's samples meeting the thresholds */
  share: number
  /** 0..1 meeting them with the most damaging satellite lost */
  shareN1: number
  state: HourState
  /** why the state is worse than the geometry: the correction link or a storm (correction.ts) */
  reason?: 'no-source' | 'out-of-range' | 'baseline-limit' | 'storm'
}

/** One stored hour of a field's forecast (UTC hour start). Null figures: no fix at all. */
export interface ForecastHour {
  time: string
  satsMin: number | null
  satsMedian: number | null
  hdopMedian: number | null
  hdopMax: number | null
  vdopMedian: number | null
  vdopMax: number | null
  pdopMax: number | null
  /** worst HDOP with one satellite lost; null when losing one can lose the fix */
  n1HdopMax: number | null
  /** expected errors at 95 % for the field's service level (m) */
  h95MedianM: number | null
  h95MaxM: number | null
  v95MedianM: number | null
  v95MaxM: number | null
  /** 0..1 of sample-epochs without a fix */
  noFixShare: number
  /** keyed by work type id (as text) */
  workTypes: Record<string, WorkTypeHour>
  /** highest Kp of the hour and its NOAA G level; null: no Kp forecast covers it; absent: stored before Kp data */
  spaceWeather?: { kpMax: number; g: number } | null
}

/** A queued or running recompute of the field. */
export interface PendingForecastJob {
  id: number
  status: 'queued' | 'running'
  progress: number
}

export interface FieldForecastResponse {
  fieldId: number
  fieldName: string
  farmId: number
  /** Version of the inputs the stored hours came from (empty when nothing is stored). */
  inputsVersion: string
  computedAt: string | null
  /** The window the stored forecast covers. */
  windowStart: string | null
  windowEnd: string | null
  /**
   * True when the stored hours may not match the current inputs: a recompute is queued or
   * running, nothing is stored, or the stored window is behind the current one.
   */
  stale: boolean
  pendingJob: PendingForecastJob | null
  orbitSummary: string
  hours: ForecastHour[]
  /** The work types the hours carry, in display order. */
  workTypes: Array<{ id: number; name: string }>
}

export interface FarmForecastResponse {
  farmId: number
  from: string
  to: string
  fields: Array<Omit<FieldForecastResponse, 'workTypes'>>
  workTypes: Array<{ id: number; name: string }>
}
