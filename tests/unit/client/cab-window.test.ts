// The cab card's sentence about a pass's window, in the farm's local time: daylight by
// default, with the sunset or sunrise at the field when the daylight ends or starts the
// window; night hours count for a pass that is itself planned in night hours.
import SunCalc from 'suncalc'
import { describe, expect, it } from 'vitest'
import { HOUR_MS, nightFlagged, type CrewReadingHour } from '@shared/planning'
import { windowLine, type WindowLineInput } from '@/views/cab/windowLine'

// An invented field in northern Illinois; the farm keeps Central time (CST = UTC-6 in December).
const centroid = { latDeg: 42.0, lonDeg: -87.9 }
const timeZone = 'America/Chicago'
const from = Date.UTC(2026, 11, 5, 6) // Sat 5 Dec 00:00 CST
const cst = (day: number, hour: number, minute = 0) => Date.UTC(2026, 11, day, hour + 6, minute)
/** 48 hours from Saturday 00:00 CST, Clear unless `closed` names the hour's index. */
const week = (closed: number[] = []): CrewReadingHour[] =>
  Array.from({ length: 48 }, (_, i) => ({ startMs: from + i * HOUR_MS, state: closed.includes(i) ? 'closed' : 'clear' }))
const line = (hours: CrewReadingHour[], pass: { nowMs: number; startMs: number; endMs: number }) =>
  windowLine({ ...pass, hours: nightFlagged(hours, centroid), requiresClear: true, centroid, timeZone } satisfies WindowLineInput)

// Reference for the sun times: suncalc's getTimes (sunrise and sunset at -0.833 deg,
// suncalc 1.9.0 README and its `times` table), read in the farm's zone to the minute.
const hhmm = (d: Date) => d.toLocaleTimeString('en-GB', { timeZone, hour: '2-digit', minute: '2-digit', hourCycle: 'h23' })
const sunset5 = hhmm(SunCalc.getTimes(new Date(cst(5, 12)), centroid.latDeg, centroid.lonDeg).sunset)
const sunrise6 = hhmm(SunCalc.getTimes(new Date(cst(6, 12)), centroid.latDeg, centroid.lonDeg).sunrise)

describe('the window line', () => {
  it('says a daylight pass is covered until the last daylight hour ends, with the sunset', () => {
    // Last day hour of Saturday: 15:00-16:00 CST (its middle precedes sunset, 16:30 does not).
    expect(sunset5 > '15:30' && sunset5 < '16:30').toBe(true)
    const text = line(week(), { nowMs: cst(5, 8), startMs: cst(5, 9), endMs: cst(5, 11) })
    expect(text).toBe(`The window holds for the whole pass (daylight until Sat 5 Dec 16:00; sunset ${sunset5}).`)
  })

  it('says when the forecast closes the window before the daylight does', () => {
    const text = line(week([13]), { nowMs: cst(5, 8), startMs: cst(5, 11), endMs: cst(5, 14) })
    expect(text).toBe('The window closes Sat 5 Dec 13:00, before the pass ends (Sat 5 Dec 14:00).')
  })

  it('at night says it is dark and that the window opens with the daylight, with the sunrise', () => {
    // A pass done in the afternoon, read in the evening.
    expect(sunrise6 > '06:30' && sunrise6 < '07:30').toBe(true)
    const text = line(week(), { nowMs: cst(5, 20), startMs: cst(5, 9), endMs: cst(5, 11) })
    expect(text).toBe(`It is dark now; the window opens with the daylight, Sun 6 Dec 07:00 (sunrise ${sunrise6}).`)
    // A pass ahead whose first hour is Closed by the forecast opens by the forecast.
    expect(line(week([33]), { nowMs: cst(5, 20), startMs: cst(6, 9), endMs: cst(6, 11) })).toBe(
      'The window is closed at the start; it opens Sun 6 Dec 10:00.',
    )
  })

  it('counts night hours for a pass planned after dark', () => {
    // 17:00-19:00 CST Saturday is after sunset: the night hours carry it, up to the Closed hour.
    const text = line(week([21]), { nowMs: cst(5, 12), startMs: cst(5, 17), endMs: cst(5, 19) })
    expect(text).toBe('The window holds for the whole pass (open until Sat 5 Dec 21:00).')
  })

  it('reads a week kept by an older page (no night flags) with the daylight rule', () => {
    const kept = week().map(({ startMs, state }) => ({ startMs, state }))
    expect(kept.every((h) => !('night' in h))).toBe(true)
    expect(line(kept, { nowMs: cst(5, 8), startMs: cst(5, 9), endMs: cst(5, 11) })).toContain('daylight until Sat 5 Dec 16:00')
  })
})
