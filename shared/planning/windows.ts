/**
 * Find a window: the best few contiguous stretches of the coming week in which a pass of
 * a given duration can run on a field, from the field's stored forecast hours for one
 * work type.
 *
 * Rules
 * - Candidates start on the forecast's UTC hour starts inside [fromMs, toMs) and must end
 *   by toMs. A window [start, start + duration) covers every hour it touches; each of
 *   those hours must have a stored forecast and none may be Closed.
 * - With a night point given, no covered hour may be a night hour (night.ts).
 * - The chosen machine's busy spans (its other passes) may not overlap the window.
 * - With requireClear, Tight hours are not accepted either (used for suggestions for work
 *   types that need Clear hours, so that a suggestion is never at risk itself).
 * - Ranking: every hour Clear first, then fewest Tight hours, then earliest start.
 * - The result is the best `limit` windows that do not overlap one another (taking the
 *   best, dropping candidates that overlap it, and so on), so the few proposals are real
 *   alternatives and not the same stretch shifted by an hour.
 */
import { isNightHour, type GeoPoint } from './night'
import { HOUR_MS, MINUTE_MS, localStamp, overlaps, type TimeSpan } from './time'

export type PlanningHourState = 'clear' | 'tight' | 'closed'

/** One stored forecast hour of a field for one work type. */
export interface PlanningHour {
  /** UTC hour start */
  startMs: number
  state: PlanningHourState
}

export interface FindWindowsInput {
  hours: readonly PlanningHour[]
  durationMin: number
  /** search span (the coming week) */
  fromMs: number
  toMs: number
  /** the farm's IANA zone: local stamps of the results */
  timeZone: string
  /** when set, windows may not contain a night hour at this point (the field's centroid) */
  excludeNightAt?: GeoPoint | null
  /** spans the chosen machine is already booked */
  busy?: readonly TimeSpan[]
  /** accept Clear hours only */
  requireClear?: boolean
  /** how many windows to return, default 5 */
  limit?: number
}

export interface FoundWindow {
  startMs: number
  endMs: number
  localStart: string
  localEnd: string
  clearHours: number
  tightHours: number
  /** share of the covered hours that are Clear (0..1) */
  score: number
}

/** Number of clock hours a span touches when it starts on an hour start. */
export const hoursCovered = (durationMin: number): number => Math.ceil((durationMin * MINUTE_MS) / HOUR_MS)

/** Orders windows: all Clear first, then fewest Tight hours, then earliest. */
export function compareWindows(a: Pick<FoundWindow, 'tightHours' | 'startMs'>, b: Pick<FoundWindow, 'tightHours' | 'startMs'>): number {
  return a.tightHours - b.tightHours || a.startMs - b.startMs
}

/**
 * @example
 * findWindows({ hours, durationMin: 180, fromMs, toMs, timeZone: 'America/Chicago',
 *   excludeNightAt: { latDeg: 42.1, lonDeg: -93.4 }, busy: [] })
 * // -> [{ startMs, endMs, localStart: '2026-12-03 08:00', localEnd: '2026-12-03 11:00',
 * //       clearHours: 3, tightHours: 0, score: 1 }, ...]
 */
export function findWindows(input: FindWindowsInput): FoundWindow[] {
  const { durationMin, fromMs, toMs } = input
  if (!(durationMin > 0)) throw new Error('durationMin must be above 0')
  if (!(toMs > fromMs)) throw new Error('The search span must end after it starts')
  const limit = input.limit ?? 5
  const durationMs = durationMin * MINUTE_MS
  const span = hoursCovered(durationMin)

  const stateAt = new Map<number, PlanningHourState>()
  for (const h of input.hours) stateAt.set(h.startMs, h.state)
  const nightCache = new Map<number, boolean>()
  const night = (ms: number): boolean => {
    const point = input.excludeNightAt
    if (!point) return false
    let v = nightCache.get(ms)
    if (v === undefined) nightCache.set(ms, (v = isNightHour(ms, point)))
    return v
  }
  const busy = input.busy ?? []

  const starts = [...stateAt.keys()].filter((ms) => ms >= fromMs && ms + durationMs <= toMs).sort((a, b) => a - b)
  const candidates: FoundWindow[] = []
  for (const startMs of starts) {
    let clear = 0
    let tight = 0
    let ok = true
    for (let k = 0; k < span && ok; k++) {
      const hour = startMs + k * HOUR_MS
      const state = stateAt.get(hour)
      if (state === undefined || state === 'closed' || (state === 'tight' && input.requireClear) || night(hour)) ok = false
      else if (state === 'clear') clear++
      else tight++
    }
    if (!ok) continue
    const endMs = startMs + durationMs
    if (busy.some((b) => overlaps(b, { startMs, endMs }))) continue
    candidates.push({
      startMs,
      endMs,
      localStart: localStamp(startMs, input.timeZone),
      localEnd: localStamp(endMs, input.timeZone),
      clearHours: clear,
      tightHours: tight,
      score: Math.round((clear / span) * 1000) / 1000,
    })
  }

  candidates.sort(compareWindows)
  const chosen: FoundWindow[] = []
  for (const c of candidates) {
    if (chosen.length >= limit) break
    if (chosen.some((w) => overlaps(w, c))) continue
    chosen.push(c)
  }
  return chosen
}
