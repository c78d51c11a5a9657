// Queries on machines (and their crews) and the passes booked on them.
import { and, asc, count, eq, ne } from 'drizzle-orm'
import type { DbOrTx } from '../index.ts'
import { machines, passes, type MachineRow } from '../schema-planning.ts'

export interface NewMachine {
  name: string
  crew: string
  antennaHeightM: number
  rateHaPerH: number | null
  active: boolean
  notes: string
  operatorUserId?: number | null
}

export function machinesRepository(db: DbOrTx) {
  return {
    async list(): Promise<MachineRow[]> {
      return db.select().from(machines).orderBy(asc(machines.name), asc(machines.id))
    },

    /** The machines this user runs (their passes show in the user's cab view). */
    async listByOperator(userId: number): Promise<MachineRow[]> {
      return db.select().from(machines).where(eq(machines.operatorUserId, userId)).orderBy(asc(machines.name))
    },

    async findById(id: number): Promise<MachineRow | null> {
      const [row] = await db.select().from(machines).where(eq(machines.id, id)).limit(1)
      return row ?? null
    },

    async findByName(name: string): Promise<MachineRow | null> {
      const [row] = await db.select().from(machines).where(eq(machines.name, name)).limit(1)
      return row ?? null
    },

    async nameTaken(name: string, exceptId?: number): Promise<boolean> {
      const where = exceptId ? and(eq(machines.name, name), ne(machines.id, exceptId)) : eq(machines.name, name)
      const [row] = await db.select({ id: machines.id }).from(machines).where(where).limit(1)
      return Boolean(row)
    },

    async insert(machine: NewMachine): Promise<number> {
      const [result] = await db.insert(machines).values(machine)
      return result.insertId
    },

    async update(id: number, changes: Partial<NewMachine>): Promise<void> {
      await db.update(machines).set({ ...changes, updatedAt: new Date() }).where(eq(machines.id, id))
    },

    async delete(id: number): Promise<boolean> {
      const [result] = await db.delete(machines).where(eq(machines.id, id))
      return result.affectedRows > 0
    },

    /** How many passes are booked on the machine. */
    async passCount(id: number): Promise<number> {
      const [{ n }] = await db.select({ n: count() }).from(passes).where(eq(passes.machineId, id))
      return n
    },
  }
}
export type MachinesRepository = ReturnType<typeof machinesRepository>
