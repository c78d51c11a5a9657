// Queries on farms and their linked client users.
import { and, asc, count, desc, eq, inArray, ne, or, type SQL } from 'drizzle-orm'
import type { FarmClient, FarmSortKey } from '../../../shared/schemas/farms.ts'
import type { DbOrTx } from '../index.ts'
import { farmClients, farms, users, type FarmRow } from '../schema.ts'
import { containsPattern, likeEscaped, type PageRequest } from './util.ts'

export interface NewFarm {
  name: string
  timeZone: string
  address: string
  notes: string
}

const sortColumns = {
  name: farms.name,
  timeZone: farms.timeZone,
  createdAt: farms.createdAt,
  updatedAt: farms.updatedAt,
} satisfies Record<FarmSortKey, unknown>

export function farmsRepository(db: DbOrTx) {
  return {
    async findById(id: number): Promise<FarmRow | null> {
      const [row] = await db.select().from(farms).where(eq(farms.id, id)).limit(1)
      return row ?? null
    },

    /** A page of farms; `onlyIds` restricts the result (a client's linked farms). */
    async list(req: PageRequest & { sort?: FarmSortKey; onlyIds?: number[] }) {
      if (req.onlyIds && req.onlyIds.length === 0) return { rows: [] as FarmRow[], total: 0 }
      const filters: SQL[] = []
      if (req.onlyIds) filters.push(inArray(farms.id, req.onlyIds))
      if (req.q) {
        const p = containsPattern(req.q)
        filters.push(or(likeEscaped(farms.name, p), likeEscaped(farms.address, p), likeEscaped(farms.notes, p))!)
      }
      const where = filters.length ? and(...filters) : undefined
      const direction = req.order === 'desc' ? desc : asc
      const rows = await db
        .select()
        .from(farms)
        .where(where)
        .orderBy(direction(sortColumns[req.sort ?? 'name']), asc(farms.id))
        .limit(req.pageSize)
        .offset((req.page - 1) * req.pageSize)
      const [{ total }] = await db.select({ total: count() }).from(farms).where(where)
      return { rows, total }
    },

    async existingIds(ids: number[]): Promise<Set<number>> {
      if (ids.length === 0) return new Set()
      const rows = await db.select({ id: farms.id }).from(farms).where(inArray(farms.id, ids))
      return new Set(rows.map((r) => r.id))
    },

    async nameTaken(name: string, exceptId?: number): Promise<boolean> {
      const where = exceptId ? and(eq(farms.name, name), ne(farms.id, exceptId)) : eq(farms.name, name)
      const [row] = await db.select({ id: farms.id }).from(farms).where(where).limit(1)
      return Boolean(row)
    },

    async clientsByFarm(farmIds: number[]): Promise<Map<number, FarmClient[]>> {
      const map = new Map<number, FarmClient[]>(farmIds.map((id) => [id, []]))
      if (farmIds.length === 0) return map
      const rows = await db
        .select({ farmId: farmClients.farmId, id: users.id, name: users.name, email: users.email })
        .from(farmClients)
        .innerJoin(users, eq(users.id, farmClients.userId))
        .where(inArray(farmClients.farmId, farmIds))
        .orderBy(asc(users.name), asc(users.id))
      for (const { farmId, ...client } of rows) map.get(farmId)?.push(client)
      return map
    },

    async insert(farm: NewFarm): Promise<number> {
      const [result] = await db.insert(farms).values(farm)
      return result.insertId
    },

    async update(id: number, changes: Partial<NewFarm>): Promise<void> {
      await db.update(farms).set({ ...changes, updatedAt: new Date() }).where(eq(farms.id, id))
    },

    async setClients(farmId: number, userIds: number[]): Promise<void> {
      await db.delete(farmClients).where(eq(farmClients.farmId, farmId))
      if (userIds.length) await db.insert(farmClients).values(userIds.map((userId) => ({ farmId, userId })))
    },

    async delete(id: number): Promise<boolean> {
      const [result] = await db.delete(farms).where(eq(farms.id, id))
      return result.affectedRows > 0
    },
  }
}
export type FarmsRepository = ReturnType<typeof farmsRepository>
