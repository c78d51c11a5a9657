// From an elevation model in its own CRS to the engine's local metric grid (TerrainGrid of
// shared/precision/terrain.ts) around an area: nodes every `cellM` in the local plane of the
// area's centre, each read from the model by bilinear interpolation. The CRS transform
// (proj4) is evaluated exactly on a coarse lattice every 16 nodes and interpolated linearly
// in between (over 16 nodes of a few metres the transform is linear to well under a
// centimetre). Also: the model's extent in longitude/latitude, and the heights packed for
// storage (Float32 little-endian, deflated, in chunks).
import { deflateSync, inflateSync } from 'node:zlib'
import proj4 from 'proj4'
import { fromPlane, localPlane, toPlane, type TerrainGrid } from '../../shared/precision/index.ts'
import type { ElevationModel } from './readers.ts'

const WGS84_GEO = '+proj=longlat +datum=WGS84 +no_defs'

export interface LonLatBox {
  minLonDeg: number
  minLatDeg: number
  maxLonDeg: number
  maxLatDeg: number
}

/** The model's outer edge in WGS-84 longitude/latitude (edges sampled, not only corners). */
export function modelBounds(model: Pick<ElevationModel, 'cols' | 'rows' | 'x0' | 'y0' | 'dx' | 'dy' | 'crs'>): LonLatBox {
  const inverse = proj4(model.crs, WGS84_GEO)
  const box = { minLonDeg: Infinity, minLatDeg: Infinity, maxLonDeg: -Infinity, maxLatDeg: -Infinity }
  const xs = [model.x0 - model.dx / 2, model.x0 + (model.cols - 0.5) * model.dx]
  const ys = [model.y0 - model.dy / 2, model.y0 + (model.rows - 0.5) * model.dy]
  for (let t = 0; t <= 16; t++) {
    const fx = xs[0] + ((xs[1] - xs[0]) * t) / 16
    const fy = ys[0] + ((ys[1] - ys[0]) * t) / 16
    for (const [x, y] of [[fx, ys[0]], [fx, ys[1]], [xs[0], fy], [xs[1], fy]]) {
      const [lon, lat] = inverse.forward([x, y])
      if (!Number.isFinite(lon) || !Number.isFinite(lat)) continue
      box.minLonDeg = Math.min(box.minLonDeg, lon)
      box.maxLonDeg = Math.max(box.maxLonDeg, lon)
      box.minLatDeg = Math.min(box.minLatDeg, lat)
      box.maxLatDeg = Math.max(box.maxLatDeg, lat)
    }
  }
  return box
}

export const boxesOverlap = (a: LonLatBox, b: LonLatBox) =>
  a.minLonDeg <= b.maxLonDeg && b.minLonDeg <= a.maxLonDeg && a.minLatDeg <= b.maxLatDeg && b.minLatDeg <= a.maxLatDeg

/** The longitude/latitude box of a GeoJSON geometry's coordinates. */
export function geometryBox(geometry: { coordinates: unknown }): LonLatBox {
  const box = { minLonDeg: Infinity, minLatDeg: Infinity, maxLonDeg: -Infinity, maxLatDeg: -Infinity }
  const walk = (c: unknown): void => {
    if (Array.isArray(c) && typeof c[0] === 'number') {
      box.minLonDeg = Math.min(box.minLonDeg, c[0] as number)
      box.maxLonDeg = Math.max(box.maxLonDeg, c[0] as number)
      box.minLatDeg = Math.min(box.minLatDeg, c[1] as number)
      box.maxLatDeg = Math.max(box.maxLatDeg, c[1] as number)
    } else if (Array.isArray(c)) c.forEach(walk)
  }
  walk(geometry.coordinates)
  return box
}

/** Node spacing of the model on the ground (m), about. */
export function modelCellM(model: Pick<ElevationModel, 'dx' | 'dy' | 'crs' | 'x0' | 'y0'>): number {
  const inverse = proj4(model.crs, WGS84_GEO)
  const [lon0, lat0] = inverse.forward([model.x0, model.y0])
  const [lon1, lat1] = inverse.forward([model.x0 + model.dx, model.y0 + model.dy])
  const plane = localPlane(lat0, lon0)
  const [ex, ny] = toPlane(plane, lon1, lat1)
  return Math.max(0.5, Math.min(Math.abs(ex), Math.abs(ny)))
}

const LATTICE = 16

/**
 * The model resampled to the engine's local grid over `box` plus `marginM` on every side.
 * The node spacing is the model's own (coarser when the area would pass 2.5 million nodes).
 *
 * @example
 * const grid = localTerrainGrid(model, geometryBox(field), 5000)
 * terrainHorizons(grid, points, 3)
 */
export function localTerrainGrid(model: ElevationModel, box: LonLatBox, marginM: number): TerrainGrid {
  const lat0 = (box.minLatDeg + box.maxLatDeg) / 2
  const lon0 = (box.minLonDeg + box.maxLonDeg) / 2
  const plane = localPlane(lat0, lon0)
  const [xa, ya] = toPlane(plane, box.minLonDeg, box.minLatDeg)
  const [xb, yb] = toPlane(plane, box.maxLonDeg, box.maxLatDeg)
  const west = Math.min(xa, xb) - marginM
  const east = Math.max(xa, xb) + marginM
  const south = Math.min(ya, yb) - marginM
  const north = Math.max(ya, yb) + marginM
  let cellM = modelCellM(model)
  const maxNodes = 2_500_000
  const nodes = ((east - west) / cellM + 1) * ((north - south) / cellM + 1)
  if (nodes > maxNodes) cellM *= Math.sqrt(nodes / maxNodes)
  const cols = Math.floor((east - west) / cellM) + 1
  const rows = Math.floor((north - south) / cellM) + 1
  const forward = proj4(WGS84_GEO, model.crs)
  // Model pixel coordinates on the coarse lattice.
  const lc = Math.ceil((cols - 1) / LATTICE) + 1
  const lr = Math.ceil((rows - 1) / LATTICE) + 1
  const lpx = new Float64Array(lc * lr)
  const lpy = new Float64Array(lc * lr)
  for (let j = 0; j < lr; j++) {
    for (let i = 0; i < lc; i++) {
      const p = fromPlane(plane, west + i * LATTICE * cellM, north - j * LATTICE * cellM)
      const [x, y] = forward.forward([p.lonDeg, p.latDeg])
      lpx[j * lc + i] = (x - model.x0) / model.dx
      lpy[j * lc + i] = (y - model.y0) / model.dy
    }
  }
  const heightsM = new Float32Array(cols * rows)
  const mh = model.heightsM
  const mc = model.cols
  for (let j = 0; j < rows; j++) {
    const lj = Math.min(lr - 2, Math.floor(j / LATTICE))
    const ty = j / LATTICE - lj
    for (let i = 0; i < cols; i++) {
      const li = Math.min(lc - 2, Math.floor(i / LATTICE))
      const tx = i / LATTICE - li
      const o = lj * lc + li
      const fx = (lpx[o] * (1 - tx) + lpx[o + 1] * tx) * (1 - ty) + (lpx[o + lc] * (1 - tx) + lpx[o + lc + 1] * tx) * ty
      const fy = (lpy[o] * (1 - tx) + lpy[o + 1] * tx) * (1 - ty) + (lpy[o + lc] * (1 - tx) + lpy[o + lc + 1] * tx) * ty
      let v = NaN
      if (fx >= 0 && fy >= 0 && fx <= mc - 1 && fy <= model.rows - 1) {
        const a = Math.min(mc - 2, Math.floor(fx))
        const b = Math.min(model.rows - 2, Math.floor(fy))
        const u = fx - a
        const w = fy - b
        const q = b * mc + a
        v = (mh[q] * (1 - u) + mh[q + 1] * u) * (1 - w) + (mh[q + mc] * (1 - u) + mh[q + mc + 1] * u) * w
      }
      heightsM[j * cols + i] = v
    }
  }
  return { originLatDeg: lat0, originLonDeg: lon0, x0M: west, y0M: north, cellM, cols, rows, heightsM }
}

/** Raw bytes per stored chunk (before deflating): 4 MiB, below MariaDB's default packet size. */
const CHUNK_BYTES = 4 * 1024 * 1024

/** Heights packed for storage: Float32 little-endian, deflated, in chunks. */
export function packHeights(heightsM: Float32Array): Buffer[] {
  const raw = Buffer.alloc(heightsM.length * 4)
  heightsM.forEach((v, i) => raw.writeFloatLE(v, i * 4))
  const out: Buffer[] = []
  for (let o = 0; o < raw.length; o += CHUNK_BYTES) out.push(deflateSync(raw.subarray(o, o + CHUNK_BYTES), { level: 6 }))
  return out
}

/** The inverse of packHeights. */
export function unpackHeights(chunks: readonly Buffer[], cells: number): Float32Array {
  const raw = Buffer.concat(chunks.map((c) => inflateSync(c)))
  if (raw.length !== cells * 4) throw new Error(`stored elevation model: ${raw.length / 4} heights, expected ${cells}`)
  const out = new Float32Array(cells)
  for (let i = 0; i < cells; i++) out[i] = raw.readFloatLE(i * 4)
  return out
}
