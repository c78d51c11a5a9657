// Daylight-saving dates of America/Chicago in 2026 follow the US rule (Energy Policy Act of
// 2005: second Sunday of March, first Sunday of November, at 02:00 local), as recorded in
// the IANA tz database: 2026-03-08 and 2026-11-01.
import { describe, expect, it } from 'vitest'
import { comingWeek, localDayHours, localLabel, localStamp } from '../../../shared/planning/index.ts'

const H = 3_600_000

describe('farm-local days', () => {
  it('has 25 hours on the fall-back day and 23 on the spring-forward day', () => {
    const fall = localDayHours('2026-11-01', 'America/Chicago')
    expect(fall).toHaveLength(25)
    expect(fall[0]).toBe(Date.UTC(2026, 10, 1, 5)) // 00:00 CDT = 05:00 UTC
    expect(fall[24]).toBe(Date.UTC(2026, 10, 2, 5)) // 23:00 CST = 05:00 UTC next day
    const spring = localDayHours('2026-03-08', 'America/Chicago')
    expect(spring).toHaveLength(23)
    expect(spring[0]).toBe(Date.UTC(2026, 2, 8, 6)) // 00:00 CST
    expect(spring.at(-1)).toBe(Date.UTC(2026, 2, 9, 4)) // 23:00 CDT
    expect(localDayHours('2026-11-02', 'America/Chicago')).toHaveLength(24)
    for (const day of [fall, spring]) for (let i = 1; i < day.length; i++) expect(day[i] - day[i - 1]).toBe(H)
  })

  it('labels the repeated hour of the fall-back night with its zone abbreviation', () => {
    expect(localLabel(Date.UTC(2026, 10, 1, 6), 'America/Chicago')).toBe('Sun 1 Nov 01:00 CDT')
    expect(localLabel(Date.UTC(2026, 10, 1, 7), 'America/Chicago')).toBe('Sun 1 Nov 01:00 CST')
    expect(localStamp(Date.UTC(2026, 2, 8, 8), 'America/Chicago')).toBe('2026-03-08 03:00') // 02:00 does not exist
  })

  it('makes the coming week seven local days, whatever their length', () => {
    // Wednesday 28 Oct 2026 15:20 UTC = 10:20 CDT; the week runs to local midnight at the
    // start of 4 Nov, across the 25-hour 1 Nov.
    const now = Date.UTC(2026, 9, 28, 15, 20)
    const week = comingWeek(now, 'America/Chicago')
    expect(week.startMs).toBe(Date.UTC(2026, 9, 28, 16))
    expect(week.endMs).toBe(Date.UTC(2026, 10, 4, 6)) // 00:00 CST = 06:00 UTC
    expect(localStamp(week.endMs, 'America/Chicago')).toBe('2026-11-04 00:00')
  })
})
