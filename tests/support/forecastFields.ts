// Invented test fields for the forecast job tests and the server benchmark: rectangles of
// farmland near the demo farms, each with a tree line along one edge. Written through the
// repositories, only when a farm has fewer fields than asked for.
import { forecastWindow } from '../../shared/schemas/forecast.ts'
import type { Database } from '../../server/db/index.ts'
import { createRepositories } from '../../server/db/repositories/index.ts'

/** Corner (lon, lat) of the first invented field of each demo farm, by farm name order. */
const anchors: Array<[number, number]> = [
  [-93.62, 42.03],
  [-97.34, 38.84],
  [-104.71, 39.58],
  [-98.41, 40.93],
]

/** A rectangle of about `widthM` x `heightM` metres with its south-west corner at (lon, lat). */
export function rectangle(lon: number, lat: number, widthM = 400, heightM = 300) {
  const dLat = heightM / 111_320
  const dLon = widthM / (111_320 * Math.cos((lat * Math.PI) / 180))
  return {
    type: 'Polygon' as const,
    coordinates: [[[lon, lat], [lon + dLon, lat], [lon + dLon, lat + dLat], [lon, lat + dLat], [lon, lat]]],
  }
}

/**
 * Makes sure every farm has at least `perFarm` fields (invented "Test plot" fields with a
 * tree line on their north edge); returns the ids of all fields, lowest first (the
 * demo's own fields, seeded before any test file runs, then the rest).
 */
export async function ensureForecastFields(db: Database, perFarm: number): Promise<number[]> {
  const repos = createRepositories(db)
  const rtk = await repos.serviceLevels.findByName('RTK')
  const level = rtk ?? (await repos.serviceLevels.list())[0]
  if (!level) throw new Error('No service level: seed the planning data first.')
  const farmList = (await repos.farms.list({ page: 1, pageSize: 200, order: 'asc', sort: 'name' })).rows
  for (const [f, farm] of farmList.entries()) {
    const existing = await repos.fields.listByFarm(farm.id)
    const [lon0, lat0] = anchors[f % anchors.length]
    for (let i = existing.length; i < perFarm; i++) {
      const lon = lon0 + i * 0.007
      const boundary = rectangle(lon, lat0)
      const ring = boundary.coordinates[0]
      await repos.fields.insert({
        farmId: farm.id,
        name: `Test plot ${i + 1}`,
        crop: 'corn',
        notes: 'Invented for the forecast job tests.',
        serviceLevelId: level.id,
        antennaHeightM: 3.5,
        boundary: JSON.stringify(boundary),
        areaHa: 12,
        centroidLat: (ring[0][1] + ring[2][1]) / 2,
        centroidLon: (ring[0][0] + ring[2][0]) / 2,
      })
      await repos.obstructions.insert({
        farmId: farm.id,
        kind: 'deciduous',
        heightM: 18,
        geometry: JSON.stringify({ type: 'LineString', coordinates: [[ring[3][0], ring[3][1] + 0.0002], [ring[2][0], ring[2][1] + 0.0002]] }),
        leaflessFrom: null,
        leaflessTo: null,
        note: `Cottonwood row north of Test plot ${i + 1} (invented)`,
      })
    }
  }
  return (await repos.fields.listAll()).map((f) => f.id).sort((a, b) => a - b)
}

/** The forecast window of a field's farm (its local week) at `nowMs`. */
export async function fieldWindow(db: Database, fieldId: number, nowMs = Date.now()) {
  const field = await createRepositories(db).forecasts.fieldWithSigma(fieldId)
  if (!field) throw new Error(`field ${fieldId} is gone`)
  return forecastWindow(nowMs, field.farmTimeZone)
}
