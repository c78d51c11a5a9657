// The pure parts of the weekly plans: compact local ranges (daylight-saving days included),
// the schedule's run time in the farm's zone, signed opt-out tokens and the per-recipient
// placeholders of a stored revision. Time zone rules come from the IANA tz database
// (America/Chicago: CDT ends on the first Sunday of November, 1 Nov 2026, 02:00 -> 01:00).
import { describe, expect, it } from 'vitest'
import { finalizePlanBody } from '../../server/mail/planTemplate.ts'
import { compactRange, mondayOf, nextRunMs, optOutToken, readOptOutToken, scheduledRunMs, sendKey, weekLabel, weekSpan } from '../../server/services/plansCompose.ts'

const H = 3_600_000
const zone = 'America/Chicago'

describe('plan composition helpers', () => {
  it('writes Clear runs as compact farm-local ranges', () => {
    // Tue 8 Dec 2026 09:00 CST = 15:00 UTC.
    expect(compactRange(Date.UTC(2026, 11, 8, 15), Date.UTC(2026, 11, 8, 21), zone)).toBe('Tue 09:00-15:00')
    expect(compactRange(Date.UTC(2026, 11, 9, 4), Date.UTC(2026, 11, 9, 6), zone)).toBe('Tue 22:00-24:00')
    expect(compactRange(Date.UTC(2026, 11, 9, 4), Date.UTC(2026, 11, 9, 8), zone)).toBe('Tue 22:00-Wed 02:00')
    // Across the fall-back night: 00:00 CDT (05:00 UTC) to 03:00 CST (09:00 UTC) is four hours.
    expect(compactRange(Date.UTC(2026, 10, 1, 5), Date.UTC(2026, 10, 1, 9), zone)).toBe('Sun 00:00-03:00')
  })

  it('finds the Monday of a week in the farm zone and its span (a 169-hour DST week)', () => {
    // Mon 30 Nov 2026 05:30 UTC is still Sun 29 Nov 23:30 in Chicago.
    expect(mondayOf(Date.UTC(2026, 10, 30, 5, 30), zone)).toBe('2026-11-23')
    expect(mondayOf(Date.UTC(2026, 10, 30, 6, 30), zone)).toBe('2026-11-30')
    const span = weekSpan('2026-10-26', zone)
    expect((span.endMs - span.startMs) / H).toBe(169)
    expect(weekLabel('2026-11-30', zone)).toBe('Mon 30 Nov – Sun 6 Dec 2026')
  })

  it('places the automatic send at the farm-local weekday and time', () => {
    // Monday 07:00 CST of the week of 30 Nov 2026 = 13:00 UTC.
    expect(scheduledRunMs('2026-11-30', 1, '07:00', zone)).toBe(Date.UTC(2026, 10, 30, 13))
    // Friday 16:30 in Denver (MST, UTC-7).
    expect(scheduledRunMs('2026-11-30', 5, '16:30', 'America/Denver')).toBe(Date.UTC(2026, 11, 4, 23, 30))
    const now = Date.UTC(2026, 11, 2, 12) // Wednesday
    // Not sent this week yet and its time has passed: due now.
    expect(nextRunMs({ weekday: 1, localTime: '07:00', lastSentWeek: '2026-11-23' }, zone, now)).toBe(now)
    // Sent this week: next Monday.
    expect(nextRunMs({ weekday: 1, localTime: '07:00', lastSentWeek: '2026-11-30' }, zone, now)).toBe(Date.UTC(2026, 11, 7, 13))
    // Later this week.
    expect(nextRunMs({ weekday: 5, localTime: '06:00', lastSentWeek: null }, zone, now)).toBe(Date.UTC(2026, 11, 4, 12))
  })

  it('signs opt-out links for one farm and one address', () => {
    const secret = 'a'.repeat(64)
    const token = optOutToken(secret, 7, 'Grower@Example.test')
    expect(readOptOutToken(secret, token)).toEqual({ farmId: 7, email: 'grower@example.test' })
    expect(readOptOutToken('b'.repeat(64), token)).toBeNull()
    expect(readOptOutToken(secret, token.replace(/^7\./, '8.'))).toBeNull()
    const [farm, , mac] = token.split('.')
    expect(readOptOutToken(secret, `${farm}.${Buffer.from('other@example.test').toString('base64url')}.${mac}`)).toBeNull()
    expect(readOptOutToken(secret, 'not-a-token')).toBeNull()
  })

  it('keys deliveries by farm, week, revision, recipient and resend counter', () => {
    const a = sendKey(3, '2026-11-30', 2, 'a@example.test')
    expect(a).toMatch(/^plan:3:2026-11-30:r2:[0-9a-f]{32}:s0$/)
    expect(sendKey(3, '2026-11-30', 2, 'A@Example.test')).toBe(a)
    expect(sendKey(3, '2026-11-30', 3, 'a@example.test')).not.toBe(a)
    expect(sendKey(3, '2026-11-30', 2, 'a@example.test', 1)).not.toBe(a)
    expect(a.length).toBeLessThanOrEqual(200)
  })

  it('fills areas in the recipient units and the opt-out link', () => {
    const body = '<p>North (⟦ha:40⟧)</p><a href="⟦opt-out⟧">stop</a>'
    expect(finalizePlanBody(body, { units: 'metric', optOutUrl: 'https://x.test/o?token=a&b', html: true })).toBe(
      '<p>North (40 ha)</p><a href="https://x.test/o?token=a&amp;b">stop</a>',
    )
    expect(finalizePlanBody('North (⟦ha:40⟧)', { units: 'imperial', optOutUrl: '', html: false })).toBe('North (98.8 ac)')
  })
})
