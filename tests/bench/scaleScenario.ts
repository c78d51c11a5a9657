/**
 * The invented scenario of `npm run bench:scale`: farms spread over a few hundred km of
 * the US corn belt (so that their skies differ), each with rectangular fields of varied
 * size, every field with a tree line along one edge (deciduous cottonwood or evergreen
 * spruce, alternately) and a machine shed on every fifth. All names are invented.
 * Written through the repositories, after the demo seed (whose farms count towards the
 * farms and whose fields count towards the fields).
 */
import type { Database } from '../../server/db/index.ts'
import { createRepositories } from '../../server/db/repositories/index.ts'
import { rectangle } from '../support/forecastFields.ts'

/** A small deterministic generator (mulberry32) so every run builds the same scenario. */
function random(seed: number): () => number {
  let a = seed >>> 0
  return () => {
    a = (a + 0x6d2b79f5) >>> 0
    let t = a
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4_294_967_296
  }
}

const FARM_WORDS = ['Willow', 'Prairie', 'Cedar', 'Stone', 'Maple', 'Meadow', 'Clover', 'Hawk', 'Aspen', 'Sorrel']
const FARM_ENDS = ['Bend', 'Ridge', 'Flats', 'Creek', 'Hollow']

/**
 * Adds farms until there are `farmCount` and fields until there are `fieldCount`, spread
 * evenly over the farms (the generated farms get the remainder first). Farms lie on a
 * jittered grid over about 6 degrees of longitude and 3 of latitude (about 500 x 330 km).
 */
export async function buildScaleScenario(db: Database, fieldCount: number, farmCount = 40): Promise<{ farms: number; fields: number }> {
  const repos = createRepositories(db)
  const rnd = random(15)
  const level = (await repos.serviceLevels.findByName('RTK')) ?? (await repos.serviceLevels.list())[0]
  if (!level) throw new Error('No service level: seed the planning data first.')
  const existingFarms = (await repos.farms.list({ page: 1, pageSize: 500, order: 'asc', sort: 'name' })).rows
  const existingFields = (await repos.fields.listAll()).length
  const toAdd = Math.max(0, fieldCount - existingFields)
  const newFarms = Math.max(1, farmCount - existingFarms.length)
  const perFarm = Math.floor(toAdd / newFarms)
  let extra = toAdd - perFarm * newFarms
  const cols = 6
  for (let f = 0; f < newFarms; f++) {
    const lat0 = 40.5 + Math.floor(f / cols) * (3 / Math.ceil(newFarms / cols)) + rnd() * 0.2
    const lon0 = -98.5 + (f % cols) * 1.0 + rnd() * 0.3
    const name = `${FARM_WORDS[f % FARM_WORDS.length]} ${FARM_ENDS[Math.floor(f / FARM_WORDS.length) % FARM_ENDS.length]} Farm ${f + 1}`
    const farmId = await repos.farms.insert({
      name,
      timeZone: 'America/Chicago',
      address: '',
      notes: 'Invented for the scale benchmark.',
    })
    const count = perFarm + (extra > 0 ? 1 : 0)
    if (extra > 0) extra--
    for (let i = 0; i < count; i++) {
      const widthM = 250 + Math.round(rnd() * 550)
      const heightM = 200 + Math.round(rnd() * 400)
      // Fields in rows of five, 900 m apart.
      const lat = lat0 + Math.floor(i / 5) * 0.0085
      const lon = lon0 + (i % 5) * 0.011
      const boundary = rectangle(lon, lat, widthM, heightM)
      const ring = boundary.coordinates[0]
      await repos.fields.insert({
        farmId,
        name: `Parcel ${i + 1}`,
        crop: i % 3 === 0 ? 'soybeans' : 'corn',
        notes: 'Invented for the scale benchmark.',
        serviceLevelId: level.id,
        antennaHeightM: 3.2,
        boundary: JSON.stringify(boundary),
        areaHa: (widthM * heightM) / 10_000,
        centroidLat: (ring[0][1] + ring[2][1]) / 2,
        centroidLon: (ring[0][0] + ring[2][0]) / 2,
      })
      const deciduous = i % 2 === 0
      // The tree line runs along the north edge (even fields) or the west edge (odd ones).
      const line = deciduous
        ? [[ring[3][0], ring[3][1] + 0.0002], [ring[2][0], ring[2][1] + 0.0002]]
        : [[ring[0][0] - 0.0003, ring[0][1]], [ring[3][0] - 0.0003, ring[3][1]]]
      await repos.obstructions.insert({
        farmId,
        kind: deciduous ? 'deciduous' : 'evergreen',
        heightM: deciduous ? 17 + rnd() * 6 : 12 + rnd() * 6,
        geometry: JSON.stringify({ type: 'LineString', coordinates: line }),
        leaflessFrom: deciduous ? '11-01' : null,
        leaflessTo: deciduous ? '04-15' : null,
        note: `${deciduous ? 'Cottonwood' : 'Spruce'} row by Parcel ${i + 1} (invented)`,
      })
      if (i % 5 === 4) {
        const [x, y] = ring[1]
        const shed = [[x + 0.0004, y], [x + 0.0008, y], [x + 0.0008, y + 0.0003], [x + 0.0004, y + 0.0003], [x + 0.0004, y]]
        await repos.obstructions.insert({
          farmId,
          kind: 'structure',
          heightM: 9,
          geometry: JSON.stringify({ type: 'Polygon', coordinates: [shed] }),
          leaflessFrom: null,
          leaflessTo: null,
          note: `Machine shed by Parcel ${i + 1} (invented)`,
        })
      }
    }
  }
  return { farms: existingFarms.length + newFarms, fields: existingFields + toAdd }
}
