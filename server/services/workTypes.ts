// Work types: everyone signed in reads them; admins create, change, delete. Every change
// of thresholds re-forecasts all fields (each stored hour carries a state per work type).
import type { WorkType, WorkTypeInput, WorkTypePatch } from '../../shared/schemas/planning.ts'
import type { Repositories } from '../db/repositories/index.ts'
import type { WorkTypeRow } from '../db/schema-planning.ts'
import { emit } from '../events.ts'
import { badRequest, conflict, notFound } from '../http/errors.ts'
import { changesBetween, recordAudit, type AuditActor } from './audit.ts'
import { rethrowUniqueAsConflict, type ServiceContext } from './context.ts'

const NAME_TAKEN = 'A work type with this name already exists.'

export function toWorkType(row: WorkTypeRow): WorkType {
  return {
    id: row.id,
    name: row.name,
    serviceLevelId: row.serviceLevelId,
    maxH95M: row.maxH95M,
    maxV95M: row.maxV95M,
    minSats: row.minSats,
    maxPdop: row.maxPdop,
    requiredShare: row.requiredShare,
    requireN1: row.requireN1,
    rateHaPerH: row.rateHaPerH,
    sortOrder: row.sortOrder,
    active: row.active,
    stormAction: row.stormAction,
  }
}

async function checkServiceLevel(repos: Repositories, id: number): Promise<void> {
  if (!(await repos.serviceLevels.findById(id))) {
    throw badRequest('The service level does not exist.', { serviceLevelId: `No service level with id ${id}.` })
  }
}

/** Fields of a work type that change stored forecasts (the name and sort order do not). */
const forecastKeys = ['serviceLevelId', 'maxH95M', 'maxV95M', 'minSats', 'maxPdop', 'requiredShare', 'requireN1', 'active'] as const

export function createWorkTypesService(ctx: ServiceContext) {
  const { store } = ctx

  return {
    async list(): Promise<WorkType[]> {
      return (await store.repos.workTypes.list()).map(toWorkType)
    },

    async get(id: number): Promise<WorkType> {
      const row = await store.repos.workTypes.findById(id)
      if (!row) throw notFound('The work type')
      return toWorkType(row)
    },

    async create(input: WorkTypeInput, actor?: AuditActor): Promise<WorkType> {
      let result: WorkType
      try {
        result = await store.transaction(async (repos) => {
          if (await repos.workTypes.nameTaken(input.name)) throw conflict(NAME_TAKEN, { name: NAME_TAKEN })
          await checkServiceLevel(repos, input.serviceLevelId)
          const id = await repos.workTypes.insert(input)
          const created = toWorkType((await repos.workTypes.findById(id))!)
          if (actor) await recordAudit(repos, actor, 'work-type.created', { type: 'work-type', id, name: created.name })
          return created
        })
      } catch (error) {
        rethrowUniqueAsConflict(error, NAME_TAKEN, 'name')
      }
      if (result.active) void emit('planning.changed', { serviceLevelIds: 'all' })
      return result
    },

    async update(id: number, patch: WorkTypePatch, actor?: AuditActor): Promise<WorkType> {
      let affectsForecasts = false
      let result: WorkType
      try {
        result = await store.transaction(async (repos) => {
          const before = await repos.workTypes.findById(id)
          if (!before) throw notFound('The work type')
          if (patch.name !== undefined && (await repos.workTypes.nameTaken(patch.name, id))) {
            throw conflict(NAME_TAKEN, { name: NAME_TAKEN })
          }
          if (patch.serviceLevelId !== undefined) await checkServiceLevel(repos, patch.serviceLevelId)
          const changes = Object.fromEntries(Object.entries(patch).filter(([, v]) => v !== undefined))
          if (Object.keys(changes).length) await repos.workTypes.update(id, changes)
          affectsForecasts = forecastKeys.some((k) => patch[k] !== undefined && patch[k] !== before[k])
          const after = toWorkType((await repos.workTypes.findById(id))!)
          const changed = changesBetween(toWorkType(before) as unknown as Record<string, unknown>, after as unknown as Record<string, unknown>, Object.keys(changes))
          if (actor && Object.keys(changed).length) {
            await recordAudit(repos, actor, 'work-type.changed', { type: 'work-type', id, name: after.name }, changed)
          }
          return after
        })
      } catch (error) {
        rethrowUniqueAsConflict(error, NAME_TAKEN, 'name')
      }
      if (affectsForecasts) void emit('planning.changed', { serviceLevelIds: 'all' })
      return result
    },

    /** 409 while passes are booked for it (deactivate it instead). */
    async remove(id: number, actor?: AuditActor): Promise<void> {
      await store.transaction(async (repos) => {
        const row = await repos.workTypes.findById(id)
        if (!row) throw notFound('The work type')
        const passes = await repos.workTypes.passCount(id)
        if (passes > 0) {
          throw conflict(
            `${row.name} is used by ${passes} pass${passes > 1 ? 'es' : ''}. Mark it inactive instead, or move those passes to another work type first.`,
          )
        }
        await repos.workTypes.delete(id)
        if (actor) await recordAudit(repos, actor, 'work-type.deleted', { type: 'work-type', id, name: row.name })
      })
      void emit('planning.changed', { serviceLevelIds: 'all' })
    },
  }
}
export type WorkTypesService = ReturnType<typeof createWorkTypesService>
