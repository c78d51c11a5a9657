/**
 * Sample points across a field polygon: about `count` points (64 by default), spread
 * evenly by area but denser near obstructions, each with the area it stands for.
 *
 * Method: a fine grid of candidate cells inside the field (holes respected, even-odd
 * rule per polygon); each cell's density is 1 + 3 exp(-d / L), d the distance to the
 * nearest obstruction and L the reach of its shadow above the elevation mask
 * ((h - h_antenna) / tan(mask), clamped to 15..300 m); farthest-point selection in
 * the density-scaled distance picks the points; each candidate cell's area then goes
 * to its nearest point (a discrete Voronoi partition), so the weights add up to the
 * field's area.
 *
 * Sources: farthest-point sampling and the nearest-point (Voronoi) partition are
 * textbook computational geometry; the density rule 1 + 3 exp(-d / L) and its clamps are
 * common practice of our own (no published source).
 */
import type { Feature, Geometry, MultiPolygon, Polygon, Position } from 'geojson'
import { DEG } from './constants'
import { fromPlane, localPlane, toPlane, type LocalPlane } from './geodesy'
import type { ObstructionShape } from './horizon'

/** A sample point of a field. */
export interface SamplePoint {
  latDeg: number
  lonDeg: number
  /** area this point stands for (m^2); the weights add up to the field area */
  weightM2: number
  /** distance to the nearest obstruction (m); null without obstructions */
  obstructionDistanceM: number | null
}

/** The field geometry a forecast accepts. */
export type FieldGeometry = Polygon | MultiPolygon | Feature<Polygon | MultiPolygon>

/** Polygons (lists of rings of [lon, lat]) of a field, checked. */
export function fieldPolygons(field: FieldGeometry | Geometry | Feature): Position[][][] {
  const g = (field as Feature).type === 'Feature' ? (field as Feature).geometry : (field as Geometry)
  if (!g) throw new Error('field: a Feature without a geometry')
  const polys = g.type === 'Polygon' ? [g.coordinates] : g.type === 'MultiPolygon' ? g.coordinates : null
  if (!polys) throw new Error(`field: geometry ${g.type} is not a Polygon or MultiPolygon`)
  polys.forEach((rings, p) => {
    if (!Array.isArray(rings) || rings.length === 0) throw new Error(`field: polygon ${p + 1} has no rings`)
    rings.forEach((ring, r) => {
      if (!Array.isArray(ring) || ring.length < 4) throw new Error(`field: polygon ${p + 1} ring ${r + 1} needs at least 4 positions`)
      for (const pos of ring) {
        if (!Array.isArray(pos) || !Number.isFinite(pos[0]) || !Number.isFinite(pos[1]) || Math.abs(pos[1]) > 90) {
          throw new Error(`field: polygon ${p + 1} ring ${r + 1} has a bad position ${JSON.stringify(pos)}`)
        }
      }
    })
  })
  return polys
}

function ringArea(xy: Float64Array): number {
  let s = 0
  const n = xy.length / 2
  for (let i = 0, j = n - 1; i < n; j = i++) s += xy[2 * j] * xy[2 * i + 1] - xy[2 * i] * xy[2 * j + 1]
  return Math.abs(s) / 2
}

function insideRings(rings: Float64Array[], x: number, y: number): boolean {
  let inside = false
  for (const r of rings) {
    const n = r.length / 2
    for (let i = 0, j = n - 1; i < n; j = i++) {
      const xi = r[2 * i]
      const yi = r[2 * i + 1]
      const xj = r[2 * j]
      const yj = r[2 * j + 1]
      if (yi > y !== yj > y && x < ((xj - xi) * (y - yi)) / (yj - yi) + xi) inside = !inside
    }
  }
  return inside
}

function segDistance(px: number, py: number, x1: number, y1: number, x2: number, y2: number): number {
  const dx = x2 - x1
  const dy = y2 - y1
  const l2 = dx * dx + dy * dy
  let t = l2 > 0 ? ((px - x1) * dx + (py - y1) * dy) / l2 : 0
  t = t < 0 ? 0 : t > 1 ? 1 : t
  return Math.hypot(px - (x1 + t * dx), py - (y1 + t * dy))
}

/**
 * Sample points of a field (see the file header for the method).
 *
 * @example
 * const { points, areaM2 } = fieldSamplePoints(fieldPolygon, readObstructions(trees), { antennaHeightM: 3 })
 * points.length // -> 64 (fewer only for a tiny field)
 */
export function fieldSamplePoints(
  field: FieldGeometry,
  obstructions: readonly ObstructionShape[],
  options: { count?: number; antennaHeightM?: number; maskDeg?: number } = {},
): { points: SamplePoint[]; areaM2: number; plane: LocalPlane } {
  const count = Math.max(1, Math.floor(options.count ?? 64))
  const polys = fieldPolygons(field)
  let minLon = Infinity
  let maxLon = -Infinity
  let minLat = Infinity
  let maxLat = -Infinity
  for (const rings of polys) for (const p of rings[0]) {
    minLon = Math.min(minLon, p[0])
    maxLon = Math.max(maxLon, p[0])
    minLat = Math.min(minLat, p[1])
    maxLat = Math.max(maxLat, p[1])
  }
  const plane = localPlane((minLat + maxLat) / 2, (minLon + maxLon) / 2)
  const polyXY = polys.map((rings) =>
    rings.map((ring) => {
      const a = new Float64Array(ring.length * 2)
      ring.forEach((p, i) => {
        const [x, y] = toPlane(plane, p[0], p[1])
        a[2 * i] = x
        a[2 * i + 1] = y
      })
      return a
    }),
  )
  let areaM2 = 0
  for (const rings of polyXY) {
    areaM2 += ringArea(rings[0])
    for (let r = 1; r < rings.length; r++) areaM2 -= ringArea(rings[r])
  }
  if (!(areaM2 > 0)) throw new Error('field: the polygon has no area')
  const [x0, y0] = toPlane(plane, minLon, minLat)
  const [x1, y1] = toPlane(plane, maxLon, maxLat)

  // Candidate cells.
  let spacing = Math.sqrt(areaM2 / Math.max(1500, count * 25))
  let cx: number[] = []
  let cy: number[] = []
  for (let attempt = 0; attempt < 8; attempt++) {
    cx = []
    cy = []
    for (let y = y0 + spacing / 2; y < y1; y += spacing) {
      for (let x = x0 + spacing / 2; x < x1; x += spacing) {
        if (polyXY.some((rings) => insideRings(rings, x, y))) {
          cx.push(x)
          cy.push(y)
        }
      }
    }
    if (cx.length >= Math.min(count * 4, 400)) break
    spacing /= 2
  }
  if (cx.length === 0) throw new Error('field: the polygon is too thin to place sample points')
  const nc = cx.length
  const cellArea = areaM2 / nc

  // Distances to obstructions and density.
  const antenna = options.antennaHeightM ?? 0
  const maskTan = Math.tan(Math.max(options.maskDeg ?? 10, 5) * DEG)
  const segs: number[] = []
  let reach = 15
  for (const o of obstructions) {
    reach = Math.max(reach, Math.min(300, (o.heightM - antenna) / maskTan))
    for (const path of o.paths) {
      for (let i = 1; i < path.length; i++) {
        const a = toPlane(plane, path[i - 1][0], path[i - 1][1])
        const b = toPlane(plane, path[i][0], path[i][1])
        segs.push(a[0], a[1], b[0], b[1])
      }
    }
  }
  const dist = new Float64Array(nc).fill(Infinity)
  const density = new Float64Array(nc).fill(1)
  if (segs.length > 0) {
    for (let c = 0; c < nc; c++) {
      let d = Infinity
      for (let s = 0; s < segs.length; s += 4) d = Math.min(d, segDistance(cx[c], cy[c], segs[s], segs[s + 1], segs[s + 2], segs[s + 3]))
      dist[c] = d
      density[c] = Math.sqrt(1 + 3 * Math.exp(-d / reach))
    }
  }

  // Farthest-point selection in density-scaled distance, from the cell nearest the centroid.
  let mx = 0
  let my = 0
  for (let c = 0; c < nc; c++) {
    mx += cx[c]
    my += cy[c]
  }
  mx /= nc
  my /= nc
  let first = 0
  let best = Infinity
  for (let c = 0; c < nc; c++) {
    const d = Math.hypot(cx[c] - mx, cy[c] - my)
    if (d < best) {
      best = d
      first = c
    }
  }
  const m = Math.min(count, nc)
  const chosen: number[] = [first]
  const dEff = new Float64Array(nc).fill(Infinity)
  for (let k = 1; k < m; k++) {
    const last = chosen[k - 1]
    let arg = -1
    let far = -1
    for (let c = 0; c < nc; c++) {
      const d = Math.hypot(cx[c] - cx[last], cy[c] - cy[last]) * density[c]
      if (d < dEff[c]) dEff[c] = d
      if (dEff[c] > far) {
        far = dEff[c]
        arg = c
      }
    }
    chosen.push(arg)
  }

  // Area of each point: the cells nearest to it.
  const weights = new Float64Array(m)
  for (let c = 0; c < nc; c++) {
    let bi = 0
    let bd = Infinity
    for (let k = 0; k < m; k++) {
      const d = (cx[c] - cx[chosen[k]]) ** 2 + (cy[c] - cy[chosen[k]]) ** 2
      if (d < bd) {
        bd = d
        bi = k
      }
    }
    weights[bi] += cellArea
  }
  const points: SamplePoint[] = chosen.map((c, k) => {
    const ll = fromPlane(plane, cx[c], cy[c])
    return {
      latDeg: ll.latDeg,
      lonDeg: ll.lonDeg,
      weightM2: weights[k],
      obstructionDistanceM: segs.length > 0 ? dist[c] : null,
    }
  })
  return { points, areaM2, plane }
}
