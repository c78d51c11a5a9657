// lucia 3 sessions stored in MariaDB (sessions table) through Drizzle.
import { DrizzleMySQLAdapter } from '@lucia-auth/adapter-drizzle'
import { Lucia, TimeSpan } from 'lucia'
import type { Role, UnitSystem } from '../../shared/schemas/common.ts'
import type { Database } from '../db/index.ts'
import { sessions, users } from '../db/schema.ts'

export const SESSION_COOKIE = 'skyfurrow_session'
/** Sessions last 14 days; lucia extends one that is past half of that when it is used. */
export const SESSION_LIFETIME = new TimeSpan(14, 'd')

interface DatabaseUserAttributes {
  email: string
  name: string
  role: Role
  active: boolean
  units: UnitSystem
}

export function createLucia(db: Database, options: { secure: boolean }) {
  const adapter = new DrizzleMySQLAdapter(db, sessions, users)
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
