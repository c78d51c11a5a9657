/**
 * Days and hours in a farm's own time zone (IANA name), with daylight-saving days that
 * have 23 or 25 hours. Forecast hours are UTC clock hours; a local day holds the hours
 * whose start falls between its local midnights.
 */
import { DateTime } from 'luxon'
import { HOUR_MS, localDayHours } from '@shared/planning'

export { HOUR_MS }

/** One forecast hour as placed in a local day. */
export interface LocalHour {
  /** UTC start, ms */
  startMs: number
  /** UTC start, ISO 8601 with Z */
  iso: string
  /** local wall-clock hour 0..23 of the start (the column it sits in) */
  slot: number
  /** local start, e.g. "01:00" */
  label: string
  /** the second 01:00 of a day when clocks go back (shown with the offset) */
  repeat: boolean
  /** UTC offset at the start, e.g. "UTC−5" */
  offset: string
}

export interface LocalDay {
  /** local date yyyy-MM-dd */
  date: string
  /** e.g. "Mon 7 Dec" */
  label: string
  /** 23, 24 or 25 (or other counts in zones with unusual shifts) */
  hours: LocalHour[]
  /** local wall-clock hours 0..23 that do not exist on this day (clocks go forward) */
  skippedSlots: number[]
}

/**
 * A UTC offset in minutes as people read it.
 * @example offsetLabel(-300) // -> 'UTC−5'
 * @example offsetLabel(330) // -> 'UTC+5:30'
 */
export function offsetLabel(minutes: number): string {
  if (minutes === 0) return 'UTC'
  const sign = minutes < 0 ? '−' : '+'
  const abs = Math.abs(minutes)
  const h = Math.floor(abs / 60)
  const m = abs % 60
  return `UTC${sign}${h}${m ? ':' + String(m).padStart(2, '0') : ''}`
}

/** Today's local date (yyyy-MM-dd) at a farm. */
export function farmToday(zone: string, nowMs: number = Date.now()): string {
  return DateTime.fromMillis(nowMs, { zone }).toISODate() ?? DateTime.utc().toISODate()!
}

/** Adds days to a local date (yyyy-MM-dd). */
export function addDays(date: string, days: number): string {
  return DateTime.fromISO(date, { zone: 'UTC' }).plus({ days }).toISODate()!
}

/** UTC ms of local midnight starting `date` in `zone`. */
export function localMidnightMs(date: string, zone: string): number {
  return DateTime.fromISO(date, { zone }).startOf('day').toMillis()
}

/**
 * The local days from `startDate` in `zone`, each with its forecast hours.
 * @example localDays('2026-11-01', 'America/Chicago', 1)[0].hours.length // -> 25
 */
export function localDays(startDate: string, zone: string, count = 7): LocalDay[] {
  const days: LocalDay[] = []
  for (let d = 0; d < count; d++) {
    const date = addDays(startDate, d)
    const start = DateTime.fromISO(date, { zone }).startOf('day')
    const hours: LocalHour[] = []
    const seen = new Set<number>()
    for (const t of localDayHours(date, zone)) {
      const local = DateTime.fromMillis(t, { zone })
      const slot = local.hour
      const repeat = seen.has(slot)
      seen.add(slot)
      hours.push({
        startMs: t,
        iso: new Date(t).toISOString(),
        slot,
        label: local.toFormat('HH:mm'),
        repeat,
        offset: offsetLabel(local.offset),
      })
    }
    const skippedSlots: number[] = []
    for (let s = 0; s < 24; s++) if (!seen.has(s)) skippedSlots.push(s)
    days.push({ date, label: start.toFormat('ccc d LLL'), hours, skippedSlots })
  }
  return days
}

/** A UTC instant shown at the farm, e.g. "Tue 8 Dec 14:00". */
export function formatFarmTime(iso: string | number, zone: string, format = 'ccc d LLL HH:mm'): string {
  const dt = typeof iso === 'number' ? DateTime.fromMillis(iso, { zone }) : DateTime.fromISO(iso, { zone })
  return dt.isValid ? dt.toFormat(format) : '—'
}

/** A span at the farm: "Tue 8 Dec 06:00–14:00" or across midnight "Tue 8 Dec 22:00 – Wed 9 Dec 04:00". */
export function formatFarmSpan(startIso: string, endIso: string, zone: string): string {
  const a = DateTime.fromISO(startIso, { zone })
  const b = DateTime.fromISO(endIso, { zone })
  if (!a.isValid || !b.isValid) return '—'
  if (a.hasSame(b, 'day')) return `${a.toFormat('ccc d LLL HH:mm')}–${b.toFormat('HH:mm')}`
  if (b.toMillis() === a.plus({ days: 1 }).startOf('day').toMillis()) return `${a.toFormat('ccc d LLL HH:mm')}–24:00`
  return `${a.toFormat('ccc d LLL HH:mm')} – ${b.toFormat('ccc d LLL HH:mm')}`
}

/** Parses a local date and time at a farm ("2026-12-08", "06:30") to a UTC ISO string. */
export function farmLocalToUtcIso(date: string, time: string, zone: string): string | null {
  const dt = DateTime.fromISO(`${date}T${time}`, { zone })
  return dt.isValid ? dt.toUTC().toISO({ suppressMilliseconds: true }) : null
}

/** Splits a UTC ISO instant into the farm's local date and time ("HH:mm"). */
export function utcToFarmLocal(iso: string, zone: string): { date: string; time: string } {
  const dt = DateTime.fromISO(iso, { zone })
  return { date: dt.toISODate() ?? '', time: dt.toFormat('HH:mm') }
}

/** Monday (yyyy-MM-dd) of the local week holding `date`. */
export function mondayOf(date: string): string {
  return DateTime.fromISO(date, { zone: 'UTC' }).startOf('week').toISODate()!
}
