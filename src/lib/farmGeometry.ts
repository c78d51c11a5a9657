/**
 * Pure geometry of fields and obstructions on WGS-84 GeoJSON (no map, no Vue): areas,
 * lengths, self-crossings and whether a hole lies inside a part. Areas and lengths are
 * turf's, on a sphere of the mean earth radius 6 371 008.8 m (turf `earthRadius`, from
 * the IUGG mean radius R1 of GRS 80, Moritz, Geodetic Reference System 1980, Bulletin
 * Géodésique 54, 1980).
 */
import * as turf from '@turf/turf'
import type { LineString, MultiPolygon, Polygon, Position } from 'geojson'
import type { Boundary } from '@shared/schemas/geo'

/** Area (m²) of a WGS-84 polygon or multipolygon. @example areaM2Of(square100m) // -> about 10 000 */
export function areaM2Of(boundary: Boundary | Polygon | MultiPolygon): number {
  return turf.area(boundary as Polygon)
}

/** Area (ha) of a WGS-84 polygon or multipolygon. @example areaHaOf(square100m) // -> about 1 */
export function areaHaOf(boundary: Boundary | Polygon | MultiPolygon): number {
  return areaM2Of(boundary) / 10_000
}

/** Length (m) of a WGS-84 line. @example lineLengthM({ type: 'LineString', coordinates: [[0, 0], [0, 1]] }) // -> about 111 195 */
export function lineLengthM(line: LineString): number {
  return turf.length(turf.lineString(line.coordinates), { units: 'meters' })
}

/** Self-crossings of a boundary as [lon, lat] points (turf `kinks`). */
export function boundaryCrossings(boundary: Boundary): [number, number][] {
  const polys = boundary.type === 'Polygon' ? [boundary.coordinates] : boundary.coordinates
  const out: [number, number][] = []
  for (const coords of polys) {
    const k = turf.kinks(turf.polygon(coords))
    for (const p of k.features) out.push(p.geometry.coordinates as [number, number])
  }
  return out
}

/**
 * The index of the part whose outer ring wholly holds `hole`, or -1 when none does.
 * @example partHoldingHole(field, smallSquareInside) // -> 0
 */
export function partHoldingHole(boundary: Polygon | MultiPolygon, hole: Polygon): number {
  const outers: Position[][] = boundary.type === 'Polygon' ? [boundary.coordinates[0]] : boundary.coordinates.map((p) => p[0])
  const inner = turf.polygon(hole.coordinates)
  return outers.findIndex((ring) => turf.booleanWithin(inner, turf.polygon([ring])))
}
