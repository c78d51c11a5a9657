// A farm as ISO 11783-10 task data for farm terminals: the farm as customer (CTR) and farm
// (FRM), every field as a partfield (PFD) with its boundary polygons (holes as interior
// rings) and the farm's obstructions that reach within OBSTACLE_REACH_M of it, and the
// planned and confirmed passes from now on as planned tasks (TSK with a planned TIM).
// Delivered as TASKDATA.XML or as a zip with TASKDATA/TASKDATA.XML, the folder layout
// terminals read from a USB stick (ISO 11783-10, file naming clause; from memory).
import { readFileSync } from 'node:fs'
import JSZip from 'jszip'
import type { MultiPolygon, Polygon, Position } from 'geojson'
import { MINUTE_MS } from '../../shared/planning/index.ts'
import type { SessionUser } from '../../shared/schemas/auth.ts'
import { upcomingPassStatuses } from '../../shared/schemas/passes.ts'
import { assertFarmVisible } from '../auth/access.ts'
import { notFound } from '../http/errors.ts'
import { buildTaskData, type TaskData, type TaskDataObstacle } from '../imports/isoxml.ts'
import type { ServiceContext } from './context.ts'

const softwareVersion = (JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as { version: string }).version

/** Obstructions this close to a field's bounding box go with its partfield (common practice: a headland's reach). */
export const OBSTACLE_REACH_M = 150

type Box = [number, number, number, number]

function bbox(coords: Position[]): Box {
  const box: Box = [Infinity, Infinity, -Infinity, -Infinity]
  for (const [x, y] of coords) {
    box[0] = Math.min(box[0], x)
    box[1] = Math.min(box[1], y)
    box[2] = Math.max(box[2], x)
    box[3] = Math.max(box[3], y)
  }
  return box
}

/** The box grown by `m` metres (spherical degrees per metre at the box's latitude). */
function grow(box: Box, m: number): Box {
  const dLat = m / 111_320
  const dLon = m / (111_320 * Math.cos((((box[1] + box[3]) / 2) * Math.PI) / 180))
  return [box[0] - dLon, box[1] - dLat, box[2] + dLon, box[3] + dLat]
}

const overlaps = (a: Box, b: Box) => a[0] <= b[2] && b[0] <= a[2] && a[1] <= b[3] && b[1] <= a[3]

const flat = (g: Polygon | MultiPolygon): Position[] => (g.type === 'Polygon' ? g.coordinates.flat() : g.coordinates.flat(2))

const slug = (name: string) => name.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '') || 'farm'

export function createTaskDataService(ctx: ServiceContext) {
  const { store } = ctx

  async function model(user: SessionUser, farmId: number, nowMs: number): Promise<{ data: TaskData; farmName: string }> {
    assertFarmVisible(user, farmId)
    const repos = store.repos
    const farm = await repos.farms.findById(farmId)
    if (!farm) throw notFound('The farm')
    const [fields, obstructions, passes] = await Promise.all([
      repos.fields.listByFarm(farmId),
      repos.obstructions.listByFarm(farmId),
      repos.passes.list({ farmId, statuses: upcomingPassStatuses, from: new Date(nowMs) }),
    ])
    const obstacles = obstructions.map((o) => {
      const geometry = JSON.parse(o.geometry) as TaskDataObstacle['geometry']
      const coords = geometry.type === 'LineString' ? geometry.coordinates : geometry.coordinates.flat()
      const kind = o.kind === 'structure' ? 'Building' : 'Tree line'
      return { designator: `${kind} ${Math.round(o.heightM)} m`, geometry, box: bbox(coords) }
    })
    const pfdId = new Map(fields.map((f, i) => [f.id, `PFD${i + 1}`]))
    const data: TaskData = {
      softwareVersion,
      customers: [{ id: 'CTR1', name: farm.name }],
      farms: [{ id: 'FRM1', designator: farm.name, street: farm.address, customerIdRef: 'CTR1' }],
      partfields: fields.map((f) => {
        const boundary = JSON.parse(f.boundary) as Polygon | MultiPolygon
        const reach = grow(bbox(flat(boundary)), OBSTACLE_REACH_M)
        return {
          id: pfdId.get(f.id)!,
          designator: f.name,
          areaM2: f.areaHa * 10_000,
          customerIdRef: 'CTR1',
          farmIdRef: 'FRM1',
          boundary,
          obstacles: obstacles.filter((o) => overlaps(o.box, reach)).map(({ designator, geometry }) => ({ designator, geometry })),
        }
      }),
      tasks: passes.map((p, i) => ({
        id: `TSK${i + 1}`,
        designator: `${p.workTypeName} ${p.fieldName}`,
        customerIdRef: 'CTR1',
        farmIdRef: 'FRM1',
        partfieldIdRef: pfdId.get(p.fieldId) ?? null,
        startIso: p.startAt.toISOString(),
        stopIso: new Date(p.startAt.getTime() + p.durationMin * MINUTE_MS).toISOString(),
      })),
    }
    return { data, farmName: farm.name }
  }

  return {
    /** TASKDATA.XML of the farm. */
    async xml(user: SessionUser, farmId: number, nowMs = Date.now()): Promise<{ filename: string; content: string }> {
      const { data } = await model(user, farmId, nowMs)
      return { filename: 'TASKDATA.XML', content: buildTaskData(data) }
    },

    /** A zip holding TASKDATA/TASKDATA.XML, ready to copy onto a terminal's USB stick. */
    async zip(user: SessionUser, farmId: number, nowMs = Date.now()): Promise<{ filename: string; content: Buffer }> {
      const { data, farmName } = await model(user, farmId, nowMs)
      const zip = new JSZip()
      zip.file('TASKDATA/TASKDATA.XML', buildTaskData(data))
      const content = await zip.generateAsync({ type: 'nodebuffer', compression: 'DEFLATE' })
      return { filename: `${slug(farmName)}-taskdata.zip`, content }
    },
  }
}
export type TaskDataService = ReturnType<typeof createTaskDataService>
