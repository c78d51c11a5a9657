// Obstructions: tree lines (LineString), woodlots and buildings (Polygon) that belong to a
// farm, so one tree line between two fields serves both. Read by everyone who may see the
// farm; edited by admins, office staff and contractors. 'obstructions.changed' is emitted
// after each commit.
import type { SessionUser } from '../../shared/schemas/auth.ts'
import type { ObstructionGeometry } from '../../shared/schemas/geo.ts'
import type { Obstruction, ObstructionInput, ObstructionPatch } from '../../shared/schemas/fields.ts'
import { assertFarmVisible } from '../auth/access.ts'
import type { Repositories } from '../db/repositories/index.ts'
import type { NewObstruction } from '../db/repositories/obstructions.ts'
import type { ObstructionRow } from '../db/schema-planning.ts'
import { emit } from '../events.ts'
import { badRequest, notFound } from '../http/errors.ts'
import { normaliseObstructionGeometry, obstructionGeometryProblems } from '../imports/geometry.ts'
import type { ServiceContext } from './context.ts'

export function toObstruction(row: ObstructionRow): Obstruction {
  return {
    id: row.id,
    farmId: row.farmId,
    kind: row.kind,
    heightM: row.heightM,
    geometry: JSON.parse(row.geometry) as ObstructionGeometry,
    leaflessFrom: row.leaflessFrom,
    leaflessTo: row.leaflessTo,
    note: row.note,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
  }
}

type Checked = Omit<NewObstruction, 'farmId'>

/** The merged obstruction checked as a whole: geometry, and the leafless season rules. */
function check(o: {
  kind: Obstruction['kind']
  heightM: number
  geometry: ObstructionGeometry
  leaflessFrom: string | null
  leaflessTo: string | null
  note: string
}): Checked {
  const problems = obstructionGeometryProblems(o.geometry)
  if (problems.length) {
    throw badRequest(problems[0].charAt(0).toUpperCase() + problems[0].slice(1) + '.', { geometry: problems.join('; ') })
  }
  if (o.kind !== 'deciduous' && (o.leaflessFrom !== null || o.leaflessTo !== null)) {
    const msg = 'Only deciduous trees have a leafless season.'
    throw badRequest(msg, { [o.leaflessFrom !== null ? 'leaflessFrom' : 'leaflessTo']: msg })
  }
  if ((o.leaflessFrom === null) !== (o.leaflessTo === null)) {
    const msg = 'Give both the first and the last day of the leafless season, or neither.'
    throw badRequest(msg, { [o.leaflessFrom === null ? 'leaflessFrom' : 'leaflessTo']: msg })
  }
  if (o.leaflessFrom !== null && o.leaflessFrom === o.leaflessTo) {
    const msg = 'The leafless season must span more than one day.'
    throw badRequest(msg, { leaflessTo: msg })
  }
  return {
    kind: o.kind,
    heightM: o.heightM,
    geometry: JSON.stringify(normaliseObstructionGeometry(o.geometry)),
    leaflessFrom: o.leaflessFrom,
    leaflessTo: o.leaflessTo,
    note: o.note,
  }
}

export function createObstructionsService(ctx: ServiceContext) {
  const { store } = ctx

  async function assertFarm(repos: Repositories, user: SessionUser, farmId: number): Promise<void> {
    assertFarmVisible(user, farmId)
    if (!(await repos.farms.findById(farmId))) throw notFound('The farm')
  }

  async function visibleRow(repos: Repositories, user: SessionUser, id: number): Promise<ObstructionRow> {
    const row = await repos.obstructions.findById(id)
    if (!row || (user.role === 'client' && !user.farmIds.includes(row.farmId))) throw notFound('The obstruction')
    return row
  }

  return {
    async list(user: SessionUser, farmId: number): Promise<Obstruction[]> {
      await assertFarm(store.repos, user, farmId)
      return (await store.repos.obstructions.listByFarm(farmId)).map(toObstruction)
    },

    async create(user: SessionUser, farmId: number, input: ObstructionInput): Promise<Obstruction> {
      const checked = check(input)
      const created = await store.transaction(async (repos) => {
        await assertFarm(repos, user, farmId)
        const id = await repos.obstructions.insert({ farmId, ...checked })
        return toObstruction((await repos.obstructions.findById(id))!)
      })
      void emit('obstructions.changed', { farmId })
      return created
    },

    async update(user: SessionUser, id: number, patch: ObstructionPatch): Promise<Obstruction> {
      const updated = await store.transaction(async (repos) => {
        const row = await visibleRow(repos, user, id)
        const current = toObstruction(row)
        const kind = patch.kind ?? current.kind
        // Switching to a kind without a season drops the stored season unless one is sent.
        const keepSeason = kind === 'deciduous'
        const merged = {
          kind,
          heightM: patch.heightM ?? current.heightM,
          geometry: patch.geometry ?? current.geometry,
          leaflessFrom: patch.leaflessFrom !== undefined ? patch.leaflessFrom : keepSeason ? current.leaflessFrom : null,
          leaflessTo: patch.leaflessTo !== undefined ? patch.leaflessTo : keepSeason ? current.leaflessTo : null,
          note: patch.note ?? current.note,
        }
        await repos.obstructions.update(id, check(merged))
        return toObstruction((await repos.obstructions.findById(id))!)
      })
      void emit('obstructions.changed', { farmId: updated.farmId })
      return updated
    },

    async remove(user: SessionUser, id: number): Promise<void> {
      const row = await visibleRow(store.repos, user, id)
      if (!(await store.repos.obstructions.delete(id))) throw notFound('The obstruction')
      void emit('obstructions.changed', { farmId: row.farmId })
    },
  }
}
export type ObstructionsService = ReturnType<typeof createObstructionsService>
