// Request authentication (the session cookie) and the authorization guards routes use.
import type { RequestHandler } from 'express'
import type { Session } from 'lucia'
import type { SessionUser } from '../../shared/schemas/auth.ts'
import type { Role } from '../../shared/schemas/common.ts'
import type { Repositories } from '../db/repositories/index.ts'
import { forbidden, unauthorized } from '../http/errors.ts'
import type { Auth } from './lucia.ts'

export interface RequestAuth {
  session: Session
  user: SessionUser
}

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Request {
      /** Set by `loadSession` when the request carries a valid session cookie. */
      auth?: RequestAuth
    }
  }
}

/**
 * Reads the session cookie; on a valid session sets `req.auth` (and renews the cookie when
 * lucia extended the session); clears the cookie when the session is unknown, expired or
 * belongs to a deactivated user. Never rejects a request by itself.
 */
export function loadSession(lucia: Auth, repos: Repositories): RequestHandler {
  return async (req, res, next) => {
    const sessionId = lucia.readSessionCookie(req.headers.cookie ?? '')
    if (!sessionId) return next()
    const { session, user } = await lucia.validateSession(sessionId)
    if (!session || !user.active) {
      if (session) await lucia.invalidateUserSessions(user.id)
      res.append('Set-Cookie', lucia.createBlankSessionCookie().serialize())
      return next()
    }
    if (session.fresh) res.append('Set-Cookie', lucia.createSessionCookie(session.id).serialize())
    const farmIds = user.role === 'client' ? await repos.users.farmIdsOf(user.id) : []
    req.auth = {
      session,
      user: { id: user.id, email: user.email, name: user.name, role: user.role, units: user.units, farmIds },
    }
    next()
  }
}

/** The signed-in user, or HttpError 401. */
export function currentAuth(req: { auth?: RequestAuth }): RequestAuth {
  if (!req.auth) throw unauthorized()
  return req.auth
}

/** Any signed-in user. */
export const requireAuth: RequestHandler = (req, _res, next) => {
  currentAuth(req)
  next()
}

/** Signed-in users whose role is one of `roles` (401 when signed out, 403 otherwise). */
export function requireRole(...roles: Role[]): RequestHandler {
  return (req, _res, next) => {
    const { user } = currentAuth(req)
    if (!roles.includes(user.role)) throw forbidden()
    next()
  }
}
