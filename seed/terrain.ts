// The demo's hill-country farm: an invented dairy in a narrow hollow, with a valley floor
// field planned for tile drainage and an elevation model made from a formula (no data file
// is shipped): the valley floor runs north-south, the east wall rises 500 m within 700 m
// of the field (the eastern sky is cut up to about 35 deg), the west side climbs more
// gently. With GPS and GLONASS only (the demo's receivers), tile drainage on the valley
// floor then closes in several hours a day that are open on flat ground, early and late
// morning among them (which hours moves with the satellites, about 4 minutes a day). Written once, with the first demo seed; `tsx seed/terrain.ts FILE.asc` writes the
// same model as an ESRI ASCII grid (WGS-84 degrees, no .prj) for trying the upload by hand.
import { writeFileSync } from 'node:fs'
import { fileURLToPath } from 'node:url'
import { fromPlane, localPlane, toPlane } from '../shared/precision/index.ts'
import type { Boundary } from '../shared/schemas/geo.ts'
import type { Database } from '../server/db/index.ts'
import { createStore } from '../server/db/repositories/index.ts'
import { boundaryProblems, measureBoundary } from '../server/imports/geometry.ts'
import { readAsciiGrid } from '../server/terrain/readers.ts'
import { modelRecord } from '../server/terrain/store.ts'

/** The farm's origin (deg): an invented spot in hill country. */
const ORIGIN = { latDeg: 41.262, lonDeg: -77.418 }
export const HILL_FARM = {
  name: 'Hemlock Hollow Dairy',
  timeZone: 'America/New_York',
  address: '1120 Hemlock Run Road, Larch Gap, Pennsylvania',
  notes: 'Pasture and silage corn in a narrow hollow. Tile drainage planned on the wet valley floor; the east ridge shades the morning sky.',
}

const smooth = (t: number) => {
  const u = Math.min(1, Math.max(0, t))
  return u * u * (3 - 2 * u)
}

/** Ground height (m) at x m east, y m north of the origin: a valley floor at 240 m falling gently south, an east wall, a gentler west side. */
export function hollowHeightM(x: number, y: number): number {
  return 240 + 0.004 * y + 500 * smooth((x - 100) / 600) + 150 * smooth((-x - 350) / 1100)
}

/** The model as ESRI ASCII grid text (WGS-84 degrees, cell centres on the formula, heights to 0.1 m). */
export function hollowAsciiGrid(): string {
  const cell = 0.0006
  const cols = 301
  const rows = 241
  const xll = ORIGIN.lonDeg - (cols / 2) * cell
  const yll = ORIGIN.latDeg - (rows / 2) * cell
  const plane = localPlane(ORIGIN.latDeg, ORIGIN.lonDeg)
  const lines = [`ncols ${cols}`, `nrows ${rows}`, `xllcorner ${xll.toFixed(6)}`, `yllcorner ${yll.toFixed(6)}`, `cellsize ${cell}`, 'NODATA_value -9999']
  for (let j = 0; j < rows; j++) {
    const lat = yll + (rows - j - 0.5) * cell
    const row: string[] = []
    for (let i = 0; i < cols; i++) {
      const [x, y] = toPlane(plane, xll + (i + 0.5) * cell, lat)
      row.push(hollowHeightM(x, y).toFixed(1))
    }
    lines.push(row.join(' '))
  }
  return lines.join('\n') + '\n'
}

function rectangle(x: number, y: number, w: number, h: number): Boundary {
  const plane = localPlane(ORIGIN.latDeg, ORIGIN.lonDeg)
  const c = (e: number, n: number): [number, number] => {
    const p = fromPlane(plane, e, n)
    return [Math.round(p.lonDeg * 1e7) / 1e7, Math.round(p.latDeg * 1e7) / 1e7]
  }
  return { type: 'Polygon', coordinates: [[c(x, y), c(x + w, y), c(x + w, y + h), c(x, y + h), c(x, y)]] }
}

const FIELDS = [
  { name: 'Hollow bottom', crop: 'silage corn', notes: 'Wet valley floor; tile drainage planned along the run.', boundary: rectangle(-250, -300, 350, 600) },
  { name: 'West bench', crop: 'pasture', notes: 'Gentle slope on the west side of the hollow.', boundary: rectangle(-900, -200, 450, 400) },
]

/** Writes the hill farm, its fields and its elevation model in one transaction, unless a farm of that name exists. */
export async function seedHillFarm(db: Database): Promise<boolean> {
  const store = createStore(db)
  const model = readAsciiGrid(hollowAsciiGrid(), null)
  const record = modelRecord(model)
  return store.transaction(async (repos) => {
    const existing = (await repos.farms.list({ page: 1, pageSize: 200, order: 'asc' })).rows.find((f) => f.name === HILL_FARM.name)
    if (existing) return false
    const farmId = await repos.farms.insert(HILL_FARM)
    const rtk = await repos.fields.serviceLevelIdByName('RTK')
    if (rtk === null) throw new Error('demo hill farm: the RTK service level is missing (seed the planning first)')
    for (const f of FIELDS) {
      const problems = boundaryProblems(f.boundary)
      if (problems.length) throw new Error(`demo field ${f.name}: ${problems[0]}`)
      const m = measureBoundary(f.boundary)
      await repos.fields.insert({
        farmId,
        name: f.name,
        crop: f.crop,
        notes: f.notes,
        serviceLevelId: rtk,
        antennaHeightM: 3.2,
        boundary: JSON.stringify(m.boundary),
        areaHa: m.areaHa,
        centroidLat: m.centroid.latDeg,
        centroidLon: m.centroid.lonDeg,
      })
    }
    await repos.terrain.replace({ farmId, fileName: 'hemlock-hollow.asc (demo formula)', uploadedBy: null, ...record.row }, record.chunks)
    return true
  })
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const out = process.argv[2]
  if (!out) {
    console.error('usage: tsx seed/terrain.ts FILE.asc')
    process.exit(2)
  }
  writeFileSync(out, hollowAsciiGrid())
  console.log(`[skyfurrow] wrote the demo hollow as an ESRI ASCII grid: ${out}`)
}
