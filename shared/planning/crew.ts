/**
 * The cab view's reading of a field's hours for one work type: is the current hour good
 * enough, and until when does the window stay open (or when does it open next).
 *
 * Rules (the product design's hour states): an hour is workable when it is Clear, or
 * Tight for work that does not need Clear hours; an hour without a stored forecast is not
 * workable (nothing is known about it). A window is a run of consecutive workable hours;
 * it closes at the end of its last hour. Pure: the current time is passed in.
 */
import { HOUR_MS, floorHour } from './time'
import type { PlanningHour, PlanningHourState } from './windows'

export interface OpenSpan {
  /** state of the hour that contains `atMs`; null when no forecast is stored for it */
  stateNow: PlanningHourState | null
  /** the hour containing `atMs` is workable */
  openNow: boolean
  /** end (UTC ms) of the workable run that contains `atMs`; null when not open now */
  closesAtMs: number | null
  /** start (UTC ms) of the next workable hour when not open now; null when none is stored */
  opensAtMs: number | null
}

/** True when an hour in this state can carry the work. */
export function workable(state: PlanningHourState | null | undefined, requiresClear: boolean): boolean {
  return state === 'clear' || (state === 'tight' && !requiresClear)
}

/**
 * @example openSpan([{ startMs: 0, state: 'clear' }, { startMs: 3_600_000, state: 'closed' }], 600_000, true)
 *   // -> { stateNow: 'clear', openNow: true, closesAtMs: 3_600_000, opensAtMs: null }
 */
export function openSpan(hours: readonly PlanningHour[], atMs: number, requiresClear: boolean): OpenSpan {
  const byStart = new Map(hours.map((h) => [h.startMs, h.state]))
  const first = floorHour(atMs)
  const stateNow = byStart.get(first) ?? null
  const last = Math.max(first, ...hours.map((h) => h.startMs))
  if (workable(stateNow, requiresClear)) {
    let t = first + HOUR_MS
    while (t <= last && workable(byStart.get(t), requiresClear)) t += HOUR_MS
    return { stateNow, openNow: true, closesAtMs: t, opensAtMs: null }
  }
  for (let t = first + HOUR_MS; t <= last; t += HOUR_MS) {
    if (workable(byStart.get(t), requiresClear)) return { stateNow, openNow: false, closesAtMs: null, opensAtMs: t }
  }
  return { stateNow, openNow: false, closesAtMs: null, opensAtMs: null }
}
