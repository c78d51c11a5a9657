/**
 * Night hours for the "no night hours" rule.
 *
 * Choice: an hour is a night hour when the sun's centre is below -0.833 deg altitude at
 * the middle of the hour, seen from the field's centroid. -0.833 deg is the usual
 * sunrise/sunset altitude (0.567 deg of refraction plus the sun's 0.266 deg
 * semi-diameter; the convention suncalc's own sunrise and sunset use). An hour that is
 * more than half daylight thus counts as a day hour. Sun position: suncalc (after the
 * formulas of Astronomy Answers, https://aa.quae.nl/en/reken/zonpositie.html).
 * The rule follows the sun rather than a clock so that it holds in every season and at
 * every latitude without a per-farm setting.
 */
import SunCalc from 'suncalc'
import { HOUR_MS } from './time'

export const SUN_HORIZON_DEG = -0.833

export interface GeoPoint {
  latDeg: number
  lonDeg: number
}

/** Sun altitude (deg) at `ms` seen from `point`. */
export function sunAltitudeDeg(ms: number, point: GeoPoint): number {
  return (SunCalc.getPosition(new Date(ms), point.latDeg, point.lonDeg).altitude * 180) / Math.PI
}

/**
 * True when the UTC hour starting at `hourStartMs` is a night hour at `point`.
 * @example isNightHour(Date.UTC(2026, 11, 3, 6), { latDeg: 42, lonDeg: -93 }) // -> true (00:00 CST)
 */
export function isNightHour(hourStartMs: number, point: GeoPoint): boolean {
  return sunAltitudeDeg(hourStartMs + HOUR_MS / 2, point) < SUN_HORIZON_DEG
}

export interface SunTimes {
  /** sunrise (UTC ms), null where the sun does not rise that day (polar night or day) */
  sunriseMs: number | null
  /** sunset (UTC ms), null where the sun does not set that day */
  sunsetMs: number | null
}

/**
 * Sunrise and sunset of the day whose solar noon is nearest to `ms`, seen from `point`:
 * suncalc's `getTimes`, whose sunrise and sunset are the sun's centre at -0.833 deg, the
 * same altitude as the night rule above.
 * @example sunTimes(Date.UTC(2026, 11, 5, 18), { latDeg: 42, lonDeg: -93.5 })
 *   // -> { sunriseMs: 13:28 UTC (07:28 CST), sunsetMs: 22:44 UTC (16:44 CST), to the minute }
 */
export function sunTimes(ms: number, point: GeoPoint): SunTimes {
  const times = SunCalc.getTimes(new Date(ms), point.latDeg, point.lonDeg)
  const valid = (d: Date) => (Number.isFinite(d.getTime()) ? d.getTime() : null)
  return { sunriseMs: valid(times.sunrise), sunsetMs: valid(times.sunset) }
}
