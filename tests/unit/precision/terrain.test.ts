// Terrain horizon against closed forms: a cone and a straight plateau edge of known height
// and distance, where the elevation angle is atan((H - h0 - (1 - k) d^2 / (2R)) / d)
// (curvature drop d^2/2R: second-order term of R(1 - cos(d/R)); refraction by the
// effective radius R/(1 - k); R = GRS 80 mean radius R1, Moritz, J. Geodesy 74 (2000)).
import type { FeatureCollection } from 'geojson'
import { describe, expect, it } from 'vitest'
import {
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
