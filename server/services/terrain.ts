// A farm's elevation model (terrain): upload (GeoTIFF or ESRI ASCII grid, replacing the
// previous one in one transaction), read, remove, and the terrain horizon of a point for
// the sky check. 'terrain.changed' is emitted after each commit; the forecast triggers then
// queue the fields of the farm.
import type { Feature, Polygon, MultiPolygon } from 'geojson'
import { terrainHorizonInto } from '../../shared/precision/index.ts'
import type { SessionUser } from '../../shared/schemas/auth.ts'
import { TERRAIN_SETTINGS, type ElevationModelInfo, type TerrainHorizon, type TerrainHorizonQuery } from '../../shared/schemas/terrain.ts'
import { assertFarmVisible } from '../auth/access.ts'
import type { Repositories } from '../db/repositories/index.ts'
import type { ElevationModelRow } from '../db/schema-terrain.ts'
import { emit } from '../events.ts'
import { badRequest, notFound } from '../http/errors.ts'
import { boxesOverlap, geometryBox, modelCellM } from '../terrain/grid.ts'
import { readElevationModel, TerrainFileError, type ElevationModel } from '../terrain/readers.ts'
import { modelCovering, modelRecord, rowBounds, terrainGridFor, type ModelRecord } from '../terrain/store.ts'
import type { ServiceContext } from './context.ts'

export interface UploadedFile {
  buffer: Buffer
  originalname: string
}

type FieldBoundary = Polygon | MultiPolygon | Feature<Polygon | MultiPolygon>
const geometryOf = (text: string): { coordinates: unknown } => {
  const g = JSON.parse(text) as FieldBoundary
  return g.type === 'Feature' ? g.geometry : g
}

async function info(repos: Repositories, row: ElevationModelRow): Promise<ElevationModelInfo> {
  const fields = await repos.fields.listByFarm(row.farmId)
  const box = rowBounds(row)
  return {
    farmId: row.farmId,
    fileName: row.fileName,
    format: row.format as ElevationModelInfo['format'],
    crsLabel: row.crsLabel,
    cols: row.cols,
    rows: row.rows,
    cellM: Math.round(modelCellM(row) * 10) / 10,
    bounds: box,
    minHeightM: row.minHeightM,
    maxHeightM: row.maxHeightM,
    nodataShare: row.nodataShare,
    fieldsCovered: fields.filter((f) => boxesOverlap(box, geometryBox(geometryOf(f.boundary)))).map((f) => ({ id: f.id, name: f.name })),
    createdAt: row.createdAt.toISOString(),
  }
}

/** The model checked and packed for storage; a 400 naming what is wrong. */
function modelRecordOrError(model: ElevationModel): ModelRecord {
  try {
    return modelRecord(model)
  } catch (e) {
    if (e instanceof TerrainFileError) throw badRequest(e.message, { file: e.message })
    throw e
  }
}

export function createTerrainService(ctx: ServiceContext) {
  const { store } = ctx

  async function assertFarm(user: SessionUser, farmId: number): Promise<void> {
    assertFarmVisible(user, farmId)
    if (!(await store.repos.farms.findById(farmId))) throw notFound('The farm')
  }

  return {
    /** The farm's model, or null when it has none. */
    async get(user: SessionUser, farmId: number): Promise<ElevationModelInfo | null> {
      await assertFarm(user, farmId)
      const row = await store.repos.terrain.findByFarm(farmId)
      return row ? info(store.repos, row) : null
    },

    /** Reads, checks and stores an elevation model for the farm (replacing the previous one). */
    async upload(user: SessionUser, farmId: number, file: UploadedFile | undefined, prjText: string | null): Promise<ElevationModelInfo> {
      await assertFarm(user, farmId)
      if (!file || file.buffer.length === 0) throw badRequest('Send the elevation model (GeoTIFF or ESRI ASCII grid) in the form field "file".', { file: 'Required.' })
      let model
      try {
        model = await readElevationModel(new Uint8Array(file.buffer), { prjText })
      } catch (e) {
        if (e instanceof TerrainFileError) throw badRequest(e.message, { file: e.message })
        throw e
      }
      const record = modelRecordOrError(model)
      const bounds = record.bounds
      const fields = await store.repos.fields.listByFarm(farmId)
      if (fields.length === 0) throw badRequest('The farm has no fields yet: draw or import a field before uploading an elevation model.', { file: 'No fields.' })
      const covered = fields.filter((f) => boxesOverlap(bounds, geometryBox(geometryOf(f.boundary))))
      if (covered.length === 0) {
        const b = bounds
        const msg = `The elevation model (longitude ${b.minLonDeg.toFixed(3)} to ${b.maxLonDeg.toFixed(3)}, latitude ${b.minLatDeg.toFixed(3)} to ${b.maxLatDeg.toFixed(3)}, ${model.crsLabel}) misses every field of the farm.`
        throw badRequest(msg, { file: msg })
      }
      const row = await store.transaction(async (repos) => {
        await repos.terrain.replace({ farmId, fileName: file.originalname.slice(0, 255) || 'elevation model', uploadedBy: user.id, ...record.row }, record.chunks)
        return (await repos.terrain.findByFarm(farmId))!
      })
      void emit('terrain.changed', { farmId })
      return info(store.repos, row)
    },

    async remove(user: SessionUser, farmId: number): Promise<void> {
      await assertFarm(user, farmId)
      const removed = await store.transaction((repos) => repos.terrain.removeByFarm(farmId))
      if (!removed) throw notFound("The farm's elevation model")
      void emit('terrain.changed', { farmId })
    },

    /** The terrain horizon of a point (the sky check); horizonDeg null when the model does not cover it. */
    async horizon(user: SessionUser, farmId: number, q: TerrainHorizonQuery): Promise<TerrainHorizon> {
      await assertFarm(user, farmId)
      const point = { type: 'Point', coordinates: [q.lonDeg, q.latDeg] }
      const base = { maxDistanceM: TERRAIN_SETTINGS.maxDistanceM, refractionK: TERRAIN_SETTINGS.refractionK }
      const row = await modelCovering(store.repos, farmId, point)
      if (!row) return { horizonDeg: null, groundM: null, ...base }
      const grid = await terrainGridFor(store.repos, row, point)
      const out = new Float64Array(360)
      const ground = terrainHorizonInto(out, grid, { latDeg: q.latDeg, lonDeg: q.lonDeg }, q.antennaHeightM, TERRAIN_SETTINGS)
      if (!Number.isFinite(ground)) return { horizonDeg: null, groundM: null, ...base }
      return { horizonDeg: Array.from(out, (v) => Math.round(v * 1000) / 1000), groundM: Math.round(ground * 10) / 10, ...base }
    },
  }
}
