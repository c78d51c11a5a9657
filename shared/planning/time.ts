/**
 * Farm-local time for planning: hours are stored per UTC hour, people read them in the
 * farm's IANA time zone. Daylight-saving days have 23 or 25 local hours; a local day is
 * therefore a list of UTC hour starts, never "24 rows". Time zone rules come from the
 * IANA tz database through luxon (Intl).
 */
import { DateTime } from 'luxon'

export const HOUR_MS = 3_600_000
export const MINUTE_MS = 60_000

/** A half-open span of UTC time [startMs, endMs). */
export interface TimeSpan {
  startMs: number
  endMs: number
}

export const overlaps = (a: TimeSpan, b: TimeSpan): boolean => a.startMs < b.endMs && b.startMs < a.endMs

/** The UTC hour start at or before `ms`. */
export const floorHour = (ms: number): number => Math.floor(ms / HOUR_MS) * HOUR_MS
/** The UTC hour start at or after `ms`. */
export const ceilHour = (ms: number): number => Math.ceil(ms / HOUR_MS) * HOUR_MS

/** Throws unless `zone` is an IANA zone the runtime knows. */
export function checkZone(zone: string): void {
  if (!DateTime.now().setZone(zone).isValid) throw new Error(`Unknown time zone: ${zone}`)
}

/**
 * 'YYYY-MM-DD HH:mm' in the farm's zone.
 * @example localStamp(Date.UTC(2026, 11, 3, 14), 'America/Chicago') // -> '2026-12-03 08:00'
 */
export function localStamp(ms: number, zone: string): string {
  return DateTime.fromMillis(ms, { zone }).toFormat('yyyy-MM-dd HH:mm')
}

/**
 * A short local label with the zone's abbreviation, so the repeated hour of a
 * fall-back night stays unambiguous.
 * @example localLabel(Date.UTC(2026, 10, 1, 6), 'America/Chicago') // -> 'Sun 1 Nov 01:00 CDT'
 */
export function localLabel(ms: number, zone: string): string {
  return DateTime.fromMillis(ms, { zone }).setLocale('en-US').toFormat('ccc d LLL HH:mm ZZZZ')
}

/** The calendar date (YYYY-MM-DD) of an instant in the farm's zone. */
export function localDate(ms: number, zone: string): string {
  return DateTime.fromMillis(ms, { zone }).toISODate()!
}

/**
 * The UTC hour starts of one local calendar day, in order: 24 on most days, 23 on the
 * spring-forward day and 25 on the fall-back day.
 * @example localDayHours('2026-11-01', 'America/Chicago').length // -> 25
 */
export function localDayHours(date: string, zone: string): number[] {
  const start = DateTime.fromISO(date, { zone }).startOf('day')
  if (!start.isValid) throw new Error(`Not a date in ${zone}: ${date}`)
  const end = start.plus({ days: 1 })
  const out: number[] = []
  // Local midnight is a whole UTC hour in every zone whose offset is whole hours; for
  // half-hour zones the grid follows the stored UTC hours that start within the day.
  for (let ms = ceilHour(start.toMillis()); ms < end.toMillis(); ms += HOUR_MS) out.push(ms)
  return out
}

/**
 * The coming planning week: from the next full UTC hour to local midnight seven calendar
 * days after today's date in the farm's zone (so 7 local days, DST days included).
 */
export function comingWeek(nowMs: number, zone: string): TimeSpan {
  const endLocal = DateTime.fromMillis(nowMs, { zone }).startOf('day').plus({ days: 7 })
  return { startMs: ceilHour(nowMs), endMs: endLocal.toMillis() }
}
