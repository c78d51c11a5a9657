import { DateTime } from 'luxon'
import { z } from 'zod'
import { hourStates } from './planning'

// Stored field forecasts: one row per field per UTC hour, replaced whole by each forecast
// job. GET /api/fields/:id/forecast?from&to and GET /api/farms/:id/forecast?from&to.

/** Local days in the forecast window. */
export const FORECAST_WINDOW_DAYS = 7
/** Hours in the forecast window on a week without a daylight-saving change (7 x 24). */
export const FORECAST_WINDOW_HOURS = FORECAST_WINDOW_DAYS * 24
const HOUR_MS = 3_600_000
const DAY_MS = 24 * HOUR_MS

/** A forecast window: [startMs, endMs) and the number of UTC hours in it. */
export interface ForecastWindow {
  startMs: number
  endMs: number
  hours: number
}

/**
 * A farm's forecast window at `nowMs`: from 00:00 local time of today in the farm's IANA
 * zone through the end of the seventh local day. The stored week is these whole UTC
 * hours: 168 on most weeks, 167 on a week with the spring-forward day and 169 with the
 * fall-back day (in a half-hour zone the hours that start within the days). The nightly
 * refresh and the hourly new-day check roll it forward at each farm's own midnight.
 *
 * @example
 * forecastWindow(Date.UTC(2026, 11, 3, 15, 30), 'America/Chicago')
 * // -> { startMs: Date.UTC(2026, 11, 3, 6), endMs: Date.UTC(2026, 11, 10, 6), hours: 168 }
 * forecastWindow(Date.UTC(2026, 10, 1, 12), 'America/Chicago').hours // -> 169 (1 Nov, clocks go back)
 */
export function forecastWindow(nowMs: number, zone: string, days = FORECAST_WINDOW_DAYS): ForecastWindow {
  const today = DateTime.fromMillis(nowMs, { zone }).startOf('day')
  if (!today.isValid) throw new Error(`Unknown time zone: ${zone}`)
  const startMs = Math.ceil(today.toMillis() / HOUR_MS) * HOUR_MS
  const endMs = Math.ceil(today.plus({ days }).toMillis() / HOUR_MS) * HOUR_MS
  return { startMs, endMs, hours: (endMs - startMs) / HOUR_MS }
}

/**
 * The span that the windows of all these zones cover at `nowMs` (earliest start, latest
 * end): what a question about "any farm's current week" reads, and what pruning keeps.
 */
export function windowSpan(nowMs: number, zones: Iterable<string>): { startMs: number; endMs: number } | null {
  let span: { startMs: number; endMs: number } | null = null
  for (const zone of new Set(zones)) {
    const w = forecastWindow(nowMs, zone)
    span = span ? { startMs: Math.min(span.startMs, w.startMs), endMs: Math.max(span.endMs, w.endMs) } : { startMs: w.startMs, endMs: w.endMs }
  }
  return span
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
export const workTypeHourSchema = z.object({
  /** 0..1 of the field's samples meeting the thresholds */
  share: z.number(),
  /** 0..1 meeting them with the most damaging satellite lost */
  shareN1: z.number(),
  state: z.enum(hourStates),
  /** why the state is worse than the geometry: the correction link or a storm (shared/precision/correction.ts) */
  reason: z.enum(['no-source', 'out-of-range', 'baseline-limit', 'storm']).optional(),
})
export type WorkTypeHour = z.infer<typeof workTypeHourSchema>

/**
 * The figures of one stored forecast hour, defined once. The stored row's columns
 * (server/db/schema-planning.ts, one column per figure, named in snake case), the API's
 * ForecastHour, the pass views' stored hour and both conversions (engine hour -> row,
 * row -> API) are built from this schema. Adding a figure: add it here, give its
 * computation from the engine's hour in server/forecast/storedHour.ts (the compiler asks
 * for it), then generate the migration. Null: no fix at all in the hour. An integer
 * figure is stored as SMALLINT, any other as DOUBLE; a figure that is never null is
 * stored NOT NULL with 0 as its default.
 */
export const hourFiguresSchema = z.object({
  /** satellites in use: fewest and median over the hour's samples */
  satsMin: z.int().nullable(),
  satsMedian: z.number().nullable(),
  hdopMedian: z.number().nullable(),
  hdopMax: z.number().nullable(),
  vdopMedian: z.number().nullable(),
  vdopMax: z.number().nullable(),
  pdopMax: z.number().nullable(),
  /** worst HDOP with one satellite lost; null when losing one can lose the fix */
  n1HdopMax: z.number().nullable(),
  /** expected errors at 95 % for the field's service level (m) */
  h95MedianM: z.number().nullable(),
  h95MaxM: z.number().nullable(),
  v95MedianM: z.number().nullable(),
  v95MaxM: z.number().nullable(),
  /** 0..1 of sample-epochs without a fix */
  noFixShare: z.number(),
})
export type HourFigures = z.infer<typeof hourFiguresSchema>
/** The names of the hour figures, in schema order. */
export const hourFigureNames = Object.keys(hourFiguresSchema.shape) as Array<keyof HourFigures>

/** The figures of an object that carries them (a stored row, say), and nothing else. */
export function pickHourFigures(source: HourFigures): HourFigures {
  const out: Record<string, number | null> = {}
  for (const name of hourFigureNames) out[name] = source[name]
  return out as HourFigures
}

/** One stored hour of a field's forecast (UTC hour start), as the API sends it. */
export const forecastHourSchema = hourFiguresSchema.extend({
  time: z.string(),
  /** keyed by work type id (as text) */
  workTypes: z.record(z.string(), workTypeHourSchema),
  /** highest Kp of the hour and its NOAA G level; null: no Kp forecast covers it; absent: stored before Kp data */
  spaceWeather: z.object({ kpMax: z.number(), g: z.int() }).nullable().optional(),
})
export type ForecastHour = z.infer<typeof forecastHourSchema>

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
