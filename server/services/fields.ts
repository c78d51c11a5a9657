// Fields: a farm's boundaries with their area, correction service level and antenna height.
// Everyone who may see the farm reads them; admins, office staff and contractors edit them.
// Boundaries are checked (crossing edges, too few corners, holes outside) and measured
// here; unusual areas need confirmation. 'field.changed' is emitted after each commit.
import type { SessionUser } from '../../shared/schemas/auth.ts'
import type { Boundary } from '../../shared/schemas/geo.ts'
import { UNUSUAL_AREA_LIMITS_HA, type Field, type FieldInput, type FieldPatch } from '../../shared/schemas/fields.ts'
import { assertFarmVisible } from '../auth/access.ts'
import type { Repositories } from '../db/repositories/index.ts'
import type { NewField } from '../db/repositories/fields.ts'
import type { FieldRow } from '../db/schema-planning.ts'
import { emit } from '../events.ts'
import { badRequest, conflict, HttpError, notFound } from '../http/errors.ts'
import { AC_PER_HA, boundaryProblems, measureBoundary, type BoundaryMeasure } from '../imports/geometry.ts'
import { rethrowUniqueAsConflict, type ServiceContext } from './context.ts'

const round = (x: number, digits: number) => Math.round(x * 10 ** digits) / 10 ** digits

export function toField(row: FieldRow): Field {
  return {
    id: row.id,
    farmId: row.farmId,
    name: row.name,
    crop: row.crop,
    notes: row.notes,
    serviceLevelId: row.serviceLevelId,
    antennaHeightM: row.antennaHeightM,
    boundary: JSON.parse(row.boundary) as Boundary,
    areaHa: round(row.areaHa, 4),
    areaAc: round(row.areaHa * AC_PER_HA, 4),
    centroid: { latDeg: row.centroidLat, lonDeg: row.centroidLon },
    revision: row.revision,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
  }
}

export const nameTakenMessage = (name: string) => `This farm already has a field named "${name}".`

const formatHa = (ha: number) =>
  ha >= 10 ? ha.toLocaleString('en-US', { maximumFractionDigits: 1 }) : ha.toLocaleString('en-US', { maximumSignificantDigits: 3 })

/** Null when the area is usual, else the sentence that asks for confirmation. */
export function unusualAreaMessage(areaHa: number): string | null {
  const ac = formatHa(areaHa * AC_PER_HA)
  if (areaHa > UNUSUAL_AREA_LIMITS_HA.max) {
    return `The boundary covers ${formatHa(areaHa)} ha (${ac} ac), more than ${UNUSUAL_AREA_LIMITS_HA.max.toLocaleString('en-US')} ha. Check it, or confirm to save it anyway.`
  }
  if (areaHa < UNUSUAL_AREA_LIMITS_HA.min) {
    return `The boundary covers only ${formatHa(areaHa)} ha (${ac} ac), less than ${UNUSUAL_AREA_LIMITS_HA.min} ha. Check it, or confirm to save it anyway.`
  }
  return null
}

/**
 * Checks and measures a boundary: 400 naming where it is broken; 422 with code
 * 'confirm-area' when the area is unusual and not confirmed.
 */
export function checkBoundary(boundary: Boundary, confirmUnusualArea: boolean): BoundaryMeasure {
  const problems = boundaryProblems(boundary)
  if (problems.length) {
    const message = problems[0].charAt(0).toUpperCase() + problems[0].slice(1) + '.'
    throw badRequest(message, { boundary: problems.join('; ') })
  }
  const measure = measureBoundary(boundary)
  const unusual = unusualAreaMessage(measure.areaHa)
  if (unusual && !confirmUnusualArea) {
    throw new HttpError(422, 'confirm-area', unusual, { confirmUnusualArea: unusual })
  }
  return measure
}

export async function assertServiceLevel(repos: Repositories, id: number): Promise<void> {
  if (!(await repos.fields.serviceLevelExists(id))) {
    throw badRequest('The correction service level does not exist.', { serviceLevelId: `No service level with id ${id}.` })
  }
}

export function createFieldsService(ctx: ServiceContext) {
  const { store } = ctx

  async function assertFarm(repos: Repositories, user: SessionUser, farmId: number): Promise<void> {
    assertFarmVisible(user, farmId)
    if (!(await repos.farms.findById(farmId))) throw notFound('The farm')
  }

  /** The field, or 404 when it does not exist or the caller may not see its farm. */
  async function visibleRow(repos: Repositories, user: SessionUser, id: number): Promise<FieldRow> {
    const row = await repos.fields.findById(id)
    if (!row || (user.role === 'client' && !user.farmIds.includes(row.farmId))) throw notFound('The field')
    return row
  }

  function rethrowDuplicate(error: unknown, name: string | undefined): never {
    if (name) rethrowUniqueAsConflict(error, nameTakenMessage(name), 'name')
    throw error
  }

  return {
    async list(user: SessionUser, farmId: number): Promise<Field[]> {
      await assertFarm(store.repos, user, farmId)
      return (await store.repos.fields.listByFarm(farmId)).map(toField)
    },

    async get(user: SessionUser, id: number): Promise<Field> {
      return toField(await visibleRow(store.repos, user, id))
    },

    async create(user: SessionUser, farmId: number, input: FieldInput): Promise<Field> {
      const measure = checkBoundary(input.boundary, input.confirmUnusualArea)
      let field: Field
      try {
        field = await store.transaction(async (repos) => {
          await assertFarm(repos, user, farmId)
          await assertServiceLevel(repos, input.serviceLevelId)
          if (await repos.fields.nameTaken(farmId, input.name)) {
            throw conflict(nameTakenMessage(input.name), { name: nameTakenMessage(input.name) })
          }
          const id = await repos.fields.insert({
            farmId,
            name: input.name,
            crop: input.crop,
            notes: input.notes,
            serviceLevelId: input.serviceLevelId,
            antennaHeightM: input.antennaHeightM,
            boundary: JSON.stringify(measure.boundary),
            areaHa: measure.areaHa,
            centroidLat: measure.centroid.latDeg,
            centroidLon: measure.centroid.lonDeg,
          })
          return toField((await repos.fields.findById(id))!)
        })
      } catch (error) {
        rethrowDuplicate(error, input.name)
      }
      void emit('field.changed', { fieldId: field.id, farmId, deleted: false })
      return field
    },

    async update(user: SessionUser, id: number, patch: FieldPatch): Promise<Field> {
      const measure = patch.boundary ? checkBoundary(patch.boundary, patch.confirmUnusualArea ?? false) : null
      let result: { field: Field; changed: boolean }
      try {
        result = await store.transaction(async (repos) => {
          const row = await visibleRow(repos, user, id)
          const changes: Partial<Omit<NewField, 'farmId'>> = {}
          if (patch.name !== undefined && patch.name !== row.name) {
            if (await repos.fields.nameTaken(row.farmId, patch.name, id)) {
              throw conflict(nameTakenMessage(patch.name), { name: nameTakenMessage(patch.name) })
            }
            changes.name = patch.name
          }
          if (patch.crop !== undefined && patch.crop !== row.crop) changes.crop = patch.crop
          if (patch.notes !== undefined && patch.notes !== row.notes) changes.notes = patch.notes
          if (patch.serviceLevelId !== undefined && patch.serviceLevelId !== row.serviceLevelId) {
            await assertServiceLevel(repos, patch.serviceLevelId)
            changes.serviceLevelId = patch.serviceLevelId
          }
          if (patch.antennaHeightM !== undefined && patch.antennaHeightM !== row.antennaHeightM) {
            changes.antennaHeightM = patch.antennaHeightM
          }
          if (measure) {
            const text = JSON.stringify(measure.boundary)
            if (text !== row.boundary) {
              changes.boundary = text
              changes.areaHa = measure.areaHa
              changes.centroidLat = measure.centroid.latDeg
              changes.centroidLon = measure.centroid.lonDeg
            }
          }
          if (Object.keys(changes).length === 0) return { field: toField(row), changed: false }
          await repos.fields.update(id, changes, row.revision + 1)
          return { field: toField((await repos.fields.findById(id))!), changed: true }
        })
      } catch (error) {
        rethrowDuplicate(error, patch.name)
      }
      if (result.changed) void emit('field.changed', { fieldId: id, farmId: result.field.farmId, deleted: false })
      return result.field
    },

    async remove(user: SessionUser, id: number): Promise<void> {
      const row = await visibleRow(store.repos, user, id)
      if (!(await store.repos.fields.delete(id))) throw notFound('The field')
      void emit('field.changed', { fieldId: id, farmId: row.farmId, deleted: true })
    },
  }
}
export type FieldsService = ReturnType<typeof createFieldsService>
