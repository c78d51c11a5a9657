/**
 * Horizon mask of a point from the farm's obstructions (tree lines, woodlots,
 * buildings).
 *
 * Geometry: an obstruction of height h at horizontal distance d from an antenna at
 * height ha blocks elevations up to atan2(h - ha, d). Each tree-line segment or polygon
 * edge is taken in a local metric plane around the point; for every 1-degree azimuth
 * bin [k, k+1) that the segment spans, the highest blocked elevation in the bin comes
 * from the nearest point of the segment within the bin (along the ray at angle theta,
 * a line at perpendicular distance p is at d = p / cos(theta - theta_perp)). The mask
 * is the maximum over obstructions; 0 where nothing blocks.
 *
 * Foliage: L-band signals lose 10-20 dB through single trees (Vogel & Goldhirsh, IEEE
 * Trans. Antennas Propag., Dec 1986), so a satellite behind trees counts as blocked,
 * unless the obstruction is deciduous and leafless on that date
 * (properties.leaflessFrom / leaflessTo, 'MM-DD', inclusive, may wrap the new year).
 */
import type { Feature, FeatureCollection, Geometry, Position } from 'geojson'
import { RAD } from './constants'
import { localPlane, toPlane } from './geodesy'
import { monthDayUtc } from './time'

/** Kinds of obstruction. */
export type ObstructionKind = 'deciduous' | 'evergreen' | 'structure'

/** An obstruction checked and flattened to rings/lines of [lon, lat]. */
export interface ObstructionShape {
  index: number
  heightM: number
  kind: string | null
  leaflessFrom: string | null
  leaflessTo: string | null
  /** Each path is a list of [lon, lat]; polygon rings are closed. */
  paths: Position[][]
}

const MMDD = /^(0[1-9]|1[0-2])-(0[1-9]|[12]\d|3[01])$/

function describeFeature(f: Feature | undefined, index: number): string {
  const id = f?.id ?? (f?.properties as Record<string, unknown> | null)?.name
  return id !== undefined && id !== null ? `obstruction ${index + 1} (${String(id)})` : `obstruction ${index + 1}`
}

/**
 * Checks an obstruction FeatureCollection and flattens it. Throws an Error naming the
 * feature when a geometry or property is invalid.
 */
export function readObstructions(obstructions: FeatureCollection | null | undefined): ObstructionShape[] {
  if (!obstructions) return []
  if (obstructions.type !== 'FeatureCollection' || !Array.isArray(obstructions.features)) {
    throw new Error('obstructions: expected a GeoJSON FeatureCollection')
  }
  const out: ObstructionShape[] = []
  obstructions.features.forEach((f, index) => {
    const where = describeFeature(f, index)
    if (!f || f.type !== 'Feature' || !f.geometry) throw new Error(`${where}: not a GeoJSON Feature with a geometry`)
    const props = (f.properties ?? {}) as Record<string, unknown>
    const heightM = Number(props.heightM)
    if (props.heightM === undefined || props.heightM === null || !Number.isFinite(heightM) || heightM < 0) {
      throw new Error(`${where}: properties.heightM must be a number of metres >= 0`)
    }
    const from = props.leaflessFrom ?? null
    const to = props.leaflessTo ?? null
    for (const [name, v] of [['leaflessFrom', from], ['leaflessTo', to]] as const) {
      if (v !== null && (typeof v !== 'string' || !MMDD.test(v))) {
        throw new Error(`${where}: properties.${name} must be 'MM-DD'`)
      }
    }
    if ((from === null) !== (to === null)) throw new Error(`${where}: give both leaflessFrom and leaflessTo`)
    out.push({
      index,
      heightM,
      kind: typeof props.kind === 'string' ? props.kind : null,
      leaflessFrom: from as string | null,
      leaflessTo: to as string | null,
      paths: geometryPaths(f.geometry, where),
    })
  })
  return out
}

function checkPositions(ps: unknown, where: string, minLength: number): Position[] {
  if (!Array.isArray(ps) || ps.length < minLength) throw new Error(`${where}: needs at least ${minLength} positions`)
  for (const p of ps) {
    if (!Array.isArray(p) || !Number.isFinite(p[0]) || !Number.isFinite(p[1]) || Math.abs(p[1]) > 90) {
      throw new Error(`${where}: bad position ${JSON.stringify(p)}`)
    }
  }
  return ps as Position[]
}

function geometryPaths(g: Geometry, where: string): Position[][] {
  switch (g.type) {
    case 'LineString':
      return [checkPositions(g.coordinates, where, 2)]
    case 'MultiLineString':
      return g.coordinates.map((c) => checkPositions(c, where, 2))
    case 'Polygon':
      return g.coordinates.map((c) => checkPositions(c, where, 4))
    case 'MultiPolygon':
      return g.coordinates.flatMap((poly) => poly.map((c) => checkPositions(c, where, 4)))
    default:
      throw new Error(`${where}: geometry ${g.type} is not a LineString or Polygon`)
  }
}

/** True when a deciduous obstruction is leafless (does not block) on the UTC date of `atMs`. */
export function isLeafless(o: ObstructionShape, atMs: number): boolean {
  if (o.kind !== 'deciduous' || !o.leaflessFrom || !o.leaflessTo) return false
  const d = monthDayUtc(atMs)
  return o.leaflessFrom <= o.leaflessTo
    ? d >= o.leaflessFrom && d <= o.leaflessTo
    : d >= o.leaflessFrom || d <= o.leaflessTo
}

/** Raises `mask` (360 bins, deg) with one segment in the point's plane (point at origin). */
function maskSegment(mask: Float64Array, x1: number, y1: number, x2: number, y2: number, riseM: number): void {
  const dx = x2 - x1
  const dy = y2 - y1
  const len2 = dx * dx + dy * dy
  if (len2 === 0) return
  // Foot of the perpendicular from the origin on the line.
  const t = -(x1 * dx + y1 * dy) / len2
  const fx = x1 + t * dx
  const fy = y1 + t * dy
  const p = Math.hypot(fx, fy)
  const a1 = Math.atan2(x1, y1) * RAD
  const a2 = Math.atan2(x2, y2) * RAD
  if (p < 1e-6) {
    // The line passes through the point: only the directions of the segment parts are hit.
    if (t > 1e-9 && t < 1 - 1e-9) {
      raiseBin(mask, a1, 90)
      raiseBin(mask, a2, 90)
    } else {
      // Segment lies on one side along a ray from the point.
      const near = Math.min(Math.hypot(x1, y1), Math.hypot(x2, y2))
      raiseBin(mask, Math.hypot(x1, y1) <= Math.hypot(x2, y2) ? a1 : a2, Math.atan2(riseM, near) * RAD)
    }
    return
  }
  // Unwrap so that the segment spans [start, end] with end - start < 180.
  let span = a2 - a1
  if (span > 180) span -= 360
  else if (span < -180) span += 360
  let start = a1
  if (span < 0) {
    start = a2
    span = -span
  }
  const end = start + span
  let perp = Math.atan2(fx, fy) * RAD
  // Bring perp near the span.
  while (perp < start - 180) perp += 360
  while (perp > start + 180) perp -= 360
  const kFirst = Math.floor(start)
  const kLast = Math.floor(end)
  for (let k = kFirst; k <= kLast; k++) {
    const lo = Math.max(start, k)
    const hi = Math.min(end, k + 1)
    if (hi < lo) continue
    if (hi === lo && hi === k + 1) continue
    const theta = perp < lo ? lo : perp > hi ? hi : perp
    const c = Math.cos((theta - perp) / RAD)
    const d = p / (c > 1e-12 ? c : 1e-12)
    const el = Math.atan2(riseM, d) * RAD
    const bin = ((k % 360) + 360) % 360
    if (el > mask[bin]) mask[bin] = el
  }
}

function raiseBin(mask: Float64Array, azDeg: number, el: number): void {
  const bin = ((Math.floor(azDeg) % 360) + 360) % 360
  if (el > mask[bin]) mask[bin] = el
}

/**
 * Horizon mask of a point for already-read obstructions (see `readObstructions`),
 * written into `out` (360 entries, deg). Obstructions leafless at `atMs` are skipped.
 */
export function horizonMaskInto(
  out: Float64Array,
  point: { latDeg: number; lonDeg: number },
  shapes: readonly ObstructionShape[],
  antennaHeightM: number,
  atMs?: number,
): Float64Array {
  out.fill(0)
  const plane = localPlane(point.latDeg, point.lonDeg)
  for (const o of shapes) {
    const rise = o.heightM - antennaHeightM
    if (rise <= 0) continue
    if (atMs !== undefined && isLeafless(o, atMs)) continue
    for (const path of o.paths) {
      let [px, py] = toPlane(plane, path[0][0], path[0][1])
      for (let i = 1; i < path.length; i++) {
        const [qx, qy] = toPlane(plane, path[i][0], path[i][1])
        maskSegment(out, px, py, qx, qy, rise)
        px = qx
        py = qy
      }
    }
  }
  return out
}

/**
 * Horizon mask of a point: 360 entries, entry k = highest blocked elevation (deg) over
 * azimuths [k, k+1), 0 where nothing blocks. Obstructions are LineString or Polygon
 * features with `properties.heightM` (m above ground); the antenna height is above the
 * same ground. Pass `options.atMs` to leave out deciduous obstructions that are
 * leafless on that date.
 *
 * @example
 * // A 20 m tree line 50 m north of a 3 m antenna blocks 18.8 deg due north:
 * horizonMask({ latDeg: 52, lonDeg: 5 }, treeLines, 3)[0] // -> 18.78
 */
export function horizonMask(
  point: { latDeg: number; lonDeg: number },
  obstructions: FeatureCollection,
  antennaHeightM: number,
  options?: { atMs?: number },
): number[] {
  const out = new Float64Array(360)
  horizonMaskInto(out, point, readObstructions(obstructions), antennaHeightM, options?.atMs)
  return Array.from(out)
}
