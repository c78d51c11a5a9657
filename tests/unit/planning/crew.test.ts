// The cab view's reading of a field's hours: open now, until when, or when it opens.
// Rule (product design, hour states): Clear hours carry every work type, Tight hours only
// work that does not need Clear, Closed and unknown hours none.
import { describe, expect, it } from 'vitest'
import { HOUR_MS, openSpan, type PlanningHour } from '../../../shared/planning/index.ts'

const t0 = Date.UTC(2026, 11, 3, 14)
const hours = (letters: string): PlanningHour[] =>
  [...letters].map((c, i) => ({ startMs: t0 + i * HOUR_MS, state: c === 'C' ? 'clear' : c === 'T' ? 'tight' : 'closed' }))

describe('openSpan', () => {
  it('closes at the end of the last workable hour of the run that holds now', () => {
    expect(openSpan(hours('CCTX'), t0 + 10 * 60_000, true)).toEqual({ stateNow: 'clear', openNow: true, closesAtMs: t0 + 2 * HOUR_MS, opensAtMs: null })
    // Tight hours carry work that does not need Clear.
    expect(openSpan(hours('CCTX'), t0 + 10 * 60_000, false).closesAtMs).toBe(t0 + 3 * HOUR_MS)
  })

  it('says when a closed window opens next, and nothing when no hour is workable', () => {
    expect(openSpan(hours('XXTC'), t0, true)).toEqual({ stateNow: 'closed', openNow: false, closesAtMs: null, opensAtMs: t0 + 3 * HOUR_MS })
    expect(openSpan(hours('XXTC'), t0, false).opensAtMs).toBe(t0 + 2 * HOUR_MS)
    expect(openSpan(hours('XX'), t0, false)).toEqual({ stateNow: 'closed', openNow: false, closesAtMs: null, opensAtMs: null })
  })

  it('treats an hour without a stored forecast as not workable (a gap closes the window)', () => {
    const gap = hours('CCCC').filter((_, i) => i !== 2)
    expect(openSpan(gap, t0, true).closesAtMs).toBe(t0 + 2 * HOUR_MS)
    expect(openSpan(gap, t0 - HOUR_MS, true)).toMatchObject({ stateNow: null, openNow: false, opensAtMs: t0 })
  })
})
