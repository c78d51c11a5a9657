import { describe, expect, it } from 'vitest'
import { findWindows, isNightHour, localDayHours, type PlanningHour } from '../../../shared/planning/index.ts'

const H = 3_600_000
const zone = 'America/Chicago'
const t0 = Date.UTC(2026, 11, 3, 14) // Thu 3 Dec 08:00 CST

/** C = clear, T = tight, X = closed, . = no stored hour */
function hours(states: string, start = t0): PlanningHour[] {
  const out: PlanningHour[] = []
  ;[...states].forEach((c, i) => {
    if (c !== '.') out.push({ startMs: start + i * H, state: c === 'C' ? 'clear' : c === 'T' ? 'tight' : 'closed' })
  })
  return out
}

const base = (states: string, more: Partial<Parameters<typeof findWindows>[0]> = {}) =>
  findWindows({ hours: hours(states), durationMin: 180, fromMs: t0, toMs: t0 + states.length * H, timeZone: zone, ...more })

describe('findWindows', () => {
  it('ranks all-Clear windows first, then fewest Tight hours, then earliest', () => {
    //            0123456789012345
    const got = base('CCTCXTTTXCCCXCCC', { limit: 5 })
    expect(got.map((w) => [(w.startMs - t0) / H, w.clearHours, w.tightHours])).toEqual([
      [9, 3, 0],
      [13, 3, 0],
      [0, 2, 1],
      [5, 0, 3],
    ])
    expect(got[0].score).toBe(1)
    expect(got[2].score).toBeCloseTo(2 / 3, 3)
    expect(got[3].score).toBe(0)
  })

  it('never puts a Closed or unknown hour inside a window', () => {
    const got = base('CCXCC.CCCC', { limit: 10 })
    expect(got.map((w) => (w.startMs - t0) / H)).toEqual([6])
    expect(base('CCXCCXCC')).toEqual([])
  })

  it('proposes windows that do not overlap one another', () => {
    const got = base('CCCCCCCCC', { limit: 5 })
    expect(got.map((w) => (w.startMs - t0) / H)).toEqual([0, 3, 6])
  })

  it('leaves out the spans the machine is booked', () => {
    const got = base('CCCCCCCCC', { busy: [{ startMs: t0 + 2 * H, endMs: t0 + 3.5 * H }] })
    // Windows may start at 4 (ends at 7) and later; 0 and 1 overlap the booking.
    expect(got.map((w) => (w.startMs - t0) / H)).toEqual([4])
    // A booking ending exactly at a window's start does not clash (half-open spans).
    const edge = base('CCCCCC', { busy: [{ startMs: t0 - 2 * H, endMs: t0 }] })
    expect(edge.map((w) => (w.startMs - t0) / H)).toEqual([0, 3])
  })

  it('handles durations that end inside an hour', () => {
    // 100 minutes touch 2 hours; the window ends 1 h 40 min after its start.
    const got = findWindows({ hours: hours('CXCC'), durationMin: 100, fromMs: t0, toMs: t0 + 4 * H, timeZone: zone })
    expect(got).toHaveLength(1)
    expect(got[0]).toMatchObject({ startMs: t0 + 2 * H, endMs: t0 + 2 * H + 100 * 60_000, clearHours: 2, localStart: '2026-12-03 10:00', localEnd: '2026-12-03 11:40' })
  })

  it('keeps to the search span', () => {
    const got = findWindows({ hours: hours('CCCCCC'), durationMin: 120, fromMs: t0 + 1 * H, toMs: t0 + 4 * H, timeZone: zone })
    expect(got.map((w) => (w.startMs - t0) / H)).toEqual([1])
  })

  it('demands Clear hours on request', () => {
    const got = base('CTCCCC', { requireClear: true })
    expect(got.map((w) => [(w.startMs - t0) / H, w.tightHours])).toEqual([[2, 0]])
  })

  it('leaves out night hours unless they are allowed', () => {
    const field = { latDeg: 42.0, lonDeg: -93.5 }
    const start = Date.UTC(2026, 11, 3, 6) // Thu 3 Dec 00:00 CST
    const all = hours('C'.repeat(48), start)
    const dayOnly = findWindows({ hours: all, durationMin: 240, fromMs: start, toMs: start + 48 * H, timeZone: zone, excludeNightAt: field, limit: 10 })
    expect(dayOnly.length).toBeGreaterThan(0)
    for (const w of dayOnly) {
      for (let h = w.startMs; h < w.endMs; h += H) expect(isNightHour(h, field)).toBe(false)
      // daylight in early December there is roughly 07:20 to 16:40 local time (value from memory)
      const hourLocal = Number(w.localStart.slice(11, 13))
      expect(hourLocal).toBeGreaterThanOrEqual(7)
      expect(hourLocal + 4).toBeLessThanOrEqual(17)
    }
    const withNight = findWindows({ hours: all, durationMin: 240, fromMs: start, toMs: start + 48 * H, timeZone: zone, limit: 10 })
    expect(withNight[0].localStart).toBe('2026-12-03 00:00')
    expect(withNight.length).toBe(10)
    // A 14-hour job has no daylit window in December.
    expect(findWindows({ hours: all, durationMin: 14 * 60, fromMs: start, toMs: start + 48 * H, timeZone: zone, excludeNightAt: field })).toEqual([])
  })

  describe('across daylight-saving changes (America/Chicago)', () => {
    it('fits a whole 25-hour local day on 1 Nov 2026', () => {
      const day = localDayHours('2026-11-01', zone)
      const states = day.map((startMs) => ({ startMs, state: 'clear' as const }))
      const whole = findWindows({ hours: states, durationMin: 25 * 60, fromMs: day[0], toMs: day[0] + 25 * H, timeZone: zone })
      expect(whole).toHaveLength(1)
      expect(whole[0]).toMatchObject({ localStart: '2026-11-01 00:00', localEnd: '2026-11-02 00:00', clearHours: 25 })
      // 24 hours from local midnight end at 23:00 on the wall clock.
      const day24 = findWindows({ hours: states, durationMin: 24 * 60, fromMs: day[0], toMs: day[0] + 25 * H, timeZone: zone })
      expect(day24[0]).toMatchObject({ localStart: '2026-11-01 00:00', localEnd: '2026-11-01 23:00' })
    })

    it('spans the repeated 01:00 hour as two hours of work', () => {
      const day = localDayHours('2026-11-01', zone)
      const states = day.map((startMs, i) => ({ startMs, state: (i < 4 ? 'clear' : 'closed') as 'clear' | 'closed' }))
      const got = findWindows({ hours: states, durationMin: 180, fromMs: day[0], toMs: day.at(-1)! + H, timeZone: zone, limit: 5 })
      // 00:00 CDT + 3 h = 02:00 CST; the alternative starting at 01:00 CDT overlaps it.
      expect(got.map((w) => [w.localStart, w.localEnd])).toEqual([['2026-11-01 00:00', '2026-11-01 02:00']])
    })

    it('skips the missing 02:00 hour of 8 Mar 2026', () => {
      const day = localDayHours('2026-03-08', zone)
      expect(day).toHaveLength(23)
      const states = day.map((startMs) => ({ startMs, state: 'clear' as const }))
      const got = findWindows({ hours: states, durationMin: 120, fromMs: day[1], toMs: day[1] + 2 * H, timeZone: zone })
      expect(got[0]).toMatchObject({ localStart: '2026-03-08 01:00', localEnd: '2026-03-08 04:00', clearHours: 2 })
      // The whole 23-hour day is one window of 23 hours.
      const whole = findWindows({ hours: states, durationMin: 23 * 60, fromMs: day[0], toMs: day[0] + 23 * H, timeZone: zone })
      expect(whole[0]).toMatchObject({ localStart: '2026-03-08 00:00', localEnd: '2026-03-09 00:00' })
    })
  })

  it('refuses a zero duration and an empty span', () => {
    expect(() => findWindows({ hours: [], durationMin: 0, fromMs: t0, toMs: t0 + H, timeZone: zone })).toThrow(/durationMin/)
    expect(() => findWindows({ hours: [], durationMin: 60, fromMs: t0, toMs: t0, timeZone: zone })).toThrow(/span/)
  })
})
