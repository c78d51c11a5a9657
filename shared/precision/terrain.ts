/**
 * Terrain horizon of a point from an elevation model (hills and valley sides).
 *
 * The model reaches the engine as a local metric grid (`TerrainGrid`): heights at nodes
 * spaced `cellM` apart in the local plane of geodesy.ts around an origin (x east,
 * y north), row 0 the northern-most. Readers of GeoTIFF / ESRI ASCII grids and the
 * transform from their CRS live outside the engine (server/terrain/).
 *
 * Geometry. From an antenna at height h0 = ground + antenna height, a terrain point of
 * height h at horizontal distance d is seen at the elevation angle
 *     el = atan((h - h0 - c d^2) / d),   c = (1 - k) / (2 R)
 * - d^2 / (2R) is the curvature drop: a point at arc distance d on a sphere of radius R
 *   lies R (1 - cos(d/R)) ~ d^2 / (2R) below the observer's tangent plane (second-order
 *   Taylor term of the cosine).
 * - Refraction bends the line of sight with the earth; the usual model replaces R by
 *   R / (1 - k) with the refraction coefficient k. The default, TERRAIN_REFRACTION_K =
 *   0.13, is the coefficient C. F. Gauss derived in 1826 from the vertical angles of his
 *   survey of Hanover, given with +-25 % (F. K. Brunner (ed.), "Geodetic Refraction",
 *   Springer 1984, introduction; quoted second-hand, the book not checked); it is the value
 *   commonly used for optical lines of sight (common practice). For radio the 4/3-earth
 *   model (k = 0.25, ITU-R Recommendation P.453; from memory) is also usual; over the 5 km reach the two differ by
 *   0.24 m of drop, under 0.003 deg. One default for the server, the command line and
 *   the engine.
 * - R = 6 371 008.8 m, the mean earth radius R1 = (2a + b) / 3 of GRS 80 (H. Moritz,
 *   "Geodetic Reference System 1980", Journal of Geodesy 74 (2000) 128-133).
 *
 * Bins. Rays leave the point every 0.5 deg of azimuth; bin k (azimuths [k, k+1)) takes the
 * highest of the rays at k, k + 0.5 and k + 1, so a ridge square to the point is caught
 * at its nearest distance. Along a ray the ground is read by bilinear interpolation every
 * `cellM` for the first 200 nodes, then every d / 200 in whole nodes (about 0.3 deg of
 * arc, finer than the 0.5 deg between rays; common practice), out to `maxDistanceM`; a ray stops at the edge of the grid; nodes without data
 * (NaN) are skipped. A ray also stops once even the highest node of the grid can no
 * longer rise above the angle already found (the bound falls with distance).
 * Angles below the horizontal count as 0 (nothing blocked), as in the obstruction mask.
 */
import { DEG, RAD } from './constants'
import { localPlane, toPlane } from './geodesy'

/** GRS 80 mean earth radius R1 (m), Moritz (2000). */
export const EARTH_MEAN_RADIUS_M = 6_371_008.8
/** Default reach of the terrain horizon (m). */
export const TERRAIN_MAX_DISTANCE_M = 5000
/** Default refraction coefficient k of the terrain horizon (Gauss's 0.13; see the header). */
export const TERRAIN_REFRACTION_K = 0.13

/** A terrain grid in the engine's local plane (plain data, structured-clone friendly). */
export interface TerrainGrid {
  /** origin of the local plane (deg) */
  originLatDeg: number
  originLonDeg: number
  /** local-plane x (east, m) of column 0 and y (north, m) of row 0 */
  x0M: number
  y0M: number
  /** node spacing (m), the same east and north */
  cellM: number
  cols: number
  rows: number
  /** heights above the geoid or ellipsoid (m), row-major, row 0 north; NaN = no data */
  heightsM: Float32Array
}

/** Settings of the terrain horizon. */
export interface TerrainOptions {
  /** reach (m), default 5000 */
  maxDistanceM?: number
  /** refraction coefficient k, default TERRAIN_REFRACTION_K (0.13); 0 for none */
  refractionK?: number
}

/** Terrain for a forecast: a grid, and/or horizons already computed for its points. */
export interface TerrainInput {
  grid: TerrainGrid | null
  options?: TerrainOptions
  /**
   * Horizons already computed (deg, index point * 360 + k): for a field, those of its sample
   * points (fieldTerrainHorizons); for a single point (sky view, point forecast), its 360
   * entries. Used instead of the grid when the length fits.
   */
  pointHorizonsDeg?: Float64Array | number[]
}

/** Reads a height by bilinear interpolation at fractional column fx, row fy; NaN outside or without data. */
export function gridHeightAt(grid: TerrainGrid, fx: number, fy: number): number {
  const cols = grid.cols
  if (!(fx >= 0 && fy >= 0 && fx <= cols - 1 && fy <= grid.rows - 1)) return NaN
  let i = Math.floor(fx)
  let j = Math.floor(fy)
  if (i === cols - 1) i--
  if (j === grid.rows - 1) j--
  if (i < 0 || j < 0) return grid.heightsM[0]
  const tx = fx - i
  const ty = fy - j
  const h = grid.heightsM
  const o = j * cols + i
  return (h[o] * (1 - tx) + h[o + 1] * tx) * (1 - ty) + (h[o + cols] * (1 - tx) + h[o + cols + 1] * tx) * ty
}

/** Highest height of the grid (m), NaN-free; -Infinity when it holds no data. */
export function gridMaxHeight(grid: TerrainGrid): number {
  let mx = -Infinity
  const h = grid.heightsM
  for (let i = 0; i < h.length; i++) if (h[i] > mx) mx = h[i]
  return mx
}

/** Ground height (m) under a point, bilinear; NaN off the grid or without data. */
export function terrainGroundM(grid: TerrainGrid, point: { latDeg: number; lonDeg: number }): number {
  const plane = localPlane(grid.originLatDeg, grid.originLonDeg)
  const [x, y] = toPlane(plane, point.lonDeg, point.latDeg)
  return gridHeightAt(grid, (x - grid.x0M) / grid.cellM, (grid.y0M - y) / grid.cellM)
}

const RAYS = 720
/** Past STEP_PER_DISTANCE nodes from the point, the step along a ray grows with distance (d / 200, whole nodes). */
const STEP_PER_DISTANCE = 200

/**
 * Terrain horizon of one point into `out` (360 entries, deg): entry k = highest terrain
 * elevation over azimuths [k, k+1) seen from the antenna. Returns the ground height under
 * the point (m), or NaN when the grid has none there (then `out` is all 0).
 * `maxHeightM` (the grid's highest node, see gridMaxHeight) may be passed when many
 * points share one grid.
 *
 * @example
 * const out = new Float64Array(360)
 * terrainHorizonInto(out, grid, { latDeg: 47.1, lonDeg: 9.5 }, 3, { maxDistanceM: 5000, refractionK: 0.13 })
 * out[90] // -> 12.4 (deg: the valley wall to the east)
 */
export function terrainHorizonInto(
  out: Float64Array,
  grid: TerrainGrid,
  point: { latDeg: number; lonDeg: number },
  antennaHeightM: number,
  options: TerrainOptions = {},
  maxHeightM: number = gridMaxHeight(grid),
): number {
  out.fill(0)
  const maxDistanceM = options.maxDistanceM ?? TERRAIN_MAX_DISTANCE_M
  const k = options.refractionK ?? TERRAIN_REFRACTION_K
  if (!(maxDistanceM > 0)) throw new Error('terrain: the reach must be > 0 m')
  if (!(k >= 0 && k < 1)) throw new Error('terrain: the refraction coefficient must be in [0, 1)')
  const plane = localPlane(grid.originLatDeg, grid.originLonDeg)
  const [x, y] = toPlane(plane, point.lonDeg, point.latDeg)
  const cell = grid.cellM
  const px = (x - grid.x0M) / cell
  const py = (grid.y0M - y) / cell
  const ground = gridHeightAt(grid, px, py)
  if (!Number.isFinite(ground)) return NaN
  const h0 = ground + antennaHeightM
  const c = (1 - k) / (2 * EARTH_MEAN_RADIUS_M)
  const steps = Math.floor(maxDistanceM / cell)
  const cols = grid.cols
  const rows = grid.rows
  const hs = grid.heightsM
  const top = maxHeightM - h0
  const rayTan = new Float64Array(RAYS + 1)
  for (let r = 0; r < RAYS; r++) {
    const az = (r * 360) / RAYS
    const dx = Math.sin(az * DEG)
    const dy = -Math.cos(az * DEG)
    let best = -Infinity
    for (let s = 1; s <= steps; s += s < STEP_PER_DISTANCE ? 1 : Math.floor(s / STEP_PER_DISTANCE)) {
      const d = s * cell
      const drop = c * d * d
      // The highest node cannot rise above the best angle beyond here: stop.
      if ((top - drop) / d <= best) break
      const fx = px + s * dx
      const fy = py + s * dy
      if (!(fx >= 0 && fy >= 0 && fx <= cols - 1 && fy <= rows - 1)) break
      let i = Math.floor(fx)
      let j = Math.floor(fy)
      if (i === cols - 1) i--
      if (j === rows - 1) j--
      const tx = fx - i
      const ty = fy - j
      const o = j * cols + i
      const h = (hs[o] * (1 - tx) + hs[o + 1] * tx) * (1 - ty) + (hs[o + cols] * (1 - tx) + hs[o + cols + 1] * tx) * ty
      if (h !== h) continue // no data
      const t = (h - h0 - drop) / d
      if (t > best) best = t
    }
    rayTan[r] = best
  }
  rayTan[RAYS] = rayTan[0]
  for (let b = 0; b < 360; b++) {
    const t = Math.max(rayTan[2 * b], rayTan[2 * b + 1], rayTan[2 * b + 2])
    out[b] = t > 0 ? Math.atan(t) * RAD : 0
  }
  return ground
}

/**
 * Terrain horizons of many points (once per field and model, never per epoch):
 * 360 entries per point, index point * 360 + k.
 *
 * @example
 * const masks = terrainHorizons(grid, samplePoints, 3.2, { refractionK: 0.13 })
 * masks[5 * 360 + 90] // -> elevation (deg) of the terrain east of point 5
 */
export function terrainHorizons(
  grid: TerrainGrid,
  points: ReadonlyArray<{ latDeg: number; lonDeg: number }>,
  antennaHeightM: number,
  options: TerrainOptions = {},
): Float64Array {
  checkTerrainGrid(grid)
  const out = new Float64Array(points.length * 360)
  const one = new Float64Array(360)
  const top = gridMaxHeight(grid)
  points.forEach((p, i) => {
    terrainHorizonInto(one, grid, p, antennaHeightM, options, top)
    out.set(one, i * 360)
  })
  return out
}

/** Checks a grid's shape; throws an Error naming what is wrong. */
export function checkTerrainGrid(grid: TerrainGrid): void {
  if (!(Number.isInteger(grid.cols) && Number.isInteger(grid.rows) && grid.cols >= 2 && grid.rows >= 2)) {
    throw new Error('terrain: the grid needs at least 2 x 2 nodes')
  }
  if (grid.heightsM.length !== grid.cols * grid.rows) throw new Error('terrain: the heights do not match the grid size')
  if (!(grid.cellM > 0)) throw new Error('terrain: the node spacing must be > 0 m')
}

/** The higher of two horizon masks in each direction, into `into`. */
export function combineHorizonInto(into: Float64Array | number[], other: ArrayLike<number>, offset = 0): void {
  for (let k = 0; k < 360; k++) {
    const v = other[offset + k]
    if (v > into[k]) into[k] = v
  }
}

/**
 * The terrain horizon (360 entries, deg) of a single point: the precomputed 360 entries
 * when given, else from the grid; null when neither applies.
 *
 * @example
 * pointTerrainHorizon({ grid }, { latDeg: 47.1, lonDeg: 9.5 }, 3)?.[90] // -> 12.4
 */
export function pointTerrainHorizon(
  terrain: TerrainInput,
  point: { latDeg: number; lonDeg: number },
  antennaHeightM: number,
): Float64Array | null {
  if (terrain.pointHorizonsDeg && terrain.pointHorizonsDeg.length === 360) return Float64Array.from(terrain.pointHorizonsDeg)
  if (!terrain.grid) return null
  checkTerrainGrid(terrain.grid)
  const out = new Float64Array(360)
  terrainHorizonInto(out, terrain.grid, point, antennaHeightM, terrain.options)
  return out
}
