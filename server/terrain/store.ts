// Loading a farm's stored elevation model for the forecasts, the hour detail and the sky
// check, and cutting the engine's local grid for a field or a point. The decoded model of
// the last farms used is kept in memory by content hash (the heights never change in place:
// a new upload is a new hash).
import { createHash } from 'node:crypto'
import type { TerrainGrid } from '../../shared/precision/index.ts'
import { TERRAIN_SETTINGS } from '../../shared/schemas/terrain.ts'
import type { Repositories } from '../db/repositories/index.ts'
import type { ElevationModelRow } from '../db/schema-terrain.ts'
import type { NewElevationModel } from '../db/schema-terrain.ts'
import { boxesOverlap, geometryBox, localTerrainGrid, modelBounds, packHeights, unpackHeights, type LonLatBox } from './grid.ts'
import { TerrainFileError, type ElevationModel } from './readers.ts'

const cache = new Map<string, ElevationModel>()
const CACHE_SIZE = 2

export const rowBounds = (row: ElevationModelRow): LonLatBox => ({
  minLonDeg: row.minLonDeg,
  minLatDeg: row.minLatDeg,
  maxLonDeg: row.maxLonDeg,
  maxLatDeg: row.maxLatDeg,
})

/** SHA-256 over the heights and the georeferencing. */
export function modelSha(m: ElevationModel): string {
  const h = createHash('sha256')
  h.update(JSON.stringify([m.cols, m.rows, m.x0, m.y0, m.dx, m.dy, m.crs]))
  h.update(new Uint8Array(m.heightsM.buffer, m.heightsM.byteOffset, m.heightsM.byteLength))
  return h.digest('hex')
}

async function decoded(repos: Repositories, row: ElevationModelRow): Promise<ElevationModel> {
  const hit = cache.get(row.contentSha)
  if (hit) return hit
  const heightsM = unpackHeights(await repos.terrain.chunks(row.id), row.cols * row.rows)
  const model: ElevationModel = {
    format: row.format as ElevationModel['format'],
    cols: row.cols,
    rows: row.rows,
    heightsM,
    x0: row.x0,
    y0: row.y0,
    dx: row.dx,
    dy: row.dy,
    crs: row.crs,
    crsLabel: row.crsLabel,
  }
  cache.set(row.contentSha, model)
  while (cache.size > CACHE_SIZE) cache.delete(cache.keys().next().value!)
  return model
}

/** The farm's model row when it covers the geometry (a field boundary); else null. */
export async function modelCovering(repos: Repositories, farmId: number, geometry: { coordinates: unknown }): Promise<ElevationModelRow | null> {
  const row = await repos.terrain.findByFarm(farmId)
  if (!row) return null
  return boxesOverlap(rowBounds(row), geometryBox(geometry)) ? row : null
}

/** The engine's terrain grid around a geometry (field or point), reaching TERRAIN_SETTINGS.maxDistanceM. */
export async function terrainGridFor(repos: Repositories, row: ElevationModelRow, geometry: { coordinates: unknown }): Promise<TerrainGrid> {
  const model = await decoded(repos, row)
  return localTerrainGrid(model, geometryBox(geometry), TERRAIN_SETTINGS.maxDistanceM)
}

/** What the forecast inputs version covers of the terrain. */
export const terrainVersionOf = (row: ElevationModelRow | null) =>
  row ? `${row.contentSha}:${TERRAIN_SETTINGS.maxDistanceM}:${TERRAIN_SETTINGS.refractionK}` : null

/** A field boundary's geometry (a Feature's or the bare one) from its stored GeoJSON text. */
export function boundaryGeometry(text: string): { coordinates: unknown } {
  const g = JSON.parse(text) as { type: string; geometry?: { coordinates: unknown }; coordinates?: unknown }
  return g.type === 'Feature' && g.geometry ? g.geometry : (g as { coordinates: unknown })
}

/** The farm's elevation model row when it covers the field; else null. */
export function terrainOfField(repos: Repositories, field: { farmId: number; boundary: string }): Promise<ElevationModelRow | null> {
  return modelCovering(repos, field.farmId, boundaryGeometry(field.boundary))
}

/** What is stored of a model: the row (less farm, file name and uploader) and the packed heights. */
export interface ModelRecord {
  row: Omit<NewElevationModel, 'farmId' | 'fileName' | 'uploadedBy'>
  chunks: Buffer[]
  bounds: LonLatBox
}

/** Checks a model (some heights, coordinates on the earth) and packs it; throws TerrainFileError. */
export function modelRecord(model: ElevationModel): ModelRecord {
  let valid = 0
  let minH = Infinity
  let maxH = -Infinity
  for (const v of model.heightsM) {
    if (v !== v) continue
    valid++
    if (v < minH) minH = v
    if (v > maxH) maxH = v
  }
  if (valid === 0) throw new TerrainFileError('Every cell of the elevation model is nodata.')
  let bounds: LonLatBox
  try {
    bounds = modelBounds(model)
  } catch (e) {
    throw new TerrainFileError(`The elevation model's coordinates cannot be transformed to longitude/latitude (${(e as Error).message}).`)
  }
  if (!(bounds.minLatDeg >= -90 && bounds.maxLatDeg <= 90 && bounds.minLonDeg >= -180 && bounds.maxLonDeg <= 180)) {
    throw new TerrainFileError('The elevation model lies outside longitude -180..180 / latitude -90..90: check its coordinate system.')
  }
  return {
    row: {
      format: model.format,
      crs: model.crs,
      crsLabel: model.crsLabel.slice(0, 255),
      cols: model.cols,
      rows: model.rows,
      x0: model.x0,
      y0: model.y0,
      dx: model.dx,
      dy: model.dy,
      ...bounds,
      minHeightM: minH,
      maxHeightM: maxH,
      nodataShare: 1 - valid / model.heightsM.length,
      contentSha: modelSha(model),
    },
    chunks: packHeights(model.heightsM),
    bounds,
  }
}
