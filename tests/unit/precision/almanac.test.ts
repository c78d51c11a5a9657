import { describe, expect, it } from 'vitest'
import { parseOrbitFile, satellitePositions, utcMsToGpsSeconds } from '@shared/precision'

// An invented YUMA record in the US Coast Guard Navigation Center's layout.
const YUMA = `******** Week 375 almanac for PRN-07 ********
ID:                         07
Health:                     000
Eccentricity:               0.1234550476E-001
Time of Applicability(s):  405504.0000
Orbital Inclination(rad):   0.9576352119
Rate of Right Ascen(r/s):  -0.7954617766E-008
SQRT(A)  (m 1/2):           5153.612305
Right Ascen at Week(rad):  -0.1209327579E+001
Argument of Perigee(rad):   0.812294364
Mean Anom(rad):             0.2281945348E+001
Af0(s):                    -0.1907348633E-004
Af1(s/s):                   0.0000000000E+000
week:                        375
`

/**
 * Independent almanac position for the test, written straight from IS-GPS-200
 * Table 20-IV with GPS seconds of week (t and toa in the same week), mu = 3.986005e14,
 * OmegaE = 7.2921151467e-5.
 */
function icdPosition(tSow: number): [number, number, number] {
  const mu = 3.986005e14
  const we = 7.2921151467e-5
  const e = 0.1234550476e-1
  const toa = 405504
  const i0 = 0.9576352119
  const omegaDot = -0.7954617766e-8
  const A = 5153.612305 ** 2
  const omega0 = -0.1209327579e1
  const w = 0.812294364
  const m0 = 0.2281945348e1
  let tk = tSow - toa
  if (tk > 302400) tk -= 604800
  if (tk < -302400) tk += 604800
  const n = Math.sqrt(mu / A ** 3)
  const M = m0 + n * tk
  let E = M
  for (let k = 0; k < 50; k++) E = M + e * Math.sin(E) // fixed-point iteration
  const nu = Math.atan2(Math.sqrt(1 - e * e) * Math.sin(E), Math.cos(E) - e)
  const u = nu + w
  const r = A * (1 - e * Math.cos(E))
  const Om = omega0 + (omegaDot - we) * tk - we * toa
  return [
    r * Math.cos(u) * Math.cos(Om) - r * Math.sin(u) * Math.cos(i0) * Math.sin(Om),
    r * Math.cos(u) * Math.sin(Om) + r * Math.sin(u) * Math.cos(i0) * Math.cos(Om),
    r * Math.sin(u) * Math.sin(i0),
  ]
}

describe('GPS almanac (YUMA) positions by the IS-GPS-200 algorithm', () => {
  const parsed = parseOrbitFile(YUMA)

  it('reads the record as GPS satellite G07', () => {
    expect(parsed.format).toBe('yuma')
    expect(parsed.errors).toEqual([])
    expect(parsed.satellites[0]).toMatchObject({ id: 'G07', system: 'GPS', source: 'almanac', healthy: true })
  })

  it('agrees with an independent seconds-of-week computation to 1 mm over two days', () => {
    // Week 375 modulo 1024 resolved near 2026: 375 + 2 * 1024 = GPS week 2423
    // (2026-06-14 .. 2026-06-20; GPS time = UTC + 18 s).
    const week = 2423
    const gpsOrigin = Date.UTC(1980, 0, 6)
    for (let tSow = 330_000; tSow < 500_000; tSow += 7_777) {
      const utcMs = gpsOrigin + (week * 604800 + tSow - 18) * 1000
      expect(utcMsToGpsSeconds(utcMs)).toBeCloseTo(week * 604800 + tSow, 6)
      const ours = satellitePositions(parsed.satellites, [utcMs])
      const ref = icdPosition(tSow)
      expect(Math.hypot(ours[0] - ref[0], ours[1] - ref[1], ours[2] - ref[2])).toBeLessThan(1e-3)
      // The orbit radius stays near A (e = 0.0123): a sanity check of units.
      expect(Math.abs(Math.hypot(ours[0], ours[1], ours[2]) / 26_559_700 - 1)).toBeLessThan(0.02)
    }
  })

  it('resolves the week rollover to the week nearest the requested time', () => {
    // Near 2007 the same record means week 375 + 1024 = 1399: positions repeat those
    // of week 2423 exactly 1024 weeks apart in GPS time (leap seconds differ: 14 s then).
    const sowUtcMs = (week: number, tSow: number, leap: number) => Date.UTC(1980, 0, 6) + (week * 604800 + tSow - leap) * 1000
    const a = satellitePositions(parsed.satellites, [sowUtcMs(1399, 420_000, 14)])
    const b = satellitePositions(parsed.satellites, [sowUtcMs(2423, 420_000, 18)])
    const ref = icdPosition(420_000)
    expect(Math.hypot(a[0] - ref[0], a[1] - ref[1], a[2] - ref[2])).toBeLessThan(1e-3)
    expect(Math.hypot(b[0] - ref[0], b[1] - ref[1], b[2] - ref[2])).toBeLessThan(1e-3)
  })
})
