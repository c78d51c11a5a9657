// Farms: everyone signed in reads the farms they may see; admins create, change, delete.
import type { SessionUser } from '../../shared/schemas/auth.ts'
import type { Page } from '../../shared/schemas/common.ts'
import type { Farm, FarmInput, FarmListQuery, FarmPatch } from '../../shared/schemas/farms.ts'
import { assertFarmVisible, visibleFarmIds } from '../auth/access.ts'
import type { Repositories } from '../db/repositories/index.ts'
import type { FarmRow } from '../db/schema.ts'
import { badRequest, conflict, notFound } from '../http/errors.ts'
import { pageOf, rethrowUniqueAsConflict, type ServiceContext } from './context.ts'

const NAME_TAKEN = 'A farm with this name already exists.'

function toFarm(row: FarmRow, clients: Farm['clients']): Farm {
  return {
    id: row.id,
    name: row.name,
    timeZone: row.timeZone,
    address: row.address,
    notes: row.notes,
    clients,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
  }
}

export function createFarmsService(ctx: ServiceContext) {
  const { store } = ctx

  /** Only existing client users can be linked: 400 naming clientIds otherwise. */
  async function checkClientIds(repos: Repositories, clientIds: number[]): Promise<number[]> {
    const unique = [...new Set(clientIds)]
    const roles = await repos.users.rolesOf(unique)
    const missing = unique.filter((id) => !roles.has(id))
    if (missing.length) throw badRequest('Some users do not exist.', { clientIds: `No user with id ${missing.join(', ')}.` })
    const notClients = unique.filter((id) => roles.get(id) !== 'client')
    if (notClients.length) {
      throw badRequest('Only client users can be linked to a farm.', {
        clientIds: `Only client users can be linked to a farm (user ${notClients.join(', ')} is not a client).`,
      })
    }
    return unique
  }

  async function load(repos: Repositories, id: number): Promise<Farm> {
    const row = await repos.farms.findById(id)
    if (!row) throw notFound('The farm')
    const clients = await repos.farms.clientsByFarm([id])
    return toFarm(row, clients.get(id) ?? [])
  }

  return {
    async list(user: SessionUser, query: FarmListQuery): Promise<Page<Farm>> {
      const { rows, total } = await store.repos.farms.list({ ...query, onlyIds: visibleFarmIds(user) })
      const clients = await store.repos.farms.clientsByFarm(rows.map((r) => r.id))
      return pageOf(
        rows.map((r) => toFarm(r, clients.get(r.id) ?? [])),
        total,
        query,
      )
    },

    async get(user: SessionUser, id: number): Promise<Farm> {
      assertFarmVisible(user, id)
      return load(store.repos, id)
    },

    async create(input: FarmInput): Promise<Farm> {
      try {
        return await store.transaction(async (repos) => {
          if (await repos.farms.nameTaken(input.name)) throw conflict(NAME_TAKEN, { name: NAME_TAKEN })
          const clientIds = await checkClientIds(repos, input.clientIds)
          const id = await repos.farms.insert({
            name: input.name,
            timeZone: input.timeZone,
            address: input.address,
            notes: input.notes,
          })
          await repos.farms.setClients(id, clientIds)
          return load(repos, id)
        })
      } catch (error) {
        rethrowUniqueAsConflict(error, NAME_TAKEN, 'name')
      }
    },

    async update(id: number, patch: FarmPatch): Promise<Farm> {
      try {
        return await store.transaction(async (repos) => {
          if (!(await repos.farms.findById(id))) throw notFound('The farm')
          if (patch.name !== undefined && (await repos.farms.nameTaken(patch.name, id))) {
            throw conflict(NAME_TAKEN, { name: NAME_TAKEN })
          }
          const { clientIds, ...fields } = patch
          const changes = Object.fromEntries(Object.entries(fields).filter(([, v]) => v !== undefined))
          if (Object.keys(changes).length) await repos.farms.update(id, changes)
          if (clientIds !== undefined) await repos.farms.setClients(id, await checkClientIds(repos, clientIds))
          return load(repos, id)
        })
      } catch (error) {
        rethrowUniqueAsConflict(error, NAME_TAKEN, 'name')
      }
    },

    async remove(id: number): Promise<void> {
      if (!(await store.repos.farms.delete(id))) throw notFound('The farm')
    },
  }
}
export type FarmsService = ReturnType<typeof createFarmsService>
