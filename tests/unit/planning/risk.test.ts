import { describe, expect, it } from 'vitest'
import { coveredHours, passRisk, requiresClear, type PlanningHour } from '../../../shared/planning/index.ts'

const H = 3_600_000
const t0 = Date.UTC(2026, 11, 3, 14) // Thu 3 Dec 08:00 CST
const hours = (states: string): PlanningHour[] =>
  [...states].map((c, i) => ({ startMs: t0 + i * H, state: c === 'C' ? 'clear' : c === 'T' ? 'tight' : 'closed' }))

describe('passRisk', () => {
  it('is clear of risk when every covered hour meets the work type', () => {
    const r = passRisk({ startMs: t0, durationMin: 180, hours: hours('CCCX'), requiresClear: true, workTypeName: 'Planting', timeZone: 'America/Chicago' })
    expect(r).toMatchObject({ atRisk: false, reason: null, closedHourStarts: [], tightHourStarts: [] })
  })

  it('flags a Closed hour and names it in farm-local time', () => {
    const r = passRisk({ startMs: t0, durationMin: 180, hours: hours('CXC'), requiresClear: false, workTypeName: 'Spraying', timeZone: 'America/Chicago' })
    expect(r.atRisk).toBe(true)
    expect(r.closedHourStarts).toEqual([t0 + H])
    expect(r.reason).toBe('1 hour Closed for Spraying: Thu 3 Dec 09:00 CST.')
  })

  it('flags Tight hours only where the work type needs Clear', () => {
    const states = hours('CTT')
    const strict = passRisk({ startMs: t0, durationMin: 180, hours: states, requiresClear: true, workTypeName: 'Tile drainage', timeZone: 'America/Chicago' })
    expect(strict.atRisk).toBe(true)
    expect(strict.reason).toBe('2 hours only Tight where Tile drainage needs Clear: Thu 3 Dec 09:00 CST, Thu 3 Dec 10:00 CST.')
    const lenient = passRisk({ startMs: t0, durationMin: 180, hours: states, requiresClear: false, workTypeName: 'Spraying', timeZone: 'America/Chicago' })
    expect(lenient.atRisk).toBe(false)
    expect(lenient.tightHourStarts).toHaveLength(2)
  })

  it('counts every hour a pass touches, also partly', () => {
    // 08:30 to 10:15 touches 08, 09 and 10 o'clock.
    expect(coveredHours(t0 + 30 * 60_000, 105)).toEqual([t0, t0 + H, t0 + 2 * H])
    const r = passRisk({ startMs: t0 + 30 * 60_000, durationMin: 105, hours: hours('CCX'), requiresClear: false, workTypeName: 'Planting', timeZone: 'America/Chicago' })
    expect(r.closedHourStarts).toEqual([t0 + 2 * H])
  })

  it('does not flag hours without a forecast', () => {
    const r = passRisk({ startMs: t0 + 10 * H, durationMin: 120, hours: hours('CCC'), requiresClear: true, workTypeName: 'Planting', timeZone: 'America/Chicago' })
    expect(r.atRisk).toBe(false)
    expect(r.unknownHourStarts).toEqual([t0 + 10 * H, t0 + 11 * H])
  })

  it('tells the two 01:00 hours of the fall-back night apart', () => {
    const start = Date.UTC(2026, 10, 1, 5) // 00:00 CDT
    const states: PlanningHour[] = [
      { startMs: start, state: 'clear' },
      { startMs: start + H, state: 'closed' }, // 01:00 CDT
      { startMs: start + 2 * H, state: 'closed' }, // 01:00 CST
      { startMs: start + 3 * H, state: 'clear' },
    ]
    const r = passRisk({ startMs: start, durationMin: 240, hours: states, requiresClear: true, workTypeName: 'Planting', timeZone: 'America/Chicago' })
    expect(r.reason).toBe('2 hours Closed for Planting: Sun 1 Nov 01:00 CDT, Sun 1 Nov 01:00 CST.')
  })

  it('keeps the reason short when many hours fail', () => {
    const r = passRisk({ startMs: t0, durationMin: 600, hours: hours('XXXXXXXXXX'), requiresClear: true, workTypeName: 'Planting', timeZone: 'America/Chicago' })
    expect(r.reason).toContain('10 hours Closed')
    expect(r.reason).toContain('and 6 more')
    expect(r.reason!.length).toBeLessThanOrEqual(500)
  })

  it('asks for Clear exactly when the work type requires the N-1 margin', () => {
    expect(requiresClear({ requireN1: true })).toBe(true)
    expect(requiresClear({ requireN1: false })).toBe(false)
  })
})
