// Terrain horizon against closed forms: a cone and a straight plateau edge of known height
// and distance, where the elevation angle is atan((H - h0 - (1 - k) d^2 / (2R)) / d)
// (curvature drop d^2/2R: second-order term of R(1 - cos(d/R)); refraction by the
// effective radius R/(1 - k); R = GRS 80 mean radius R1, Moritz, J. Geodesy 74 (2000)).
// Terrain with obstructions: the product's rule, the higher of the two in each 1-degree
// direction, checked bin by bin and against the sky view, which tests each mask apart.
import type { FeatureCollection } from 'geojson'
import { describe, expect, it } from 'vitest'
import {
  combineHorizonInto,
  EARTH_MEAN_RADIUS_M,
  fieldTerrainHorizons,
  forecastField,
  fromPlane,
  localPlane,
  nominalConstellation,
  skyView,
  TERRAIN_MAX_DISTANCE_M,
  TERRAIN_REFRACTION_K,
  terrainHorizons,
  type TerrainGrid,
} from '@shared/precision'
import { TERRAIN_SETTINGS } from '@shared/schemas/terrain'

const ORIGIN = { latDeg: 47.2, lonDeg: 9.4 }
const RAD = 180 / Math.PI
const R = EARTH_MEAN_RADIUS_M

/** A square grid centred on ORIGIN, spacing cellM, half-width halfM, heights h(x east, y north). */
function grid(cellM: number, halfM: number, h: (x: number, y: number) => number): TerrainGrid {
  const n = Math.round((2 * halfM) / cellM) + 1
  const heightsM = new Float32Array(n * n)
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < n; i++) heightsM[j * n + i] = h(-halfM + i * cellM, halfM - j * cellM)
  }
  return { originLatDeg: ORIGIN.latDeg, originLonDeg: ORIGIN.lonDeg, x0M: -halfM, y0M: halfM, cellM, cols: n, rows: n, heightsM }
}

const expectedDeg = (heightAboveM: number, dM: number, k = 0) => Math.atan((heightAboveM - ((1 - k) * dM * dM) / (2 * R)) / dM) * RAD

describe('terrain horizon: closed forms', () => {
  it('a cone due north: the apex angle, with the curvature drop d^2/2R', () => {
    // Cone of height 300 m and base radius 500 m, apex 2000 m north of the point; ground 0.
    // The cone's flank (slope 0.6) is steeper than the line of sight to the apex, so the
    // apex is the highest angle: atan((300 - 2 - d^2/2R) / d), d = 2000 m.
    const g = grid(10, 3000, (x, y) => Math.max(0, 300 * (1 - Math.hypot(x, y - 2000) / 500)))
    const [mask] = [terrainHorizons(g, [ORIGIN], 2, { maxDistanceM: 5000, refractionK: 0 })]
    const want = expectedDeg(298, 2000)
    expect(mask[0]).toBeCloseTo(want, 6)
    expect(mask[359]).toBeCloseTo(want, 6) // the ray at 0 deg closes bin 359 as well
    // The curvature drop at 2 km is 0.314 m: 0.009 deg, larger than the tolerance.
    expect(Math.abs(mask[0] - Math.atan(298 / 2000) * RAD)).toBeGreaterThan(0.005)
    // Away from the cone (south) the ground is flat: nothing blocked.
    expect(mask[180]).toBe(0)
  })

  it('a straight plateau edge 8 km east, with and without refraction (k = 0.13, the default)', () => {
    // Flat ground 0 up to x = 8000 m, a plateau 200 m high beyond: a straight ridge line.
    // Square to it (azimuth 90) the angle is atan((200 - 2 - (1-k) d^2/2R) / d), d = 8000 m;
    // the drop is 5.02 m without refraction and 4.37 m with k = 0.13.
    const g = grid(20, 10_000, (x) => (x >= 8000 ? 200 : 0))
    const plain = terrainHorizons(g, [ORIGIN], 2, { maxDistanceM: 9000, refractionK: 0 })
    const refracted = terrainHorizons(g, [ORIGIN], 2, { maxDistanceM: 9000, refractionK: 0.13 })
    expect(plain[90]).toBeCloseTo(expectedDeg(198, 8000), 6)
    expect(plain[89]).toBeCloseTo(expectedDeg(198, 8000), 6) // bin [89, 90) ends at the square ray
    expect(refracted[90]).toBeCloseTo(expectedDeg(198, 8000, 0.13), 6)
    expect(refracted[90]).toBeGreaterThan(plain[90])
    // Bin [60, 61) is highest on its ray at 61 deg, 29 deg off square, where the edge is at
    // d = 8000 / cos(29 deg); off the grid nodes the edge is read within one 20 m step.
    const far = terrainHorizons(g, [ORIGIN], 2, { maxDistanceM: 10_000, refractionK: 0 })
    expect(Math.abs(far[60] - expectedDeg(198, 8000 / Math.cos(29 / RAD)))).toBeLessThan(0.01)
    // Without options: the one default k = 0.13, the same as the server's settings.
    expect(terrainHorizons(g, [ORIGIN], 2, { maxDistanceM: 9000 })).toEqual(refracted)
    expect(TERRAIN_REFRACTION_K).toBe(0.13)
    expect(TERRAIN_SETTINGS).toEqual({ maxDistanceM: TERRAIN_MAX_DISTANCE_M, refractionK: TERRAIN_REFRACTION_K })
    // Beyond the reach the plateau does not count.
    const short = terrainHorizons(g, [ORIGIN], 2, { maxDistanceM: 7000 })
    expect(short[90]).toBe(0)
  })

  it('nodata is skipped and a point off the grid has no terrain horizon', () => {
    const g = grid(10, 1000, (x) => (x >= 500 ? (x < 700 ? Number.NaN : 100) : 0))
    const [mask] = [terrainHorizons(g, [ORIGIN], 0, { maxDistanceM: 2000, refractionK: 0 })]
    expect(mask[90]).toBeCloseTo(expectedDeg(100, 700), 6)
    const plane = localPlane(ORIGIN.latDeg, ORIGIN.lonDeg)
    const far = fromPlane(plane, 5000, 0)
    const off = terrainHorizons(g, [{ latDeg: far.latDeg, lonDeg: far.lonDeg }], 0)
    expect(Math.max(...off)).toBe(0)
  })
})

describe('terrain in the forecast and the sky view', () => {
  const field: GeoJSON.Polygon = (() => {
    const plane = localPlane(ORIGIN.latDeg, ORIGIN.lonDeg)
    const c = (x: number, y: number) => {
      const p = fromPlane(plane, x, y)
      return [p.lonDeg, p.latDeg]
    }
    return { type: 'Polygon', coordinates: [[c(-100, -100), c(100, -100), c(100, 100), c(-100, 100), c(-100, -100)]] }
  })()
  // A valley wall 400 m east rising 300 m: about 36 deg of the eastern sky is hidden.
  const wall = grid(10, 3000, (x) => (x >= 400 ? 300 : 0))
  const noObstructions: FeatureCollection = { type: 'FeatureCollection', features: [] }
  const common = {
    field,
    obstructions: noObstructions,
    antennaHeightM: 3,
    satellites: nominalConstellation('all'),
    startMs: Date.UTC(2026, 11, 7),
    hours: 3,
    sigmaUereM: 0.02,
    sampleCount: 16,
  }

  it('takes the higher of terrain and obstructions in each direction', () => {
    const flat = forecastField(common)
    const valley = forecastField({ ...common, terrain: { grid: wall } })
    for (let h = 0; h < flat.hours.length; h++) {
      expect(valley.hours[h].satellites.median).toBeLessThanOrEqual(flat.hours[h].satellites.median)
    }
    expect(valley.hours.some((h, i) => h.satellites.min < flat.hours[i].satellites.min)).toBe(true)
    // Precomputed horizons of the sample points give the same hours as the grid.
    const pointHorizonsDeg = fieldTerrainHorizons({ ...common, terrain: { grid: wall } })!
    const reused = forecastField({ ...common, terrain: { grid: null, pointHorizonsDeg } })
    expect(reused.hours).toEqual(valley.hours)
  })

  it('the sky view marks satellites behind the terrain and returns the band', () => {
    const view = skyView({ point: ORIGIN, atMs: Date.UTC(2026, 11, 7, 6), satellites: nominalConstellation('all'), antennaHeightM: 3, terrain: { grid: wall } })
    expect(view.terrainHorizonDeg).not.toBeNull()
    // From the ground at 3 m: atan((300 - 3 - drop) / 400).
    expect(view.terrainHorizonDeg![90]).toBeCloseTo(expectedDeg(297, 400), 2)
    for (const s of view.satellites) {
      const bin = Math.min(359, Math.floor(s.azimuthDeg))
      if (s.elevationDeg >= 10 && s.elevationDeg < view.terrainHorizonDeg![bin]) expect(s.status).toBe('behind-terrain')
    }
    expect(view.satellites.some((s) => s.status === 'behind-terrain')).toBe(true)
  })
})

describe('terrain and obstructions together: the higher of the two in each direction', () => {
  const plane = localPlane(ORIGIN.latDeg, ORIGIN.lonDeg)
  const lonLat = (x: number, y: number) => {
    const p = fromPlane(plane, x, y)
    return [p.lonDeg, p.latDeg]
  }
  const field: GeoJSON.Polygon = { type: 'Polygon', coordinates: [[lonLat(-100, -100), lonLat(100, -100), lonLat(100, 100), lonLat(-100, 100), lonLat(-100, -100)]] }
  const line = (x: number, heightM: number) => ({
    type: 'Feature' as const,
    properties: { heightM, kind: 'structure' },
    geometry: { type: 'LineString' as const, coordinates: [lonLat(x, -150), lonLat(x, 150)] },
  })
  // West: a 25 m line 30 m off the field, where the ground is flat (obstruction only).
  // East: an 80 m line 60 m off the field, and the valley wall (300 m high from x = 400 m).
  // From the east edge (x = 100) the line is higher to the east: atan(77 / 60) = 52 deg
  // against atan(297 / 300) = 45 deg; from the west edge the wall is: atan(77 / 260) = 16 deg
  // against atan(297 / 500) = 31 deg. So both decide somewhere, in the same directions.
  const obstructions: FeatureCollection = { type: 'FeatureCollection', features: [line(-130, 25), line(160, 80)] }
  const wall = grid(10, 3000, (x) => (x >= 400 ? 300 : 0))
  const common = {
    field,
    antennaHeightM: 3,
    satellites: nominalConstellation('all'),
    startMs: Date.UTC(2026, 11, 7),
    hours: 6,
    stepMin: 30,
    sigmaUereM: 0.02,
    sampleCount: 16,
  }

  it('combineHorizonInto keeps, bin by bin, the higher of two masks (read at an offset)', () => {
    const obstructionDeg = Array.from({ length: 360 }, (_, k) => (k < 180 ? 30 : 5))
    const terrainDeg = new Float64Array(720)
    for (let k = 0; k < 360; k++) terrainDeg[360 + k] = k % 2 === 0 ? 20 : 40
    const into = obstructionDeg.slice()
    combineHorizonInto(into, terrainDeg, 360)
    for (let k = 0; k < 360; k++) expect(into[k]).toBe(Math.max(obstructionDeg[k], terrainDeg[360 + k]))
    expect(into.slice(0, 4)).toEqual([30, 40, 30, 40])
    expect(into.slice(180, 184)).toEqual([20, 40, 20, 40])
  })

  it('the forecast loses satellites to both, never gains any, and counts what the sky view sees', () => {
    const both = forecastField({ ...common, obstructions, terrain: { grid: wall }, includeSamples: true })
    const onlyObstructions = forecastField({ ...common, obstructions, includeSamples: true })
    // The sample points follow the field and its obstructions only, so they are the same.
    expect(both.samplePoints).toEqual(onlyObstructions.samplePoints)
    for (let h = 0; h < both.hours.length; h++) {
      expect(both.hours[h].satellites.min).toBeLessThanOrEqual(onlyObstructions.hours[h].satellites.min)
      expect(both.hours[h].satellites.median!).toBeLessThanOrEqual(onlyObstructions.hours[h].satellites.median!)
    }
    expect(both.hours.some((x, i) => x.satellites.min < onlyObstructions.hours[i].satellites.min)).toBe(true)

    // Point by point and epoch by epoch, the forecast kernel (one combined mask) counts the
    // satellites the sky view uses (sky.ts checks the terrain and the obstruction mask each);
    // neither mask alone hides as many.
    const s = both.samples!
    const n = s.satellites.length
    for (let i = 0; i < n; i++) expect(s.satellites[i]).toBeLessThanOrEqual(onlyObstructions.samples!.satellites[i])
    expect(s.satellites.some((v, i) => v < onlyObstructions.samples!.satellites[i])).toBe(true)
    const terrainOfPoints = terrainHorizons(wall, both.samplePoints, 3)
    let fewerThanTerrainAlone = 0
    let obstructionHigher = 0
    let terrainHigher = 0
    for (let e = 0; e < s.epochsMs.length; e += 2) {
      both.samplePoints.forEach((p, i) => {
        const terrain = { grid: null, pointHorizonsDeg: terrainOfPoints.subarray(i * 360, i * 360 + 360) }
        const sky = { point: { latDeg: p.latDeg, lonDeg: p.lonDeg }, atMs: s.epochsMs[e], satellites: common.satellites, antennaHeightM: 3, terrain }
        const view = skyView({ ...sky, obstructions })
        const terrainAlone = skyView(sky)
        expect(s.satellites[e * s.points + i]).toBe(view.used.length)
        expect(view.used.length).toBeLessThanOrEqual(terrainAlone.used.length)
        if (view.used.length < terrainAlone.used.length) fewerThanTerrainAlone++
        for (const sat of view.satellites) {
          const bin = Math.min(359, Math.floor(sat.azimuthDeg))
          const obstructionDeg = view.horizonMaskDeg[bin]
          const terrainDeg = view.terrainHorizonDeg![bin]
          if (sat.elevationDeg < view.maskDeg) continue
          expect(sat.status === 'used').toBe(sat.elevationDeg >= Math.max(obstructionDeg, terrainDeg))
          if (sat.status === 'behind-obstruction' && terrainDeg > view.maskDeg) obstructionHigher++
          if (sat.status === 'behind-terrain' && obstructionDeg > view.maskDeg && sat.elevationDeg >= obstructionDeg) terrainHigher++
        }
      })
    }
    expect(fewerThanTerrainAlone).toBeGreaterThan(0)
    // Both cases occur: satellites above the terrain hidden by a higher obstruction, and
    // satellites above an obstruction hidden by higher terrain, in the same directions.
    expect(obstructionHigher).toBeGreaterThan(0)
    expect(terrainHigher).toBeGreaterThan(0)
  })
})
