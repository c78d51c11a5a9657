// The correction-quality part of the engine: WGS-84 geodesic baselines, the NOAA G-scale,
// the error model with a baseline part, and how links and storms change an hour's state.
import type { Polygon } from 'geojson'
import { describe, expect, it } from 'vitest'
import {
  applyHourCorrections,
  chooseLink,
  errorBudget,
  fieldVertices,
  forecastField,
  fromPlane,
  geodesicDistanceKm,
  gScaleOfKp,
  linkEffect,
  localPlane,
  nominalConstellation,
  type HourAggregate,
  type WorkType,
} from '@shared/precision'

describe('geodesic baseline on WGS-84', () => {
  // GeographicLib geodesic test set (C. F. F. Karney, GeodTest.dat, "Test set for geodesics",
  // doi:10.5281/zenodo.32156), rows as quoted in geographiclib-geodesic's own test file:
  // lat1, lon1, azi1, lat2, lon2, azi2, s12 (m), ... (s12 rounded here to the 10 nm a double holds)
  const geodTest: Array<[number, number, number, number, number]> = [
    [35.60777, -139.44815, -11.17491, -69.95921, 8935244.56048183],
    [55.52454, 106.05087, 77.03196, 197.18234, 4105086.17139244],
    [-21.97856, 142.59065, 41.84138, 98.56635, 8394328.89465767],
    [-50.56724, -16.30485, -33.56571, -94.97412, 6455670.51186687],
    [-19.79938, -174.47484, -11.99349, -154.35109, 2319004.86011694],
  ]
  it.each(geodTest)('GeodTest.dat: (%f, %f) to (%f, %f) is %f m', (lat1, lon1, lat2, lon2, s12) => {
    // Karney (2013) quotes round-off errors of about 15 nm for these; 1 mm is far inside that margin of our use.
    expect(geodesicDistanceKm({ latDeg: lat1, lonDeg: lon1 }, { latDeg: lat2, lonDeg: lon2 }) * 1000).toBeCloseTo(s12, 3)
  })

  it('GeographicLib documentation example: Wellington to Salamanca is 19,959,679.267 m', () => {
    // geographiclib-geodesic README ("The distance is 19959679.267 m."), the inverse problem from 41.32 S, 174.81 E to 40.96 N, 5.50 W.
    expect(geodesicDistanceKm({ latDeg: -41.32, lonDeg: 174.81 }, { latDeg: 40.96, lonDeg: -5.5 }) * 1000).toBeCloseTo(19959679.267, 3)
  })

  it('a field links to the nearest reachable base; the farthest vertex decides the range', () => {
    const plane = localPlane(41.86, -103.72)
    const at = (x: number, y: number): [number, number] => {
      const p = fromPlane(plane, x, y)
      return [p.lonDeg, p.latDeg]
    }
    const field: Polygon = { type: 'Polygon', coordinates: [[at(0, 0), at(1000, 0), at(1000, 500), at(0, 500), at(0, 0)]] }
    const centroid = { latDeg: fromPlane(plane, 500, 250).latDeg, lonDeg: fromPlane(plane, 500, 250).lonDeg }
    const near = fromPlane(plane, -3000, 250)
    const far = fromPlane(plane, 9000, 250)
    const sources = [
      { kind: 'base' as const, id: 1, name: 'west', latDeg: near.latDeg, lonDeg: near.lonDeg, radioRangeKm: 4.2 },
      { kind: 'base' as const, id: 2, name: 'east', latDeg: far.latDeg, lonDeg: far.lonDeg, radioRangeKm: 20 },
    ]
    // Derived from the local plane: the centroid is 3.5 km from the west base, the farthest vertex hypot(4000, 250) m = 4.008 km, inside its 4.2 km range.
    const auto = chooseLink(centroid, fieldVertices(field), sources)!
    expect(auto.name).toBe('west')
    expect(auto.baselineKm).toBeCloseTo(3.5, 1)
    expect(auto.farthestKm).toBeCloseTo(Math.hypot(4000, 250) / 1000, 1)
    expect(auto.reachable).toBe(true)
    // Shrink the west radio range below the farthest vertex: the east base (8.5 km) is chosen instead.
    const shrunk = chooseLink(centroid, fieldVertices(field), [{ ...sources[0], radioRangeKm: 3.9 }, sources[1]])!
    expect(shrunk).toMatchObject({ name: 'east', reachable: true })
    expect(shrunk.baselineKm).toBeCloseTo(8.5, 1)
    // An explicit choice is kept even when it is out of range (the field then warns).
    expect(chooseLink(centroid, fieldVertices(field), [{ ...sources[0], radioRangeKm: 3.9 }, sources[1]], { kind: 'base', id: 1 })).toMatchObject({ name: 'west', reachable: false })
  })

  it('a network known only by its coverage is the automatic choice only when no source with a known baseline reaches', () => {
    // The product's rule (baseline.ts; common practice, no published source): its 0 km is a
    // missing figure, not a distance, so it must not beat a base in range.
    const plane = localPlane(38.07, -97.83)
    const at = (x: number, y: number): [number, number] => {
      const p = fromPlane(plane, x, y)
      return [p.lonDeg, p.latDeg]
    }
    const field: Polygon = { type: 'Polygon', coordinates: [[at(0, 0), at(800, 0), at(800, 600), at(0, 600), at(0, 0)]] }
    const c = fromPlane(plane, 400, 300)
    const centroid = { latDeg: c.latDeg, lonDeg: c.lonDeg }
    const yard = fromPlane(plane, 400, 8300) // 8 km north of the centroid
    const mount = fromPlane(plane, 400, -5700) // 6 km south
    const base = { kind: 'base' as const, id: 1, name: 'yard', latDeg: yard.latDeg, lonDeg: yard.lonDeg, radioRangeKm: 15 }
    const coverageOnly = {
      kind: 'network' as const,
      id: 7,
      name: 'coverage only',
      coverage: [at(-50_000, -50_000), at(50_000, -50_000), at(50_000, 50_000), at(-50_000, 50_000), at(-50_000, -50_000)],
      mountPoints: [],
    }
    const vertices = fieldVertices(field)
    // The base in range wins over the coverage-only network listed first.
    const auto = chooseLink(centroid, vertices, [coverageOnly, base])!
    expect(auto).toMatchObject({ kind: 'base', name: 'yard', reachable: true, baselineKnown: true })
    expect(auto.baselineKm).toBeCloseTo(8, 1)
    // A network with a mount point nearer than the base wins by real distance (6 km < 8 km).
    const withMount = { ...coverageOnly, id: 8, name: 'with mount point', mountPoints: [{ latDeg: mount.latDeg, lonDeg: mount.lonDeg }] }
    const nearer = chooseLink(centroid, vertices, [coverageOnly, base, withMount])!
    expect(nearer).toMatchObject({ name: 'with mount point', reachable: true, baselineKnown: true })
    expect(nearer.baselineKm).toBeCloseTo(6, 1)
    // The base out of radio range: the coverage-only network is chosen, its baseline marked not known.
    const short = { ...base, radioRangeKm: 5 }
    expect(chooseLink(centroid, vertices, [short, coverageOnly])).toMatchObject({ name: 'coverage only', reachable: true, baselineKnown: false, baselineKm: 0 })
    // Nothing reaches: the nearest source with a known baseline, unreachable, so the field warns.
    const outside = { ...coverageOnly, coverage: [at(60_000, 0), at(70_000, 0), at(70_000, 10_000), at(60_000, 10_000), at(60_000, 0)] }
    expect(chooseLink(centroid, vertices, [outside, short])).toMatchObject({ name: 'yard', reachable: false, baselineKnown: true })
    expect(chooseLink(centroid, vertices, [outside])).toMatchObject({ name: 'coverage only', reachable: false, baselineKnown: false })
    expect(chooseLink(centroid, vertices, [])).toBeNull()
  })
})

describe('NOAA G-scale of the planetary K index', () => {
  // NOAA Space Weather Scales (SWPC), geomagnetic storms, Kp column:
  // G1 Kp=5, G2 Kp=6, G3 Kp=7, G4 Kp=8 including a 9-, G5 Kp=9. Thirds: n- = n - 1/3, n+ = n + 1/3 (from memory of the Kp notation).
  it.each([
    [0, 0],
    [4, 0],
    [4.33, 0],
    [4.67, 1], // 5-
    [5, 1],
    [5.33, 1], // 5+
    [6, 2],
    [6.67, 3], // 7-
    [7, 3],
    [7.33, 3], // 7+
    [8, 4],
    [8.67, 4], // 9- stays G4, as the scale says
    [9, 5],
  ])('Kp %f is G%i', (kp, g) => {
    expect(gScaleOfKp(kp)).toBe(g)
  })
  it('refuses a Kp outside 0..9', () => {
    expect(() => gScaleOfKp(9.5)).toThrow(/0 to 9/)
    expect(() => gScaleOfKp(Number.NaN)).toThrow(/0 to 9/)
  })
})

describe('error model with a baseline', () => {
  it('hand-worked case: sigma 12 mm, HDOP 1.5, VDOP 2.0, 1 ppm horizontal, 2 ppm vertical, b = 10 km', () => {
    // DESIGN.md "Beyond geometry": H95 = 2 (HDOP sigma + ppm_H b); vertical with 1.96 (ENGINE.md step 8).
    // By hand: ppm_H b = 1 mm/km x 10 km = 10 mm; H95 = 2 (1.5 x 12 mm + 10 mm) = 2 x 28 mm = 56 mm.
    //          ppm_V b = 2 mm/km x 10 km = 20 mm; V95 = 1.96 (2.0 x 12 mm + 20 mm) = 1.96 x 44 mm = 86.24 mm.
    const model = { sigmaUereM: 0.012, ppmH: 1, ppmV: 2, maxBaselineKm: 30, needsBase: true }
    const effect = linkEffect(model, { baselineKm: 10, farthestKm: 10.3, reachable: true })
    expect(effect).toEqual({ baselineHM: expect.closeTo(0.01, 12), baselineVM: expect.closeTo(0.02, 12), closedReason: null })
    const b = errorBudget({ hdop: 1.5, vdop: 2.0 }, 0.012, effect)
    expect(b.geometryH95M).toBeCloseTo(0.036, 12)
    expect(b.baselineH95M).toBeCloseTo(0.02, 12)
    expect(b.h95M).toBeCloseTo(0.056, 12)
    expect(b.geometryV95M).toBeCloseTo(0.04704, 12)
    expect(b.baselineV95M).toBeCloseTo(0.0392, 12)
    expect(b.v95M).toBeCloseTo(0.08624, 12)
  })

  it('closes RTK work past the baseline limit or out of range; leaves services without a base alone', () => {
    const rtk = { sigmaUereM: 0.012, ppmH: 1, ppmV: 1, maxBaselineKm: 30, needsBase: true }
    expect(linkEffect(rtk, { baselineKm: 29, farthestKm: 31, reachable: true }).closedReason).toBe('baseline-limit')
    expect(linkEffect(rtk, { baselineKm: 5, farthestKm: 6, reachable: false }).closedReason).toBe('out-of-range')
    expect(linkEffect(rtk, null).closedReason).toBe('no-source')
    expect(linkEffect({ ...rtk, needsBase: false, ppmH: 0, ppmV: 0 }, null)).toEqual({ baselineHM: 0, baselineVM: 0, closedReason: null })
  })
})

describe('field forecast with a baseline, a closed link and a storm', () => {
  const plane = localPlane(42.32, -93.41)
  const at = (x: number, y: number): [number, number] => {
    const p = fromPlane(plane, x, y)
    return [p.lonDeg, p.latDeg]
  }
  const field: Polygon = { type: 'Polygon', coordinates: [[at(0, 0), at(400, 0), at(400, 300), at(0, 300), at(0, 0)]] }
  const planting: WorkType = { id: 'planting', maxH95M: 0.05, maxV95M: null, minSats: 6, maxPdop: 4, requiredShare: 0.95, requireN1: true, sigmaUereM: 0.012 }
  const startMs = Date.UTC(2026, 11, 7)
  const base = { field, satellites: nominalConstellation('all'), startMs, hours: 6, stepMin: 10, sampleCount: 16, sigmaUereM: 0.012, antennaHeightM: 3.5 }

  it('adds 2 ppm_H b to every expected horizontal error and 1.96 ppm_V b to every vertical one', () => {
    const plain = forecastField({ ...base, workTypes: [planting] })
    const withBaseline = forecastField({ ...base, baselineHM: 0.005, baselineVM: 0.007, workTypes: [{ ...planting, baselineHM: 0.005 }] })
    plain.hours.forEach((h, i) => {
      const b = withBaseline.hours[i]
      expect(b.hdop).toEqual(h.hdop) // the geometry is the same
      expect(b.h95M.max! - h.h95M.max!).toBeCloseTo(2 * 0.005, 5)
      expect(b.v95M.max! - h.v95M.max!).toBeCloseTo(1.96 * 0.007, 5)
      expect(b.workTypes[0].share).toBeLessThanOrEqual(h.workTypes[0].share) // a tighter budget never opens more of the field
    })
    // Without baseline inputs the figures are the geometry-only ones (2 sigma HDOP).
    expect(plain.hours[0].h95M.max).toBeCloseTo(2 * 0.012 * plain.hours[0].hdop.max!, 5)
    expect(plain.hours[0].spaceWeather).toBeUndefined()
  })

  it('a link closure closes every hour with its reason; a G3 block caps Clear at Tight or closes, per work type', () => {
    const out = forecastField({ ...base, workTypes: [{ ...planting, closedReason: 'out-of-range' }] })
    expect(out.hours.every((h) => h.workTypes[0].state === 'closed' && h.workTypes[0].reason === 'out-of-range')).toBe(true)
    // Kp 7 (G3) over the second 3-hour block, Kp 2 before it.
    const kpBlocks = [
      { startMs, endMs: startMs + 3 * 3_600_000, kp: 2 },
      { startMs: startMs + 3 * 3_600_000, endMs: startMs + 6 * 3_600_000, kp: 7 },
    ]
    const plain = forecastField({ ...base, workTypes: [planting] })
    const tight = forecastField({ ...base, kpBlocks, workTypes: [{ ...planting, stormAction: 'tight' }] })
    const closed = forecastField({ ...base, kpBlocks, workTypes: [{ ...planting, stormAction: 'closed' }] })
    for (let i = 0; i < 6; i++) {
      const storm = i >= 3
      expect(tight.hours[i].spaceWeather).toEqual({ kpMax: storm ? 7 : 2, g: storm ? 3 : 0 })
      const geometric = plain.hours[i].workTypes[0].state
      expect(tight.hours[i].workTypes[0].state).toBe(storm && geometric === 'clear' ? 'tight' : geometric)
      expect(closed.hours[i].workTypes[0].state).toBe(storm ? 'closed' : geometric)
      if (storm) expect(closed.hours[i].workTypes[0].reason).toBe('storm')
    }
  })

  it('an hour no Kp block covers carries null space weather (not quiet)', () => {
    const hour = { startMs, workTypes: [] } as unknown as HourAggregate
    expect(applyHourCorrections(hour, [], []).spaceWeather).toBeNull()
  })
})
