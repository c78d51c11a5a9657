/**
 * The cab card's sentence about a pass's window, in the farm's local time: whether it holds
 * for the whole pass, when it closes, or when it opens. The reading is openSpan's
 * (shared/planning/crew.ts): daylight hours only, unless the pass itself is planned in
 * night hours. A window that ends or starts with the daylight says so and names the
 * sunset or sunrise at the field beside the hour, so the crew sees both.
 */
import { HOUR_MS, openSpan, plannedAtNight, sunTimes, type CrewReadingHour, type GeoPoint } from '@shared/planning'
import { formatFarmTime } from '@/lib/farmTime'

export interface WindowLineInput {
  hours: readonly CrewReadingHour[]
  nowMs: number
  startMs: number
  endMs: number
  requiresClear: boolean
  /** the field's centroid (sunrise and sunset) */
  centroid: GeoPoint
  timeZone: string
}

/**
 * @example windowLine({ hours, nowMs, startMs, endMs, requiresClear: true, centroid, timeZone: 'America/Chicago' })
 *   // -> 'The window holds for the whole pass (daylight until Sat 5 Dec 17:00; sunset 16:44).'
 */
export function windowLine(input: WindowLineInput): string {
  if (input.hours.length === 0) return 'No forecast stored for this field yet.'
  const nightWork = plannedAtNight(input.hours, input.startMs, input.endMs)
  // Read the hours from now, or from the pass's start when it lies ahead.
  const fromMs = Math.max(input.nowMs, input.startMs)
  const ahead = fromMs > input.nowMs
  const s = openSpan(input.hours, fromMs, { requiresClear: input.requiresClear, nightWork })
  const t = (ms: number) => formatFarmTime(ms, input.timeZone, 'ccc d LLL HH:mm')
  /** "sunset 16:44" of the day whose solar noon is nearest to `ms`; '' where it has none. */
  const sun = (ms: number, which: 'sunrise' | 'sunset') => {
    const times = sunTimes(ms, input.centroid)
    const at = which === 'sunrise' ? times.sunriseMs : times.sunsetMs
    return at === null ? '' : `${which} ${formatFarmTime(at, input.timeZone, 'HH:mm')}`
  }

  if (s.openNow && s.closesAtMs !== null) {
    // The middle of the window's last hour names the day whose sunset ends it.
    const sunset = s.closesWithDaylight ? sun(s.closesAtMs - HOUR_MS / 2, 'sunset') : ''
    if (s.closesAtMs >= input.endMs) {
      const until = s.closesWithDaylight ? `daylight until ${t(s.closesAtMs)}${sunset && `; ${sunset}`}` : `open until ${t(s.closesAtMs)}`
      return `The window holds for the whole pass (${until}).`
    }
    const closes = s.closesWithDaylight ? `with the daylight, ${t(s.closesAtMs)}${sunset && ` (${sunset})`}` : t(s.closesAtMs)
    return `The window closes ${closes}, before the pass ends (${t(input.endMs)}).`
  }
  if (s.opensAtMs !== null) {
    const sunrise = s.opensWithDaylight ? sun(s.opensAtMs + HOUR_MS / 2, 'sunrise') : ''
    const opens = s.opensWithDaylight ? `with the daylight, ${t(s.opensAtMs)}${sunrise && ` (${sunrise})`}` : t(s.opensAtMs)
    if (s.nightNow) return `It is dark now; the window opens ${opens}.`
    return `The window is closed${ahead ? ' at the start' : ' now'}; it opens ${opens}.`
  }
  return nightWork ? 'No workable hour in the stored forecast.' : 'No workable daylight hour in the stored forecast.'
}
