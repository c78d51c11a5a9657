// Machines and their crews: everyone signed in reads them; admins create, change, delete.
import type { Machine, MachineInput, MachinePatch } from '../../shared/schemas/planning.ts'
import type { MachineRow } from '../db/schema-planning.ts'
import { conflict, notFound } from '../http/errors.ts'
import { rethrowUniqueAsConflict, type ServiceContext } from './context.ts'

const NAME_TAKEN = 'A machine with this name already exists.'

export function toMachine(row: MachineRow): Machine {
  return {
    id: row.id,
    name: row.name,
    crew: row.crew,
    antennaHeightM: row.antennaHeightM,
    rateHaPerH: row.rateHaPerH,
    active: row.active,
    notes: row.notes,
  }
}

export function createMachinesService(ctx: ServiceContext) {
  const { store } = ctx

  return {
    async list(): Promise<Machine[]> {
      return (await store.repos.machines.list()).map(toMachine)
    },

    async get(id: number): Promise<Machine> {
      const row = await store.repos.machines.findById(id)
      if (!row) throw notFound('The machine')
      return toMachine(row)
    },

    async create(input: MachineInput): Promise<Machine> {
      try {
        return await store.transaction(async (repos) => {
          if (await repos.machines.nameTaken(input.name)) throw conflict(NAME_TAKEN, { name: NAME_TAKEN })
          const id = await repos.machines.insert(input)
          return toMachine((await repos.machines.findById(id))!)
        })
      } catch (error) {
        rethrowUniqueAsConflict(error, NAME_TAKEN, 'name')
      }
    },

    async update(id: number, patch: MachinePatch): Promise<Machine> {
      try {
        return await store.transaction(async (repos) => {
          if (!(await repos.machines.findById(id))) throw notFound('The machine')
          if (patch.name !== undefined && (await repos.machines.nameTaken(patch.name, id))) {
            throw conflict(NAME_TAKEN, { name: NAME_TAKEN })
          }
          const changes = Object.fromEntries(Object.entries(patch).filter(([, v]) => v !== undefined))
          if (Object.keys(changes).length) await repos.machines.update(id, changes)
          return toMachine((await repos.machines.findById(id))!)
        })
      } catch (error) {
        rethrowUniqueAsConflict(error, NAME_TAKEN, 'name')
      }
    },

    /** 409 while passes are booked on it (deactivate it instead). */
    async remove(id: number): Promise<void> {
      await store.transaction(async (repos) => {
        const row = await repos.machines.findById(id)
        if (!row) throw notFound('The machine')
        const passes = await repos.machines.passCount(id)
        if (passes > 0) {
          throw conflict(
            `${row.name} is booked on ${passes} pass${passes > 1 ? 'es' : ''}. Mark it inactive instead, or move those passes to another machine first.`,
          )
        }
        await repos.machines.delete(id)
      })
    },
  }
}
export type MachinesService = ReturnType<typeof createMachinesService>
