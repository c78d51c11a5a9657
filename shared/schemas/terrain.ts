// Elevation models (terrain) of a farm: what the API returns, and the horizon query.
import { z } from 'zod'
import { TERRAIN_MAX_DISTANCE_M, TERRAIN_REFRACTION_K } from '../precision/terrain'

/** A farm's stored elevation model. */
export const elevationModelSchema = z.object({
  farmId: z.number(),
  fileName: z.string(),
  format: z.enum(['geotiff', 'ascii-grid']),
  crsLabel: z.string(),
  cols: z.number(),
  rows: z.number(),
  /** node spacing on the ground (m), about */
  cellM: z.number(),
  bounds: z.object({ minLonDeg: z.number(), minLatDeg: z.number(), maxLonDeg: z.number(), maxLatDeg: z.number() }),
  minHeightM: z.number().nullable(),
  maxHeightM: z.number().nullable(),
  nodataShare: z.number(),
  /** fields of the farm the model covers (their forecasts use it) */
  fieldsCovered: z.array(z.object({ id: z.number(), name: z.string() })),
  createdAt: z.string(),
})
export type ElevationModelInfo = z.infer<typeof elevationModelSchema>

/** GET /api/farms/:id/terrain/horizon */
export const terrainHorizonQuerySchema = z.object({
  latDeg: z.coerce.number().min(-90).max(90),
  lonDeg: z.coerce.number().min(-180).max(180),
  antennaHeightM: z.coerce.number().min(0).max(50).default(3),
})
export type TerrainHorizonQuery = z.infer<typeof terrainHorizonQuerySchema>

/** The terrain horizon of a point: 360 entries (deg), entry k over azimuths [k, k+1); null where the model has no ground. */
export interface TerrainHorizon {
  horizonDeg: number[] | null
  groundM: number | null
  maxDistanceM: number
  refractionK: number
}

/** Reach and refraction of the terrain horizon in the stored forecasts, the hour detail and the sky check: the engine's defaults. */
export const TERRAIN_SETTINGS = { maxDistanceM: TERRAIN_MAX_DISTANCE_M, refractionK: TERRAIN_REFRACTION_K } as const
