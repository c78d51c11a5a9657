/**
 * The Outlook's days: the span of the shown week in UTC, which day the address asks for,
 * and how a daylight-saving day is labelled. Pure; the days come from lib/farmTime.
 */
import { HOUR_MS, type LocalDay } from './farmTime'

/**
 * From the first hour of the first day to the end of the last hour of the last day, in
 * UTC ISO form; null without days. @example daysSpan(localDays('2026-12-07', 'UTC', 7)) // -> { from: '2026-12-07T00:00:00.000Z', to: '2026-12-14T00:00:00.000Z' }
 */
export function daysSpan(days: readonly LocalDay[]): { from: string; to: string } | null {
  const first = days[0]?.hours[0]
  const lastDay = days[days.length - 1]
  const last = lastDay?.hours[lastDay.hours.length - 1]
  if (!first || !last) return null
  return { from: first.iso, to: new Date(last.startMs + HOUR_MS).toISOString() }
}

/** The wanted date when it is one of the days, else the first day's ('' without days). */
export function chosenDate(days: readonly LocalDay[], wanted: string): string {
  return days.some((d) => d.date === wanted) ? wanted : (days[0]?.date ?? '')
}

/** The note beside a day whose clocks change: 23 or 25 hours. @example hoursNote(25) // -> '25 h, clocks back' */
export function hoursNote(count: number): string | undefined {
  if (count === 23) return '23 h, clocks forward'
  if (count === 25) return '25 h, clocks back'
  return undefined
}
