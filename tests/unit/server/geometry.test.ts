// Boundary and obstruction geometry checks (server/imports/geometry.ts): every refusal says
// where, and the area agrees with a plain planar calculation on small invented shapes.
import { describe, expect, it } from 'vitest'
import { AC_PER_HA, boundaryProblems, formatPlace, measureBoundary, obstructionGeometryProblems } from '../../../server/imports/geometry.ts'
import { offset, rectangle, ringM, type LonLat } from '../../fixtures/imports/shapes.ts'

const o: LonLat = [-93.6, 42]
const polygon = (...rings: LonLat[][]) => ({ type: 'Polygon' as const, coordinates: rings })

describe('formatPlace', () => {
  it('writes degrees with hemisphere letters, four decimals', () => {
    expect(formatPlace([-93.62341, 41.60119])).toBe('41.6012 N, 93.6234 W')
    expect(formatPlace([151.2, -33.85])).toBe('33.8500 S, 151.2000 E')
  })
})

describe('boundaryProblems', () => {
  it('accepts a rectangle, a field with a pond and parts that only touch', () => {
    expect(boundaryProblems(polygon(rectangle(o, 400, 300)))).toEqual([])
    const pond = ringM(o, [[100, 100], [100, 150], [150, 150], [150, 100]])
    expect(boundaryProblems(polygon(rectangle(o, 400, 300), pond))).toEqual([])
    const touching = { type: 'MultiPolygon' as const, coordinates: [[rectangle(o, 400, 400)], [rectangle(offset(o, 400, 0), 400, 400)]] }
    expect(boundaryProblems(touching)).toEqual([])
  })

  it('accepts an open ring (closes it) and repeated points', () => {
    const r = rectangle(o, 200, 200)
    expect(boundaryProblems(polygon([r[0], r[0], r[1], r[2], r[3], r[3]]))).toEqual([])
  })

  it('names where a boundary crosses itself, including a hole crossing its shell', () => {
    const bow = ringM(o, [[0, 0], [200, 200], [200, 0], [0, 200]])
    const mid = offset(o, 100, 100)
    expect(boundaryProblems(polygon(bow))).toEqual([`the boundary crosses itself near ${formatPlace(mid)}`])
    const crossing = ringM(o, [[300, 100], [300, 200], [500, 200], [500, 100]])
    expect(boundaryProblems(polygon(rectangle(o, 400, 400), crossing))[0]).toMatch(/^the boundary crosses itself near 42\.00\d\d N/)
  })

  it('refuses too few corners, no area, holes outside and overlapping parts', () => {
    expect(boundaryProblems(polygon([o, offset(o, 10, 0), o, offset(o, 10, 0), o]))[0]).toMatch(/only 2 distinct corners/)
    expect(boundaryProblems(polygon(ringM(o, [[0, 0], [50, 0], [100, 0]])))[0]).toMatch(/has no area/)
    const outside = ringM(o, [[500, 500], [500, 600], [600, 600], [600, 500]])
    expect(boundaryProblems(polygon(rectangle(o, 400, 400), outside))[0]).toMatch(/^hole 1 of the boundary lies outside it near/)
    const overlap = { type: 'MultiPolygon' as const, coordinates: [[rectangle(o, 300, 300)], [rectangle(offset(o, 200, 200), 300, 300)]] }
    expect(boundaryProblems(overlap)[0]).toMatch(/^parts 1 and 2 of the boundary overlap near/)
  })
})

describe('measureBoundary', () => {
  it('gives ha and ac (1 ha = 2.4710538 ac, international acre) and the centre', () => {
    const m = measureBoundary(polygon(rectangle(o, 500, 400), ringM(o, [[100, 100], [100, 200], [200, 200], [200, 100]])))
    // 500 x 400 m less 100 x 100 m = 19 ha, laid out flat: turf's spherical area within 0.5 %.
    expect(m.areaHa).toBeGreaterThan(19 * 0.995)
    expect(m.areaHa).toBeLessThan(19 * 1.005)
    expect(AC_PER_HA).toBeCloseTo(2.4710538, 7)
    expect(m.areaAc).toBeCloseTo(m.areaHa * 2.4710538, 6)
    expect(m.centroid.latDeg).toBeGreaterThan(o[1])
    expect(m.centroid.lonDeg).toBeGreaterThan(o[0])
  })
})

describe('obstructionGeometryProblems', () => {
  it('checks lines and outlines', () => {
    expect(obstructionGeometryProblems({ type: 'LineString', coordinates: [o, offset(o, 300, 0)] })).toEqual([])
    expect(obstructionGeometryProblems({ type: 'LineString', coordinates: [o, o] })[0]).toMatch(/only one distinct point/)
    expect(obstructionGeometryProblems({ type: 'LineString', coordinates: [o, offset(o, 0.3, 0)] })[0]).toMatch(/shorter than 1 m/)
    const bow = ringM(o, [[0, 0], [20, 20], [20, 0], [0, 20]])
    expect(obstructionGeometryProblems(polygon(bow))[0]).toMatch(/^the outline crosses itself near/)
  })
})
