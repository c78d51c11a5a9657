/**
 * Time scales: UTC (epoch milliseconds), GPS time, Greenwich mean sidereal time.
 *
 * Sources:
 * - GPS time runs ahead of UTC by the leap seconds inserted since 1980-01-06
 *   (18 s since 2017-01-01). The table of insertion dates is that of IERS Bulletin C
 *   (from memory; it has not changed since 2017).
 * - GMST: the IAU-82 expression used by SGP4 (Vallado, Fundamentals of Astrodynamics,
 *   eq. 3-45), taken from satellite.js `gstime`. UT1 - UTC (< 0.9 s) is ignored.
 */
import { gstime } from 'satellite.js'
import { WEEK_S } from './constants'

/** GPS time origin, 1980-01-06T00:00:00 (UTC and GPS time coincided then). */
export const GPS_EPOCH_MS = Date.UTC(1980, 0, 6)

/** UTC instants (ms) from which GPS - UTC took the value given (s). */
const LEAP_TABLE: ReadonlyArray<readonly [number, number]> = [
  [Date.UTC(1981, 6, 1), 1],
  [Date.UTC(1982, 6, 1), 2],
  [Date.UTC(1983, 6, 1), 3],
  [Date.UTC(1985, 6, 1), 4],
  [Date.UTC(1988, 0, 1), 5],
  [Date.UTC(1990, 0, 1), 6],
  [Date.UTC(1991, 0, 1), 7],
  [Date.UTC(1992, 6, 1), 8],
  [Date.UTC(1993, 6, 1), 9],
  [Date.UTC(1994, 6, 1), 10],
  [Date.UTC(1996, 0, 1), 11],
  [Date.UTC(1997, 6, 1), 12],
  [Date.UTC(1999, 0, 1), 13],
  [Date.UTC(2006, 0, 1), 14],
  [Date.UTC(2009, 0, 1), 15],
  [Date.UTC(2012, 6, 1), 16],
  [Date.UTC(2015, 6, 1), 17],
  [Date.UTC(2017, 0, 1), 18],
]

/** GPS - UTC in seconds at a UTC instant. */
export function gpsMinusUtcS(utcMs: number): number {
  let s = 0
  for (const [from, value] of LEAP_TABLE) if (utcMs >= from) s = value
  return s
}

/** Seconds of GPS time since the GPS origin at a UTC instant. */
export function utcMsToGpsSeconds(utcMs: number): number {
  return (utcMs - GPS_EPOCH_MS) / 1000 + gpsMinusUtcS(utcMs)
}

/** UTC instant (ms) of a GPS time given as seconds since the GPS origin. */
export function gpsSecondsToUtcMs(gpsS: number): number {
  const approx = GPS_EPOCH_MS + gpsS * 1000
  // The offset is evaluated at the UTC instant itself (two passes settle it).
  let utc = approx - gpsMinusUtcS(approx) * 1000
  utc = approx - gpsMinusUtcS(utc) * 1000
  return utc
}

/**
 * Resolves a GPS week number broadcast modulo 1024 to the full week whose
 * (week, seconds-of-week) instant lies nearest a UTC instant.
 */
export function resolveGpsWeek(weekMod1024: number, secondsOfWeek: number, nearUtcMs: number): number {
  const near = utcMsToGpsSeconds(nearUtcMs)
  const base = weekMod1024 % 1024
  let best = base
  let bestDiff = Infinity
  const k0 = Math.floor((near / WEEK_S - base) / 1024)
  for (let k = k0 - 1; k <= k0 + 2; k++) {
    if (k < 0) continue
    const w = base + 1024 * k
    const diff = Math.abs(w * WEEK_S + secondsOfWeek - near)
    if (diff < bestDiff) {
      bestDiff = diff
      best = w
    }
  }
  return best
}

/** Greenwich mean sidereal time (rad, [0, 2 pi)) at a UTC instant (ms). */
export function gmstRad(utcMs: number): number {
  return gstime(utcMs / 86_400_000 + 2440587.5)
}

/** 'MM-DD' of a UTC instant. */
export function monthDayUtc(utcMs: number): string {
  const d = new Date(utcMs)
  const m = d.getUTCMonth() + 1
  const day = d.getUTCDate()
  return `${m < 10 ? '0' : ''}${m}-${day < 10 ? '0' : ''}${day}`
}
