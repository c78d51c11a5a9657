/**
 * Baselines to RTK correction sources (DESIGN.md "Beyond geometry").
 *
 * Distances are ellipsoidal geodesics on WGS-84 (a = 6378137 m, 1/f = 298.257223563;
 * NIMA TR8350.2, 3rd ed., Table 3.1), solved by GeographicLib's inverse problem
 * (C. F. F. Karney, "Algorithms for geodesics", J. Geodesy 87, 43-55, 2013) through the
 * registry package geographiclib-geodesic. The height of the antenna and of the base
 * is ignored: the ppm error model works on the horizontal separation.
 *
 * A field's baseline to a source: from its centroid (the figure of the error model) and
 * from its farthest boundary vertex (the figure of the range and baseline limits, so no
 * part of the field lies beyond them). A network's baseline is the distance to its
 * nearest mount point; a network with only a coverage polygon and no mount points has no
 * known baseline (counted as 0 km, so its service level's sigma must carry the network's
 * error, and marked as not known) and reaches the fields whose every vertex lies inside it.
 *
 * The automatic choice (chooseLink) is what a contractor would pick by hand: a source whose
 * baseline is known (an own base, a network's mount point) that reaches the field, the
 * nearest by real distance; a coverage-only network only when no such source reaches, since
 * its unknown baseline would otherwise win every comparison at 0 km (the product's rule,
 * common practice, no published source).
 */
import * as geographiclib from 'geographiclib-geodesic'
import { fieldPolygons, type FieldGeometry } from './sampling'

type Lib = typeof geographiclib
// The package is CommonJS: under Node's ESM loader the names sit on `default`.
const lib: Lib = ((geographiclib as unknown as { default?: Lib }).default ?? geographiclib) as Lib

export interface LatLon {
  latDeg: number
  lonDeg: number
}

/**
 * Geodesic distance on WGS-84 (km).
 *
 * @example
 * geodesicDistanceKm({ latDeg: -41.32, lonDeg: 174.81 }, { latDeg: 40.96, lonDeg: -5.5 }) // -> 19959.679267
 */
export function geodesicDistanceKm(a: LatLon, b: LatLon): number {
  const r = lib.Geodesic.WGS84.Inverse(a.latDeg, a.lonDeg, b.latDeg, b.lonDeg)
  return (r.s12 ?? NaN) / 1000
}

/** A contractor's own RTK base: position and radio range. */
export interface BaseSource {
  kind: 'base'
  id: number
  name: string
  latDeg: number
  lonDeg: number
  radioRangeKm: number
}

/** A correction network: a coverage polygon (ring of [lon, lat]) and/or mount points. */
export interface NetworkSource {
  kind: 'network'
  id: number
  name: string
  coverage: Array<[number, number]> | null
  mountPoints: LatLon[]
}

export type CorrectionSource = BaseSource | NetworkSource

/** How a field reaches one source. */
export interface CorrectionLink {
  kind: 'base' | 'network'
  id: number
  name: string
  /** baseline from the field's centroid (km); the error model's b */
  baselineKm: number
  /** baseline from the farthest boundary vertex (km) */
  farthestKm: number
  /** the field lies inside the radio range / the network's coverage */
  reachable: boolean
  /** false for a network known only by its coverage: baselineKm is then 0 for want of a figure */
  baselineKnown: boolean
}

/** Outer-ring vertices of a field (lon, lat pairs; the closing vertex once). */
export function fieldVertices(field: FieldGeometry): LatLon[] {
  const out: LatLon[] = []
  for (const poly of fieldPolygons(field)) {
    const ring = poly[0] ?? []
    for (let i = 0; i < ring.length; i++) {
      if (i === ring.length - 1 && ring.length > 1 && ring[i][0] === ring[0][0] && ring[i][1] === ring[0][1]) break
      out.push({ lonDeg: ring[i][0], latDeg: ring[i][1] })
    }
  }
  return out
}

/** Point-in-polygon by ray casting on lon/lat (fine for coverage areas away from the poles and the antimeridian). */
export function insideRing(p: LatLon, ring: ReadonlyArray<readonly [number, number]>): boolean {
  let inside = false
  for (let i = 0, j = ring.length - 1; i < ring.length; j = i++) {
    const [xi, yi] = ring[i]
    const [xj, yj] = ring[j]
    if (yi > p.latDeg !== yj > p.latDeg && p.lonDeg < ((xj - xi) * (p.latDeg - yi)) / (yj - yi) + xi) inside = !inside
  }
  return inside
}

/**
 * How a field (centroid + boundary vertices) reaches a source.
 *
 * @example
 * linkTo(centroid, vertices, { kind: 'base', id: 1, name: 'Yard', latDeg: 41.6, lonDeg: -93.6, radioRangeKm: 15 })
 * // -> { kind: 'base', id: 1, name: 'Yard', baselineKm: 3.2, farthestKm: 3.6, reachable: true, baselineKnown: true }
 */
export function linkTo(centroid: LatLon, vertices: readonly LatLon[], source: CorrectionSource): CorrectionLink {
  if (source.kind === 'base') {
    const baselineKm = geodesicDistanceKm(centroid, source)
    const farthestKm = Math.max(baselineKm, ...vertices.map((v) => geodesicDistanceKm(v, source)))
    return { kind: 'base', id: source.id, name: source.name, baselineKm, farthestKm, reachable: farthestKm <= source.radioRangeKm, baselineKnown: true }
  }
  const points = [centroid, ...vertices]
  const reachable = source.coverage ? points.every((p) => insideRing(p, source.coverage!)) : source.mountPoints.length > 0
  let baselineKm = 0
  let farthestKm = 0
  if (source.mountPoints.length > 0) {
    // The network hands each position its nearest mount point.
    const nearest = (p: LatLon) => Math.min(...source.mountPoints.map((m) => geodesicDistanceKm(p, m)))
    baselineKm = nearest(centroid)
    farthestKm = Math.max(baselineKm, ...vertices.map(nearest))
  }
  return { kind: 'network', id: source.id, name: source.name, baselineKm, farthestKm, reachable, baselineKnown: source.mountPoints.length > 0 }
}

/**
 * The link a field uses: the chosen source when one is given; else, in this order, the
 * nearest reachable source with a known baseline (smallest centroid baseline), a reachable
 * coverage-only network (lowest id), the nearest unreachable source with a known baseline,
 * an unreachable coverage-only network (both unreachable, so the caller warns); null when
 * there are no sources at all.
 *
 * @example
 * // A yard base 8 km off in range and a network known only by a coverage holding the field:
 * chooseLink(centroid, vertices, [yardBase, coverageOnly])!.name // -> 'Yard' (the network's 0 km is not a distance)
 */
export function chooseLink(
  centroid: LatLon,
  vertices: readonly LatLon[],
  sources: readonly CorrectionSource[],
  chosen?: { kind: 'base' | 'network'; id: number } | null,
): CorrectionLink | null {
  if (chosen) {
    const s = sources.find((x) => x.kind === chosen.kind && x.id === chosen.id)
    if (s) return linkTo(centroid, vertices, s)
  }
  const links = sources.map((s) => linkTo(centroid, vertices, s))
  const rank = (l: CorrectionLink) => (l.reachable ? 0 : 2) + (l.baselineKnown ? 0 : 1)
  links.sort((a, b) => rank(a) - rank(b) || (a.baselineKnown ? a.baselineKm - b.baselineKm : a.id - b.id))
  return links[0] ?? null
}
