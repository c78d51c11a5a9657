// lucia 3 sessions stored in MariaDB (sessions table) through Drizzle.
import { DrizzleMySQLAdapter } from '@lucia-auth/adapter-drizzle'
import { eq, sql } from 'drizzle-orm'
import { Lucia, TimeSpan, type DatabaseSession, type DatabaseUser } from 'lucia'
import type { Role, UnitSystem } from '../../shared/schemas/common.ts'
import type { Database } from '../db/index.ts'
import { sessions, users } from '../db/schema.ts'

export const SESSION_COOKIE = 'skyfurrow_session'
/** Sessions last 14 days; lucia extends one that is past half of that when it is used. */
export const SESSION_LIFETIME = new TimeSpan(14, 'd')
/**
 * However much it is used, a session ends 30 days after its sign-in and the user signs in
 * again (periodic re-authentication, OWASP ASVS 4.0.3 V3.3.2, level 2).
 */
export const SESSION_MAX_AGE_MS = 30 * 86_400_000

interface DatabaseUserAttributes {
  email: string
  name: string
  role: Role
  active: boolean
  units: UnitSystem
}

/**
 * The Drizzle adapter, with the lookup every signed-in request makes prepared once: it
 * reads only the user columns a request uses (never the password hash) and is not
 * rebuilt per request.
 */
class SessionAdapter extends DrizzleMySQLAdapter {
  private readonly lookup

  constructor(db: Database) {
    super(db, sessions, users)
    this.lookup = db
      .select({
        sessionId: sessions.id,
        userId: sessions.userId,
        expiresAt: sessions.expiresAt,
        createdAt: sessions.createdAt,
        email: users.email,
        name: users.name,
        role: users.role,
        active: users.active,
        units: users.units,
      })
      .from(sessions)
      .innerJoin(users, eq(sessions.userId, users.id))
      .where(eq(sessions.id, sql.placeholder('id')))
      .prepare()
  }

  override async getSessionAndUser(sessionId: string): Promise<[DatabaseSession | null, DatabaseUser | null]> {
    const rows = await this.lookup.execute({ id: sessionId })
    if (rows.length !== 1) return [null, null]
    const { sessionId: id, userId, expiresAt, createdAt, ...attributes } = rows[0]
    if (createdAt && Date.now() - createdAt.getTime() > SESSION_MAX_AGE_MS) {
      await this.deleteSession(id)
      return [null, null]
    }
    return [
      { id, userId, expiresAt, attributes: {} },
      { id: userId, attributes },
    ]
  }
}

export function createLucia(db: Database, options: { secure: boolean }) {
  const adapter = new SessionAdapter(db)
  return new Lucia(adapter, {
    sessionExpiresIn: SESSION_LIFETIME,
    sessionCookie: {
      name: SESSION_COOKIE,
      expires: true,
      attributes: { secure: options.secure, sameSite: 'lax', path: '/' },
    },
    // Only what requests need; the password hash never leaves the adapter's row.
    getUserAttributes: (a) => ({ email: a.email, name: a.name, role: a.role, active: a.active, units: a.units }),
  })
}
export type Auth = ReturnType<typeof createLucia>

declare module 'lucia' {
  interface Register {
    Lucia: Auth
    UserId: number
    DatabaseUserAttributes: DatabaseUserAttributes
  }
}
