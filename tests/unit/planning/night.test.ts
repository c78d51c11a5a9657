import { describe, expect, it } from 'vitest'
import { isNightHour, sunAltitudeDeg } from '../../../shared/planning/index.ts'

// An invented field in central Iowa.
const field = { latDeg: 42.0, lonDeg: -93.5 }

describe('night hours', () => {
  it('matches the noon altitude of the December solstice', () => {
    // Noon altitude = 90 deg - latitude + solar declination; declination about -23.44 deg at
    // the December solstice (Meeus, Astronomical Algorithms, ch. 25; value from memory).
    // Solar noon at 93.5 W is near 18:14 UTC on 21 Dec 2026 (equation of time about +2 min).
    let best = -90
    for (let m = 17 * 60; m <= 19 * 60; m += 2) best = Math.max(best, sunAltitudeDeg(Date.UTC(2026, 11, 21) + m * 60_000, field))
    expect(best).toBeCloseTo(90 - 42 - 23.44, 0)
  })

  it('marks hours by the sun at their middle', () => {
    expect(isNightHour(Date.UTC(2026, 11, 3, 6), field)).toBe(true) // 00:00-01:00 CST
    expect(isNightHour(Date.UTC(2026, 11, 3, 18), field)).toBe(false) // 12:00-13:00 CST
    // Count the day hours of 21 Dec: day length at 42 N is about 9 h 10 min (value from
    // memory), so 9 or 10 hours have a daylit middle.
    let day = 0
    for (let h = 0; h < 24; h++) if (!isNightHour(Date.UTC(2026, 11, 21, 6 + h), field)) day++
    expect(day).toBeGreaterThanOrEqual(9)
    expect(day).toBeLessThanOrEqual(10)
    // In June the same place has about 15 h of daylight (value from memory).
    let june = 0
    for (let h = 0; h < 24; h++) if (!isNightHour(Date.UTC(2026, 5, 21, 5 + h), field)) june++
    expect(june).toBeGreaterThanOrEqual(15)
    expect(june).toBeLessThanOrEqual(16)
  })
})
