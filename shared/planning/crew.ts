/**
 * The cab view's reading of a field's hours for one work type: is the current hour good
 * enough, and until when does the window stay open (or when does it open next).
 *
 * Rules
 * - Forecast (the product design's hour states): an hour can carry the work when it is
 *   Clear, or Tight for work that does not need Clear hours; an hour without a stored
 *   forecast cannot (nothing is known about it).
 * - Daylight by default, as the window finder's day-only default and the at-risk
 *   suggestion: a night hour (night.ts: the sun's centre below -0.833 deg at the middle of
 *   the hour, at the field's centroid) is not workable. The one exception is a pass that is
 *   itself planned in the dark: when an hour it covers is a night hour, the crew is set to
 *   work with lights, so night hours count like day hours and only the forecast decides.
 * - A window is a run of consecutive workable hours; it closes at the end of its last hour.
 *   When it ends because the next hour is a night hour it closes with the daylight, at the
 *   end of the last hour whose middle is in daylight: within half an hour of sunset, as
 *   hours count whole (as in the window finder). Likewise a window that opens on the first
 *   day hour after a night hour opens with the daylight, within half an hour of sunrise.
 *   The card names the sunset or sunrise beside that hour, so the crew sees both.
 * - Night flags come with the hours from the server. An hour without one (a week kept on
 *   the device by an older version of the page) gets it from the same rule: `nightFlagged`.
 * Pure: the current time is passed in.
 */
import { isNightHour, type GeoPoint } from './night'
import { HOUR_MS, floorHour } from './time'
import type { PlanningHour, PlanningHourState } from './windows'

/** A stored hour as the cab reads it; `night` missing counts as a day hour. */
export interface CrewReadingHour extends PlanningHour {
  night?: boolean
}

export interface OpenSpanRule {
  /** the work type needs Clear hours (Tight ones do not carry it) */
  requiresClear: boolean
  /** night hours count like day hours (the pass is planned in night hours) */
  nightWork?: boolean
}

export interface OpenSpan {
  /** state of the hour that contains `atMs`; null when no forecast is stored for it */
  stateNow: PlanningHourState | null
  /** the hour containing `atMs` is a night hour, and night hours do not count */
  nightNow: boolean
  /** the hour containing `atMs` is workable */
  openNow: boolean
  /** end (UTC ms) of the workable run that contains `atMs`; null when not open now */
  closesAtMs: number | null
  /** the run ends because the night begins (the next hour is a night hour) */
  closesWithDaylight: boolean
  /** start (UTC ms) of the next workable hour when not open now; null when none is stored */
  opensAtMs: number | null
  /** that hour is the first day hour after a night hour */
  opensWithDaylight: boolean
}

/** True when an hour in this state can carry the work. */
export function workable(state: PlanningHourState | null | undefined, requiresClear: boolean): boolean {
  return state === 'clear' || (state === 'tight' && !requiresClear)
}

/**
 * @example openSpan([{ startMs: 0, state: 'clear', night: false }, { startMs: 3_600_000, state: 'clear', night: true }],
 *   600_000, { requiresClear: true })
 *   // -> { stateNow: 'clear', nightNow: false, openNow: true, closesAtMs: 3_600_000, closesWithDaylight: true,
 *   //      opensAtMs: null, opensWithDaylight: false }
 */
export function openSpan(hours: readonly CrewReadingHour[], atMs: number, rule: OpenSpanRule): OpenSpan {
  const byStart = new Map(hours.map((h) => [h.startMs, h]))
  const dark = (t: number) => !rule.nightWork && byStart.get(t)?.night === true
  const ok = (t: number) => workable(byStart.get(t)?.state, rule.requiresClear) && !dark(t)
  const first = floorHour(atMs)
  const now = { stateNow: byStart.get(first)?.state ?? null, nightNow: dark(first) }
  const last = Math.max(first, ...hours.map((h) => h.startMs))
  if (ok(first)) {
    let t = first + HOUR_MS
    while (t <= last && ok(t)) t += HOUR_MS
    return { ...now, openNow: true, closesAtMs: t, closesWithDaylight: dark(t), opensAtMs: null, opensWithDaylight: false }
  }
  for (let t = first + HOUR_MS; t <= last; t += HOUR_MS) {
    if (ok(t)) return { ...now, openNow: false, closesAtMs: null, closesWithDaylight: false, opensAtMs: t, opensWithDaylight: dark(t - HOUR_MS) }
  }
  return { ...now, openNow: false, closesAtMs: null, closesWithDaylight: false, opensAtMs: null, opensWithDaylight: false }
}

/**
 * The hours with their night flag: kept where an hour has one, otherwise computed at
 * `point` (the field's centroid) with the night rule of night.ts.
 * @example nightFlagged([{ startMs: Date.UTC(2026, 11, 3, 6), state: 'clear' }], { latDeg: 42, lonDeg: -93 })
 *   // -> [{ startMs: ..., state: 'clear', night: true }] (00:00 CST)
 */
export function nightFlagged<H extends CrewReadingHour>(hours: readonly H[], point: GeoPoint): Array<H & { night: boolean }> {
  return hours.map((h) => ({ ...h, night: h.night ?? isNightHour(h.startMs, point) }))
}

/**
 * True when the span [startMs, endMs) touches a stored night hour: a pass planned in the
 * dark, whose reading lets night hours count (`OpenSpanRule.nightWork`).
 * @example plannedAtNight(hours, Date.UTC(2026, 11, 3, 23), Date.UTC(2026, 11, 4, 1)) // -> true in Iowa (17:00-19:00 CST)
 */
export function plannedAtNight(hours: readonly CrewReadingHour[], startMs: number, endMs: number): boolean {
  return hours.some((h) => h.night === true && h.startMs < endMs && h.startMs + HOUR_MS > startMs)
}
