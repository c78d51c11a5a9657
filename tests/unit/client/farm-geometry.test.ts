// The Fields page's pure geometry (src/lib/farmGeometry.ts) against closed forms on a
// sphere of radius R = 6 371 008.8 m (the mean radius turf uses, IUGG R1 of GRS 80:
// Moritz, "Geodetic Reference System 1980", Bulletin Géodésique 54, 1980).
import { describe, expect, it } from 'vitest'
import type { MultiPolygon, Polygon } from 'geojson'
import type { Boundary } from '@shared/schemas/geo'
import { areaHaOf, areaM2Of, boundaryCrossings, lineLengthM, partHoldingHole } from '@/lib/farmGeometry'

const R_M = 6_371_008.8
const rad = (deg: number) => (deg * Math.PI) / 180

/** A lon/lat rectangle (edges along meridians and parallels). */
function rect(lon1: number, lat1: number, lon2: number, lat2: number): Polygon {
  return { type: 'Polygon', coordinates: [[[lon1, lat1], [lon2, lat1], [lon2, lat2], [lon1, lat2], [lon1, lat1]]] }
}

describe('field areas', () => {
  it('matches the area of a lon/lat rectangle on the sphere, R² Δλ (sin φ2 − sin φ1)', () => {
    // Area between two parallels and two meridians: the cylindrical equal-area mapping
    // x = R λ, y = R sin φ keeps areas (Snyder, Map Projections - A Working Manual,
    // USGS Professional Paper 1395, 1987, ch. 10; equation numbers from memory).
    const field = rect(-93.5, 42.0, -93.49, 42.01)
    const expectedM2 = R_M * R_M * rad(0.01) * (Math.sin(rad(42.01)) - Math.sin(rad(42.0)))
    expect(areaM2Of(field) / expectedM2).toBeCloseTo(1, 9)
    expect(areaHaOf(field) / (expectedM2 / 10_000)).toBeCloseTo(1, 9)
  })

  it('adds the parts of a multipolygon and takes holes away', () => {
    const a = rect(0, 0, 0.01, 0.01)
    const b = rect(0.02, 0, 0.03, 0.01)
    const both: MultiPolygon = { type: 'MultiPolygon', coordinates: [a.coordinates, b.coordinates] }
    expect(areaM2Of(both)).toBeCloseTo(areaM2Of(a) + areaM2Of(b), 3)
    const hole = rect(0.004, 0.004, 0.006, 0.006).coordinates[0].slice().reverse()
    const withHole: Polygon = { type: 'Polygon', coordinates: [a.coordinates[0], hole] }
    expect(areaM2Of(withHole)).toBeCloseTo(areaM2Of(a) - areaM2Of(rect(0.004, 0.004, 0.006, 0.006)), 3)
  })
})

describe('tree line lengths', () => {
  it('matches the arc length R θ of one degree along a meridian', () => {
    const lengthM = lineLengthM({ type: 'LineString', coordinates: [[10, 45], [10, 46]] })
    expect(lengthM).toBeCloseTo(R_M * rad(1), 3)
  })
})

describe('boundary checks', () => {
  it('finds where a bow-tie boundary crosses itself (the diagonals of a square meet at its centre)', () => {
    const crossings = boundaryCrossings({ type: 'Polygon', coordinates: [[[0, 0], [1, 1], [1, 0], [0, 1], [0, 0]]] })
    expect(crossings).toHaveLength(1)
    expect(crossings[0][0]).toBeCloseTo(0.5, 9)
    expect(crossings[0][1]).toBeCloseTo(0.5, 9)
  })

  it('finds no crossing in a plain rectangle', () => {
    expect(boundaryCrossings(rect(0, 0, 1, 1) as Boundary)).toEqual([])
  })

  it('names the part that holds a hole, and none when the hole crosses an edge', () => {
    const field: MultiPolygon = { type: 'MultiPolygon', coordinates: [rect(0, 0, 1, 1).coordinates, rect(2, 0, 3, 1).coordinates] }
    expect(partHoldingHole(field, rect(2.2, 0.2, 2.4, 0.4))).toBe(1)
    expect(partHoldingHole(field, rect(0.9, 0.2, 1.1, 0.4))).toBe(-1)
    expect(partHoldingHole(rect(0, 0, 1, 1), rect(0.2, 0.2, 0.4, 0.4))).toBe(0)
  })
})
