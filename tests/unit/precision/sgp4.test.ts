import { sgp4 } from 'satellite.js'
import { describe, expect, it } from 'vitest'
import { gmstRad, parseOrbitFile, satellitePositions, satrecOf, temeToEcef, type Sgp4Orbit } from '@shared/precision'

// Vallado, Crawford, Hujsak, Kelso, "Revisiting Spacetrack Report #3", AIAA 2006-6753:
// test file SGP4-VER.TLE and its published output tcppver.out (r_TEME in km).
const VER_TLE = `1 00005U 58002B   00179.78495062  .00000023  00000-0  28098-4 0  4753
2 00005  34.2682 348.7242 1859667 331.7664  19.3264 10.82419157413667
1 28129U 03058A   06175.57071136 -.00000104  00000-0  10000-3 0   459
2 28129  54.7298 324.8098 0048506 266.2640  93.1663  2.00562768 18443
`
const PUBLISHED: Record<string, Array<[number, [number, number, number]]>> = {
  '5': [
    [0, [7022.46529266, -1400.08296755, 0.03995155]],
    [360, [-7154.03120202, -3783.17682504, -3536.19412294]],
  ],
  '28129': [
    [0, [21707.46412351, -15318.6175239, 0.13551152]],
    [1440, [22002.20074562, -14879.72595593, 774.32827099]],
  ],
}

/** UTC ms of a TLE epoch (two-digit year, day of year with fraction). */
function tleEpochMs(yy: number, doy: number): number {
  const year = yy < 57 ? 2000 + yy : 1900 + yy
  return Date.UTC(year, 0, 1) + (doy - 1) * 86_400_000
}

describe('TLE reading and SGP4 against the published verification vectors', () => {
  const parsed = parseOrbitFile(VER_TLE)

  it('reads both verification element sets without errors', () => {
    expect(parsed.format).toBe('tle')
    expect(parsed.errors).toEqual([])
    expect(parsed.satellites.map((s) => s.id)).toEqual(['5', '28129'])
  })

  it('reproduces r_TEME at the published times to 1e-6 km (AIAA 2006-6753, tcppver.out)', () => {
    for (const sat of parsed.satellites) {
      const rec = satrecOf(sat.orbit as Sgp4Orbit)
      for (const [tMin, r] of PUBLISHED[sat.id]) {
        const pv = sgp4(rec, tMin)
        expect(pv).toBeTruthy()
        if (!pv) continue
        expect(Math.abs(pv.position.x - r[0])).toBeLessThan(1e-6)
        expect(Math.abs(pv.position.y - r[1])).toBeLessThan(1e-6)
        expect(Math.abs(pv.position.z - r[2])).toBeLessThan(1e-6)
      }
    }
  })

  it('handles the epochs: earth-fixed positions at epoch + t rotate back to the published TEME vectors', () => {
    // Epochs from the TLEs: 2000 day 179.78495062 and 2006 day 175.57071136. Epoch
    // instants are rounded to the millisecond (< 8 m along track at 7.5 km/s), hence 0.01 km.
    const epochs: Record<string, number> = { '5': tleEpochMs(0, 179.78495062), '28129': tleEpochMs(6, 175.57071136) }
    parsed.satellites.forEach((sat) => {
      for (const [tMin, r] of PUBLISHED[sat.id]) {
        const t = Math.round(epochs[sat.id] + tMin * 60_000)
        const ecef = satellitePositions([sat], [t])
        const g = gmstRad(t)
        // Inverse of R3(GMST): r_TEME = R3(-GMST) r_ECEF.
        const x = (Math.cos(g) * ecef[0] - Math.sin(g) * ecef[1]) / 1000
        const y = (Math.sin(g) * ecef[0] + Math.cos(g) * ecef[1]) / 1000
        const z = ecef[2] / 1000
        expect(Math.hypot(x - r[0], y - r[1], z - r[2])).toBeLessThan(0.01)
      }
    })
  })

  it('recognises the second set as a GPS satellite when told so, and by its name in a 3LE', () => {
    expect(parseOrbitFile(VER_TLE, { system: 'GPS' }).satellites.every((s) => s.system === 'GPS')).toBe(true)
    const threeLine = `GPS BIIR-10 (PRN 22)\n${VER_TLE.split('\n').slice(2, 4).join('\n')}\n`
    const r = parseOrbitFile(threeLine)
    expect(r.satellites[0]).toMatchObject({ id: '28129', system: 'GPS', name: 'GPS BIIR-10 (PRN 22)' })
    // Without a name or choice, the constellation is unknown: kept as Other and reported.
    expect(parsed.satellites[1].system).toBe('Other')
    expect(parsed.notes.length).toBe(2)
  })
})

describe('TEME -> earth-fixed', () => {
  it('matches Vallado, Fundamentals of Astrodynamics, Example 3-15 (GMST rotation only)', () => {
    // UTC 2004-04-06 07:51:28.386009, r_TEME = (5094.18016210, 6127.64465950, 6380.34453270) km
    // -> r_PEF = (-1033.47503120, 7901.30558560, 6380.34453270) km. The example's
    // UT1 - UTC = -0.4399619 s (from memory) is applied so that GMST is taken at UT1.
    const utcMs = Date.UTC(2004, 3, 6, 7, 51, 28) + 386.009
    const ut1Ms = utcMs - 439.9619
    const r = temeToEcef([5094.1801621, 6127.6446595, 6380.3445327], ut1Ms)
    const published = [-1033.4750312, 7901.3055856, 6380.3445327]
    // 1 m: the example's GMST and the IAU-82 expression agree to about 1e-7 rad here.
    for (let i = 0; i < 3; i++) expect(Math.abs(r[i] - published[i])).toBeLessThan(1e-3)
  })
})

describe('the two SGP4 propagators', () => {
  it('the bulk WASM propagator and the JavaScript loop give the same positions (1 mm)', async () => {
    // Both are satellite.js implementations of the same SGP4 (AIAA 2006-6753); the
    // engine may use either, so they must agree.
    const { createSingleThreadRuntime } = await import('satellite.js')
    const { readFileSync } = await import('node:fs')
    const text = readFileSync(new URL('../../fixtures/precision/orbits/gps-sample.tle', import.meta.url), 'utf8')
    const sats = parseOrbitFile(text).satellites
    const epochs = Array.from({ length: 50 }, (_, i) => Date.UTC(2026, 11, 2) + i * 1_800_000)
    const js = satellitePositions(sats, epochs)
    const bulk = satellitePositions(sats, epochs, { bulkRuntime: await createSingleThreadRuntime() })
    let max = 0
    for (let i = 0; i < js.length; i++) max = Math.max(max, Math.abs(js[i] - bulk[i]))
    expect(js.length).toBe(24 * 50 * 3)
    expect(max).toBeLessThan(1e-3)
  })
})
