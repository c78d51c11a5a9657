import { describe, expect, it } from 'vitest'
import { estimateDurationMin } from '../../../shared/planning/index.ts'

describe('estimateDurationMin', () => {
  it('is area over rate, rounded up to 15 minutes', () => {
    expect(estimateDurationMin(120, 5)).toBe(1440) // 24 h exactly
    expect(estimateDurationMin(40, 6)).toBe(405) // 6 h 40 min -> 6 h 45 min
    expect(estimateDurationMin(6, 6)).toBe(60) // an exact hour stays an hour
    expect(estimateDurationMin(0.3, 0.1)).toBe(180) // 0.3 / 0.1 is 2.9999999999999996 in floating point
    expect(estimateDurationMin(0.7, 0.1)).toBe(420) // 6.999999999999999
  })

  it("uses the machine's rate over the work type's", () => {
    expect(estimateDurationMin(40, 6, 7.5)).toBe(330) // 5 h 20 min -> 5 h 30 min
    expect(estimateDurationMin(40, 6, null)).toBe(405)
  })

  it('is at least 15 minutes', () => {
    expect(estimateDurationMin(0, 6)).toBe(15)
    expect(estimateDurationMin(0.01, 25)).toBe(15)
  })

  it('refuses a rate of zero and a negative area', () => {
    expect(() => estimateDurationMin(10, 0)).toThrow(/rate/)
    expect(() => estimateDurationMin(-1, 5)).toThrow(/area/)
  })
})
