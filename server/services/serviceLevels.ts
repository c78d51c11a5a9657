// Correction service levels: everyone signed in reads them; admins create, change, delete.
// A change of sigma re-forecasts the fields (and work types) that use the level.
import type { ServiceLevel, ServiceLevelInput, ServiceLevelPatch } from '../../shared/schemas/planning.ts'
import type { ServiceLevelRow } from '../db/schema-planning.ts'
import { emit } from '../events.ts'
import { conflict, notFound } from '../http/errors.ts'
import { rethrowUniqueAsConflict, type ServiceContext } from './context.ts'

const NAME_TAKEN = 'A service level with this name already exists.'

export function toServiceLevel(row: ServiceLevelRow): ServiceLevel {
  return {
    id: row.id,
    name: row.name,
    sigmaUereM: row.sigmaUereM,
    note: row.note,
    ppmH: row.ppmH,
    ppmV: row.ppmV,
    maxBaselineKm: row.maxBaselineKm,
    needsBase: row.needsBase,
  }
}

/** "a, b and 3 more" for messages. */
export function listNames(names: string[], max = 4): string {
  const shown = names.slice(0, max)
  const more = names.length - shown.length
  if (more > 0) return `${shown.join(', ')} and ${more} more`
  if (shown.length <= 1) return shown.join('')
  return `${shown.slice(0, -1).join(', ')} and ${shown[shown.length - 1]}`
}

export function createServiceLevelsService(ctx: ServiceContext) {
  const { store } = ctx

  return {
    async list(): Promise<ServiceLevel[]> {
      return (await store.repos.serviceLevels.list()).map(toServiceLevel)
    },

    async get(id: number): Promise<ServiceLevel> {
      const row = await store.repos.serviceLevels.findById(id)
      if (!row) throw notFound('The service level')
      return toServiceLevel(row)
    },

    async create(input: ServiceLevelInput): Promise<ServiceLevel> {
      try {
        return await store.transaction(async (repos) => {
          if (await repos.serviceLevels.nameTaken(input.name)) throw conflict(NAME_TAKEN, { name: NAME_TAKEN })
          const id = await repos.serviceLevels.insert(input)
          return toServiceLevel((await repos.serviceLevels.findById(id))!)
        })
      } catch (error) {
        rethrowUniqueAsConflict(error, NAME_TAKEN, 'name')
      }
    },

    async update(id: number, patch: ServiceLevelPatch): Promise<ServiceLevel> {
      let sigmaChanged = false
      let result: ServiceLevel
      try {
        result = await store.transaction(async (repos) => {
          const before = await repos.serviceLevels.findById(id)
          if (!before) throw notFound('The service level')
          if (patch.name !== undefined && (await repos.serviceLevels.nameTaken(patch.name, id))) {
            throw conflict(NAME_TAKEN, { name: NAME_TAKEN })
          }
          const changes = Object.fromEntries(Object.entries(patch).filter(([, v]) => v !== undefined))
          if (Object.keys(changes).length) await repos.serviceLevels.update(id, changes)
          // Any change of the error model re-forecasts the fields and work types that use it.
          sigmaChanged = (['sigmaUereM', 'ppmH', 'ppmV', 'maxBaselineKm', 'needsBase'] as const).some(
            (k) => patch[k] !== undefined && patch[k] !== before[k],
          )
          return toServiceLevel((await repos.serviceLevels.findById(id))!)
        })
      } catch (error) {
        rethrowUniqueAsConflict(error, NAME_TAKEN, 'name')
      }
      if (sigmaChanged) void emit('planning.changed', { serviceLevelIds: [id] })
      return result
    },

    /** 409 naming the work types and fields that still use the level. */
    async remove(id: number): Promise<void> {
      await store.transaction(async (repos) => {
        const row = await repos.serviceLevels.findById(id)
        if (!row) throw notFound('The service level')
        const usage = await repos.serviceLevels.usage(id)
        const parts: string[] = []
        if (usage.workTypes.length) {
          parts.push(`work type${usage.workTypes.length > 1 ? 's' : ''} ${listNames(usage.workTypes)}`)
        }
        if (usage.fields.length) {
          parts.push(
            `field${usage.fields.length > 1 ? 's' : ''} ${listNames(usage.fields.map((f) => `${f.name} (${f.farm})`))}`,
          )
        }
        if (parts.length) {
          throw conflict(`${row.name} is still used by ${parts.join(' and by ')}. Move them to another service level first.`)
        }
        await repos.serviceLevels.delete(id)
      })
    },
  }
}
export type ServiceLevelsService = ReturnType<typeof createServiceLevelsService>
