// Queries on users and their farm links.
import { and, asc, count, desc, eq, inArray, or, type SQL } from 'drizzle-orm'
import type { Role, UnitSystem } from '../../../shared/schemas/common.ts'
import type { UserSortKey } from '../../../shared/schemas/users.ts'
import type { DbOrTx } from '../index.ts'
import { farmClients, users, type UserRow } from '../schema.ts'
import { containsPattern, likeEscaped, type PageRequest } from './util.ts'

export interface NewUser {
  email: string
  name: string
  role: Role
  units?: UnitSystem
  passwordHash?: string | null
  active?: boolean
}

export type UserChanges = Partial<Pick<UserRow, 'name' | 'role' | 'active' | 'units' | 'passwordHash' | 'lastSignInAt'>>

const sortColumns = {
  name: users.name,
  email: users.email,
  role: users.role,
  active: users.active,
  createdAt: users.createdAt,
  lastSignInAt: users.lastSignInAt,
} satisfies Record<UserSortKey, unknown>

export function usersRepository(db: DbOrTx) {
  return {
    async findById(id: number): Promise<UserRow | null> {
      const [row] = await db.select().from(users).where(eq(users.id, id)).limit(1)
      return row ?? null
    },

    async findByEmail(email: string): Promise<UserRow | null> {
      const [row] = await db.select().from(users).where(eq(users.email, email)).limit(1)
      return row ?? null
    },

    /** Existing user ids among `ids` with their roles. */
    async rolesOf(ids: number[]): Promise<Map<number, Role>> {
      if (ids.length === 0) return new Map()
      const rows = await db.select({ id: users.id, role: users.role }).from(users).where(inArray(users.id, ids))
      return new Map(rows.map((r) => [r.id, r.role]))
    },

    async farmIdsOf(userId: number): Promise<number[]> {
      const rows = await db
        .select({ farmId: farmClients.farmId })
        .from(farmClients)
        .where(eq(farmClients.userId, userId))
        .orderBy(asc(farmClients.farmId))
      return rows.map((r) => r.farmId)
    },

    async farmIdsByUser(userIds: number[]): Promise<Map<number, number[]>> {
      const map = new Map<number, number[]>(userIds.map((id) => [id, []]))
      if (userIds.length === 0) return map
      const rows = await db
        .select()
        .from(farmClients)
        .where(inArray(farmClients.userId, userIds))
        .orderBy(asc(farmClients.farmId))
      for (const r of rows) map.get(r.userId)?.push(r.farmId)
      return map
    },

    async list(req: PageRequest & { sort?: UserSortKey; role?: Role; active?: boolean }) {
      const filters: SQL[] = []
      if (req.q) {
        const p = containsPattern(req.q)
        filters.push(or(likeEscaped(users.name, p), likeEscaped(users.email, p))!)
      }
      if (req.role) filters.push(eq(users.role, req.role))
      if (req.active !== undefined) filters.push(eq(users.active, req.active))
      const where = filters.length ? and(...filters) : undefined
      const column = sortColumns[req.sort ?? 'name']
      const direction = req.order === 'desc' ? desc : asc
      const rows = await db
        .select()
        .from(users)
        .where(where)
        .orderBy(direction(column), asc(users.id))
        .limit(req.pageSize)
        .offset((req.page - 1) * req.pageSize)
      const [{ total }] = await db.select({ total: count() }).from(users).where(where)
      return { rows, total }
    },

    async insert(user: NewUser): Promise<number> {
      const [result] = await db.insert(users).values({
        email: user.email,
        name: user.name,
        role: user.role,
        units: user.units ?? 'metric',
        passwordHash: user.passwordHash ?? null,
        active: user.active ?? true,
      })
      return result.insertId
    },

    async update(id: number, changes: UserChanges): Promise<void> {
      if (Object.keys(changes).length === 0) return
      await db.update(users).set(changes).where(eq(users.id, id))
    },

    async setFarmIds(userId: number, farmIds: number[]): Promise<void> {
      await db.delete(farmClients).where(eq(farmClients.userId, userId))
      if (farmIds.length) await db.insert(farmClients).values(farmIds.map((farmId) => ({ farmId, userId })))
    },

    /**
     * Ids of all active admins, locking those rows until the transaction ends. Every caller
     * locks them in the same order (by id), so two concurrent changes wait for each other
     * instead of both removing "the other" admin (or deadlocking).
     */
    async lockActiveAdmins(): Promise<number[]> {
      const rows = await db
        .select({ id: users.id })
        .from(users)
        .where(and(eq(users.role, 'admin'), eq(users.active, true)))
        .orderBy(asc(users.id))
        .for('update')
      return rows.map((r) => r.id)
    },

    async count(): Promise<number> {
      const [{ n }] = await db.select({ n: count() }).from(users)
      return n
    },

    async countByEmailSuffix(suffix: string): Promise<number> {
      const [{ n }] = await db
        .select({ n: count() })
        .from(users)
        .where(likeEscaped(users.email, containsPattern(suffix).slice(0, -1)))
      return n
    },
  }
}
export type UsersRepository = ReturnType<typeof usersRepository>
