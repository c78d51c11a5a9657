// Demo fields and obstructions of the invented farms (seed/scenario.ts): 17 fields across
// the four farms at plausible but invented spots (central Iowa, south-central Kansas,
// north-east Colorado, the Nebraska panhandle), including a field with a pond (a hole),
// a section-sized field of about 120 ha and centre-pivot circles; tree lines along field
// edges (deciduous cottonwood, ash and Osage-orange rows bare from November to April,
// evergreen juniper and cedar shelterbelts), a pecan woodlot and farm buildings.
//
// Shapes are laid out in metres from each farm's origin with a flat-earth approximation
// (1 deg latitude ~ 111,320 m), which is accurate enough for shapes of a few kilometres.
// Boundaries go through the same checks and measurement as the API (turf area).
//
// Idempotent: a farm (found by its demo name) gets its fields and obstructions only while
// it has neither, so nothing a user has since edited or deleted comes back. Service levels
// are looked up by name and created with the demo values when the planning seed has not run.
import type { Boundary, ObstructionGeometry } from '../shared/schemas/geo.ts'
import type { Database } from '../server/db/index.ts'
import { createStore, type Repositories } from '../server/db/repositories/index.ts'
import { boundaryProblems, measureBoundary, obstructionGeometryProblems } from '../server/imports/geometry.ts'
import { demoFarms } from './scenario.ts'

type LonLat = [number, number]
type XY = [number, number]

const M_PER_DEG_LAT = 111_320
const r8 = (x: number) => Math.round(x * 1e7) / 1e7

function at(origin: LonLat, [e, n]: XY): LonLat {
  return [r8(origin[0] + e / (M_PER_DEG_LAT * Math.cos((origin[1] * Math.PI) / 180))), r8(origin[1] + n / M_PER_DEG_LAT)]
}
const ring = (o: LonLat, pts: XY[]): LonLat[] => {
  const r = pts.map((p) => at(o, p))
  return [...r, r[0]]
}
const rect = (x: number, y: number, w: number, h: number): XY[] => [
  [x, y],
  [x + w, y],
  [x + w, y + h],
  [x, y + h],
]
const circle = (cx: number, cy: number, radius: number, steps = 48): XY[] =>
  Array.from({ length: steps }, (_, k) => [cx + radius * Math.cos((2 * Math.PI * k) / steps), cy + radius * Math.sin((2 * Math.PI * k) / steps)] as XY)
const line = (o: LonLat, pts: XY[]): ObstructionGeometry => ({ type: 'LineString', coordinates: pts.map((p) => at(o, p)) })
const poly = (o: LonLat, ...rings: XY[][]): Boundary & { type: 'Polygon' } => ({ type: 'Polygon', coordinates: rings.map((r) => ring(o, r)) })

type Level = 'Standalone' | 'SBAS' | 'RTK'
const LEVELS: Record<Level, { sigmaUereM: number; note: string }> = {
  Standalone: { sigmaUereM: 3.0, note: 'Demo value: a common-practice approximation, not a published requirement.' },
  SBAS: { sigmaUereM: 0.8, note: 'Demo value: a common-practice approximation, not a published requirement.' },
  RTK: { sigmaUereM: 0.012, note: 'Demo value: a common-practice approximation, not a published requirement.' },
}

interface DemoField {
  name: string
  crop: string
  notes: string
  level: Level
  antennaHeightM: number
  boundary: Boundary
}
interface DemoObstruction {
  kind: 'deciduous' | 'evergreen' | 'structure'
  heightM: number
  geometry: ObstructionGeometry
  leaflessFrom?: string
  leaflessTo?: string
  note: string
}
interface FarmLayout {
  fields: DemoField[]
  obstructions: DemoObstruction[]
}

/** Bare from early November to mid or late April (common for cottonwood, ash, pecan in the Plains). */
const BARE = { leaflessFrom: '11-01', leaflessTo: '04-20' }

/** Layouts by demo farm key (seed/scenario.ts). */
export function demoLayouts(): Record<string, FarmLayout> {
  // Hollis Creek Farms, central Iowa (invented spot).
  const ia: LonLat = [-93.4127, 42.3183]
  // Juniper Bend Ranch, south-central Kansas.
  const ks: LonLat = [-97.8342, 38.0716]
  // Tall Sky Grain Co-op Plots, north-east Colorado.
  const co: LonLat = [-103.5521, 40.4237]
  // Meadowlark Bottoms, Nebraska panhandle.
  const ne: LonLat = [-103.7188, 41.8634]
  return {
    north: {
      fields: [
        { name: 'Home Quarter', crop: 'corn', notes: 'Cottonwood shelterbelt along the north edge shades the headland.', level: 'RTK', antennaHeightM: 3.4, boundary: poly(ia, rect(0, 0, 800, 800)) },
        {
          name: 'Creek Bottom',
          crop: 'soybeans',
          notes: 'Farm pond in the middle; wet along the creek in spring.',
          level: 'RTK',
          antennaHeightM: 3.4,
          boundary: poly(
            ia,
            [[900, 0], [1600, 0], [1650, 250], [1580, 520], [900, 560]],
            rect(1150, 200, 140, 110), // the pond
          ),
        },
        { name: 'East Eighty', crop: 'corn', notes: '', level: 'RTK', antennaHeightM: 3.4, boundary: poly(ia, rect(1700, 0, 800, 400)) },
        {
          name: 'Section Twelve North',
          crop: 'soybeans',
          notes: 'The big field: about 120 ha. Evergreen shelterbelt on the west line.',
          level: 'RTK',
          antennaHeightM: 3.6,
          boundary: poly(ia, rect(0, 1000, 1200, 1000)),
        },
        { name: 'Schoolhouse Forty', crop: 'oats', notes: 'Beside the yard and the machine shed.', level: 'SBAS', antennaHeightM: 3.2, boundary: poly(ia, rect(1400, 1000, 400, 400)) },
      ],
      obstructions: [
        { kind: 'deciduous', heightM: 22, geometry: line(ia, [[-10, 815], [810, 815]]), ...BARE, note: 'Cottonwood shelterbelt, north edge of Home Quarter.' },
        { kind: 'evergreen', heightM: 14, geometry: line(ia, [[-15, 990], [-15, 2010]]), note: 'Eastern red cedar windbreak, west line of Section Twelve.' },
        { kind: 'deciduous', heightM: 18, geometry: line(ia, [[1590, 540], [1660, 250], [1610, -10]]), ...BARE, note: 'Willows and ash along the creek.' },
        { kind: 'structure', heightM: 11, geometry: poly(ia, rect(1830, 1150, 40, 25)), note: 'Machine shed.' },
        { kind: 'structure', heightM: 24, geometry: poly(ia, rect(1830, 1200, 18, 18)), note: 'Grain bin and leg.' },
      ],
    },
    south: {
      fields: [
        { name: 'Ferry Field', crop: 'wheat', notes: '', level: 'RTK', antennaHeightM: 3.4, boundary: poly(ks, rect(0, 0, 1000, 600)) },
        { name: 'Pecan Grove West', crop: 'sorghum', notes: 'Pecan grove on the west side.', level: 'RTK', antennaHeightM: 3.4, boundary: poly(ks, rect(-900, 0, 750, 600)) },
        {
          name: 'Low Ground',
          crop: 'wheat',
          notes: 'Tile drainage planned on the low ground by the creek.',
          level: 'RTK',
          antennaHeightM: 3.2,
          boundary: poly(ks, [[0, -700], [700, -700], [700, -450], [300, -450], [300, -100], [0, -100]]),
        },
        { name: 'Sorghum Quarter', crop: 'sorghum', notes: '', level: 'SBAS', antennaHeightM: 3.9, boundary: poly(ks, rect(1100, 0, 800, 800)) },
      ],
      obstructions: [
        { kind: 'deciduous', heightM: 18, geometry: poly(ks, rect(-1200, 50, 260, 500)), leaflessFrom: '11-15', leaflessTo: '04-25', note: 'Pecan grove (woodlot).' },
        { kind: 'deciduous', heightM: 12, geometry: line(ks, [[1010, -10], [1010, 610]]), ...BARE, note: 'Osage-orange hedge row between Ferry Field and Sorghum Quarter.' },
        { kind: 'evergreen', heightM: 13, geometry: line(ks, [[-10, 615], [1000, 615]]), note: 'Juniper shelterbelt on the north line of Ferry Field.' },
        { kind: 'structure', heightM: 20, geometry: poly(ks, rect(720, -440, 30, 30)), note: 'Grain bins.' },
      ],
    },
    plains: {
      fields: [
        { name: 'Pivot 3', crop: 'corn', notes: 'Centre pivot, 400 m radius.', level: 'RTK', antennaHeightM: 3.6, boundary: poly(co, circle(400, 400, 400)) },
        { name: 'Pivot 4', crop: 'sugar beets', notes: 'Centre pivot, 380 m radius.', level: 'RTK', antennaHeightM: 3.6, boundary: poly(co, circle(1250, 400, 380)) },
        { name: 'Dryland Strip A', crop: 'winter wheat', notes: '', level: 'SBAS', antennaHeightM: 3.9, boundary: poly(co, rect(0, 900, 1600, 200)) },
        { name: 'Dryland Strip B', crop: 'fallow', notes: '', level: 'SBAS', antennaHeightM: 3.9, boundary: poly(co, rect(0, 1150, 1600, 200)) },
      ],
      obstructions: [
        { kind: 'evergreen', heightM: 12, geometry: line(co, [[-20, -10], [-20, 1360]]), note: 'Rocky Mountain juniper windbreak on the west fence line.' },
        { kind: 'structure', heightM: 8, geometry: poly(co, rect(1700, 850, 35, 20)), note: 'Pump house and shop.' },
      ],
    },
    valley: {
      fields: [
        { name: 'Bench One', crop: 'sugar beets', notes: 'Land levelling planned this spring.', level: 'RTK', antennaHeightM: 3.4, boundary: poly(ne, rect(0, 0, 800, 500)) },
        { name: 'Bench Two', crop: 'dry beans', notes: 'Land levelling planned this spring.', level: 'RTK', antennaHeightM: 3.4, boundary: poly(ne, rect(0, 550, 700, 520)) },
        {
          name: 'River Lot',
          crop: 'alfalfa',
          notes: 'Along the river; tall cottonwoods on the south side.',
          level: 'RTK',
          antennaHeightM: 3.4,
          boundary: poly(ne, [[900, 0], [1500, -80], [1700, 150], [1450, 400], [900, 380]]),
        },
        { name: 'Beet Ground', crop: 'sugar beets', notes: '', level: 'RTK', antennaHeightM: 3.4, boundary: poly(ne, rect(800, 550, 900, 650)) },
      ],
      obstructions: [
        { kind: 'deciduous', heightM: 25, geometry: line(ne, [[880, -20], [1500, -100], [1720, 140]]), ...BARE, note: 'Plains cottonwoods along the river.' },
        { kind: 'deciduous', heightM: 12, geometry: line(ne, [[-15, -15], [-15, 1080]]), leaflessFrom: '11-01', leaflessTo: '04-10', note: 'Russian olive and green ash shelterbelt, west edge of the benches.' },
        { kind: 'structure', heightM: 9, geometry: poly(ne, rect(750, 1250, 40, 20)), note: 'Machine shed.' },
      ],
    },
  }
}

async function levelIds(repos: Repositories): Promise<Record<Level, number>> {
  const out = {} as Record<Level, number>
  for (const name of Object.keys(LEVELS) as Level[]) {
    out[name] = (await repos.fields.serviceLevelIdByName(name)) ?? (await repos.fields.insertServiceLevel({ name, ...LEVELS[name] }))
  }
  return out
}

export interface FieldSeedResult {
  farms: number
  fields: number
  obstructions: number
}

/** Writes the layouts of the demo farms that have neither fields nor obstructions yet. */
export async function seedFieldsWith(repos: Repositories): Promise<FieldSeedResult> {
  const layouts = demoLayouts()
  const levels = await levelIds(repos)
  const result: FieldSeedResult = { farms: 0, fields: 0, obstructions: 0 }
  const farms = (await repos.farms.list({ page: 1, pageSize: 200, order: 'asc' })).rows
  for (const demo of demoFarms) {
    const layout = layouts[demo.key]
    const farm = farms.find((f) => f.name === demo.name)
    if (!layout || !farm) continue
    if ((await repos.fields.listByFarm(farm.id)).length > 0 || (await repos.obstructions.countByFarm(farm.id)) > 0) continue
    for (const f of layout.fields) {
      const problems = boundaryProblems(f.boundary)
      if (problems.length) throw new Error(`demo field ${f.name}: ${problems[0]}`)
      const m = measureBoundary(f.boundary)
      await repos.fields.insert({
        farmId: farm.id,
        name: f.name,
        crop: f.crop,
        notes: f.notes,
        serviceLevelId: levels[f.level],
        antennaHeightM: f.antennaHeightM,
        boundary: JSON.stringify(m.boundary),
        areaHa: m.areaHa,
        centroidLat: m.centroid.latDeg,
        centroidLon: m.centroid.lonDeg,
      })
      result.fields++
    }
    for (const o of layout.obstructions) {
      const problems = obstructionGeometryProblems(o.geometry)
      if (problems.length) throw new Error(`demo obstruction "${o.note}": ${problems[0]}`)
      await repos.obstructions.insert({
        farmId: farm.id,
        kind: o.kind,
        heightM: o.heightM,
        geometry: JSON.stringify(o.geometry),
        leaflessFrom: o.leaflessFrom ?? null,
        leaflessTo: o.leaflessTo ?? null,
        note: o.note,
      })
      result.obstructions++
    }
    result.farms++
  }
  return result
}

/** The field seed in one transaction. */
export async function seedFields(db: Database): Promise<FieldSeedResult> {
  return createStore(db).transaction((repos) => seedFieldsWith(repos))
}
