// Checks of drawn and uploaded geometry before it is stored: field boundaries (Polygon /
// MultiPolygon, holes for ponds and yards) and obstruction geometry (tree lines, woodlots,
// buildings). Every refusal says where the problem is ("near 41.6012 N, 93.6234 W").
//
// Area: @turf/area (spherical excess on a sphere of radius 6,371,008.8 m, turf's mean
// earth radius), holes subtracted; 1 ha = 10,000 m^2; 1 ac = 4,046.8564224 m^2 (the
// international acre), so 1 ha = 2.4710538 ac.
import * as turf from '@turf/turf'
import type { Feature, LineString, MultiPolygon, Polygon, Position } from 'geojson'
import type { Boundary, ObstructionGeometry } from '../../shared/schemas/geo.ts'

export const AC_PER_HA = 10_000 / 4_046.856_422_4

/** "41.6012 N, 93.6234 W" for a [lon, lat] position. */
export function formatPlace(p: Position): string {
  const [lon, lat] = p
  return `${Math.abs(lat).toFixed(4)} ${lat >= 0 ? 'N' : 'S'}, ${Math.abs(lon).toFixed(4)} ${lon >= 0 ? 'E' : 'W'}`
}

const samePosition = (a: Position, b: Position) => a[0] === b[0] && a[1] === b[1]

/** Drops repeated consecutive positions and closes the ring when it is open. */
type LonLat = [number, number]

function normaliseRing(ring: Position[]): LonLat[] {
  const out: LonLat[] = []
  for (const p of ring) {
    const q: LonLat = [p[0], p[1]]
    if (out.length === 0 || !samePosition(out[out.length - 1], q)) out.push(q)
  }
  if (out.length > 0 && !samePosition(out[0], out[out.length - 1])) out.push([out[0][0], out[0][1]])
  return out
}

/** A polygon's rings, as lists of polygons (one entry per MultiPolygon part). */
function partsOf(b: Boundary): Position[][][] {
  return b.type === 'Polygon' ? [b.coordinates] : b.coordinates
}

/** The boundary with repeated positions removed and every ring closed. */
export function normaliseBoundary(b: Boundary): Boundary {
  return b.type === 'Polygon'
    ? { type: 'Polygon', coordinates: b.coordinates.map(normaliseRing) }
    : { type: 'MultiPolygon', coordinates: b.coordinates.map((rings) => rings.map(normaliseRing)) }
}

function ringLabel(parts: number, part: number, ring: number): string {
  const p = parts > 1 ? `part ${part + 1} of the boundary` : 'the boundary'
  return ring === 0 ? p : `hole ${ring} of ${p}`
}

/**
 * Problems of a boundary, each a sentence saying where; empty when it can be stored.
 * Checks: at least 3 distinct corners per ring, no zero-area ring, no crossing edges
 * (turf kinks, also between a hole and its shell), holes inside their shell, parts of a
 * MultiPolygon not overlapping.
 *
 * @example
 * boundaryProblems({ type: 'Polygon', coordinates: [[[0,0],[1,1],[1,0],[0,1],[0,0]]] })
 * // -> ['the boundary crosses itself near 0.5000 N, 0.5000 E']
 */
export function boundaryProblems(input: Boundary): string[] {
  const b = normaliseBoundary(input)
  const parts = partsOf(b)
  const problems: string[] = []
  parts.forEach((rings, pi) => {
    rings.forEach((ring, ri) => {
      const distinct = new Set(ring.map((p) => `${p[0]},${p[1]}`)).size
      if (distinct < 3) {
        problems.push(
          `${ringLabel(parts.length, pi, ri)} has only ${distinct} distinct corner${distinct === 1 ? '' : 's'} near ${formatPlace(ring[0])}; it needs at least 3`,
        )
      }
    })
  })
  if (problems.length) return problems

  parts.forEach((rings, pi) => {
    const label = parts.length > 1 ? `part ${pi + 1} of the boundary` : 'the boundary'
    const kinks = turf.kinks(turf.polygon(rings))
    if (kinks.features.length > 0) {
      problems.push(`${label} crosses itself near ${formatPlace(kinks.features[0].geometry.coordinates)}`)
      return
    }
    for (let ri = 0; ri < rings.length; ri++) {
      if (!(turf.area(turf.polygon([rings[ri]])) > 0.01)) {
        problems.push(`${ringLabel(parts.length, pi, ri)} has no area (its corners lie on one line) near ${formatPlace(rings[ri][0])}`)
        return
      }
    }
    const shell = turf.polygon([rings[0]])
    rings.slice(1).forEach((hole, hi) => {
      const outside = hole.slice(0, -1).find((p) => !turf.booleanPointInPolygon(p, shell, { ignoreBoundary: false }))
      if (outside) problems.push(`hole ${hi + 1} of ${label} lies outside it near ${formatPlace(outside)}`)
    })
  })
  if (problems.length) return problems

  for (let i = 0; i < parts.length; i++) {
    for (let j = i + 1; j < parts.length; j++) {
      const a = turf.polygon(parts[i])
      const c = turf.polygon(parts[j])
      if (!turf.booleanIntersects(a, c)) continue
      // Parts that only touch (a shared edge or corner) are fine; overlapping area is not.
      const common = turf.intersect(turf.featureCollection([a, c]))
      if (common && turf.area(common) > 1) {
        problems.push(`parts ${i + 1} and ${j + 1} of the boundary overlap near ${formatPlace(turf.pointOnFeature(common).geometry.coordinates)}`)
      }
    }
  }
  return problems
}

export interface BoundaryMeasure {
  boundary: Boundary
  areaHa: number
  areaAc: number
  centroid: { latDeg: number; lonDeg: number }
}

/** Area (ha, ac) and centre of mass of a checked boundary. */
export function measureBoundary(input: Boundary): BoundaryMeasure {
  const boundary = normaliseBoundary(input)
  const feature = { type: 'Feature', properties: {}, geometry: boundary } as Feature<Polygon | MultiPolygon>
  const areaHa = turf.area(feature) / 10_000
  const [lonDeg, latDeg] = turf.centerOfMass(feature).geometry.coordinates
  return { boundary, areaHa, areaAc: areaHa * AC_PER_HA, centroid: { latDeg, lonDeg } }
}

/** Problems of an obstruction's geometry (a tree line or a polygon), each saying where. */
export function obstructionGeometryProblems(g: ObstructionGeometry): string[] {
  if (g.type === 'Polygon') {
    return boundaryProblems(g).map((p) => p.replace(/the boundary/g, 'the outline'))
  }
  const line = g.coordinates.filter((p, i) => i === 0 || !samePosition(p, g.coordinates[i - 1]))
  if (line.length < 2) return [`the line has only one distinct point, near ${formatPlace(g.coordinates[0])}`]
  const lengthM = turf.length(turf.lineString(line) as Feature<LineString>, { units: 'meters' })
  if (lengthM < 1) return [`the line is shorter than 1 m, near ${formatPlace(line[0])}`]
  return []
}

/** The line without repeated consecutive points (polygons: rings normalised). */
export function normaliseObstructionGeometry(g: ObstructionGeometry): ObstructionGeometry {
  if (g.type === 'Polygon') return normaliseBoundary(g) as ObstructionGeometry
  return {
    type: 'LineString',
    coordinates: g.coordinates.filter((p, i) => i === 0 || !samePosition(p, g.coordinates[i - 1])).map((p) => [p[0], p[1]] as [number, number]),
  }
}
