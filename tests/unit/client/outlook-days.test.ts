// The Outlook's days (src/lib/outlookDays.ts) and forecast status (src/lib/forecastStatus.ts).
// Daylight-saving dates: in the United States clocks go back at 02:00 local time on the
// first Sunday of November (Energy Policy Act of 2005, 15 U.S.C. 260a), so 1 Nov 2026 in
// America/Chicago has 25 hours, from 05:00 UTC (CDT, UTC-5) to 06:00 UTC next day (CST, UTC-6).
import { describe, expect, it } from 'vitest'
import { localDays } from '@/lib/farmTime'
import { chosenDate, daysSpan, hoursNote } from '@/lib/outlookDays'
import { forecastStatus } from '@/lib/forecastStatus'

describe('outlook days', () => {
  const days = localDays('2026-10-31', 'America/Chicago', 3)

  it('labels the day the clocks go back with its 25 hours', () => {
    expect(days.map((d) => d.hours.length)).toEqual([24, 25, 24])
    expect(hoursNote(days[1].hours.length)).toBe('25 h, clocks back')
    expect(hoursNote(23)).toBe('23 h, clocks forward')
    expect(hoursNote(24)).toBeUndefined()
  })

  it('spans from the first local midnight to the last, in UTC', () => {
    // 31 Oct 00:00 CDT = 05:00 UTC; 3 Nov 00:00 CST = 06:00 UTC.
    expect(daysSpan(days)).toEqual({ from: '2026-10-31T05:00:00.000Z', to: '2026-11-03T06:00:00.000Z' })
    expect(daysSpan([])).toBeNull()
  })

  it('keeps a day the address names only when it is shown', () => {
    expect(chosenDate(days, '2026-11-01')).toBe('2026-11-01')
    expect(chosenDate(days, '2026-12-25')).toBe('2026-10-31')
    expect(chosenDate([], '2026-11-01')).toBe('')
  })
})

describe('forecast status', () => {
  type Shown = Parameters<typeof forecastStatus>[0][number]
  const shown = (over: Partial<Shown>): Shown => ({ pendingJob: null, stale: false, hours: [], computedAt: null, ...over }) as Shown

  it('averages the progress of queued jobs and names the oldest computation', () => {
    const status = forecastStatus([
      shown({ pendingJob: { progress: 0.2 } as Shown['pendingJob'], computedAt: '2026-12-03T08:00:00.000Z' }),
      shown({ pendingJob: { progress: 0.61 } as Shown['pendingJob'], computedAt: '2026-12-03T07:00:00.000Z' }),
    ])
    expect(status).toEqual({ recomputing: true, progressPct: 41, outOfDate: false, computedAt: '2026-12-03T07:00:00.000Z' })
  })

  it('calls stored hours out of date only when no job is queued', () => {
    const staleHours = shown({ stale: true, hours: [{}] as Shown['hours'] })
    expect(forecastStatus([staleHours]).outOfDate).toBe(true)
    expect(forecastStatus([staleHours, shown({ pendingJob: { progress: 0 } as Shown['pendingJob'] })]).outOfDate).toBe(false)
    expect(forecastStatus([])).toEqual({ recomputing: false, progressPct: 0, outOfDate: false, computedAt: null })
  })
})
