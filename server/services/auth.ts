// Sign-in, sessions, profile, password change and the reset / invitation links.
import type { Session } from 'lucia'
import type {
  ChangePasswordInput,
  ResetPasswordInput,
  SessionUser,
  SignInInput,
  UpdateProfileInput,
} from '../../shared/schemas/auth.ts'
import { hashLinkToken, hashPassword, newLinkToken, verifyPassword } from '../auth/password.ts'
import { badRequest, HttpError, notFound, unauthorized } from '../http/errors.ts'
import { resetMail } from '../mail/templates.ts'
import { isDemoEmail, RESET_LINK_MINUTES, type ServiceContext } from './context.ts'

const INVALID_LINK = 'This link has expired or was already used. Ask for a new one.'

export function createAuthService(ctx: ServiceContext) {
  const { store, lucia, config, mailer, logger } = ctx

  async function sessionUser(userId: number): Promise<SessionUser> {
    const row = await store.repos.users.findById(userId)
    if (!row || !row.active) throw unauthorized()
    const farmIds = row.role === 'client' ? await store.repos.users.farmIdsOf(userId) : []
    return { id: row.id, email: row.email, name: row.name, role: row.role, units: row.units, farmIds }
  }

  async function sendResetLink(email: string): Promise<void> {
    const user = await store.repos.users.findByEmail(email)
    if (!user || !user.active) return
    const { token, tokenHash } = newLinkToken()
    await store.transaction(async (repos) => {
      await repos.tokens.revokeUnused(user.id, 'reset')
      await repos.tokens.insert({
        userId: user.id,
        purpose: 'reset',
        tokenHash,
        expiresAt: new Date(Date.now() + RESET_LINK_MINUTES * 60_000),
      })
    })
    const link = `${config.publicUrl}/reset-password?token=${encodeURIComponent(token)}`
    await mailer.send(resetMail({ to: user.email, name: user.name, link, expiresInMinutes: RESET_LINK_MINUTES }))
  }

  // Expired sessions and stale link tokens are removed at most once an hour, after a sign-in.
  let lastCleanup = 0
  function cleanUpNowAndThen(): void {
    const now = Date.now()
    if (now - lastCleanup < 3_600_000) return
    lastCleanup = now
    Promise.all([lucia.deleteExpiredSessions(), store.repos.tokens.deleteStale(new Date(now))]).catch((error: unknown) =>
      logger.warn('removing expired sessions and tokens failed', error),
    )
  }

  return {
    sessionUser,

    /** Checks the credentials and opens a session; returns the user and the cookie to set. */
    async signIn(input: SignInInput): Promise<{ user: SessionUser; cookie: string }> {
      const row = await store.repos.users.findByEmail(input.email)
      const valid = await verifyPassword(row?.passwordHash, input.password)
      if (!row || !valid || !row.active) {
        throw new HttpError(401, 'invalid_credentials', 'The e-mail address or the password is not correct.')
      }
      if (config.nodeEnv === 'production' && isDemoEmail(row.email)) {
        throw new HttpError(403, 'demo_disabled', 'Demo accounts cannot sign in to a production installation.')
      }
      const session = await lucia.createSession(row.id, {})
      await store.repos.users.update(row.id, { lastSignInAt: new Date() })
      cleanUpNowAndThen()
      return { user: await sessionUser(row.id), cookie: lucia.createSessionCookie(session.id).serialize() }
    },

    async signOut(session: Session): Promise<string> {
      await lucia.invalidateSession(session.id)
      return lucia.createBlankSessionCookie().serialize()
    },

    async signOutEverywhere(userId: number): Promise<string> {
      await lucia.invalidateUserSessions(userId)
      return lucia.createBlankSessionCookie().serialize()
    },

    async updateProfile(user: SessionUser, input: UpdateProfileInput): Promise<SessionUser> {
      await store.repos.users.update(user.id, {
        ...(input.name !== undefined ? { name: input.name } : {}),
        ...(input.units !== undefined ? { units: input.units } : {}),
      })
      return sessionUser(user.id)
    },

    /** Sets a new password after checking the current one; every other session ends. */
    async changePassword(user: SessionUser, session: Session, input: ChangePasswordInput): Promise<void> {
      const row = await store.repos.users.findById(user.id)
      if (!row) throw notFound('The user')
      if (!(await verifyPassword(row.passwordHash, input.currentPassword))) {
        throw badRequest('The current password is not correct.', {
          currentPassword: 'The current password is not correct.',
        })
      }
      if (input.currentPassword === input.newPassword) {
        throw badRequest('Choose a password different from the current one.', {
          newPassword: 'Choose a password different from the current one.',
        })
      }
      const passwordHash = await hashPassword(input.newPassword)
      await store.transaction(async (repos) => {
        await repos.users.update(user.id, { passwordHash })
        await repos.sessions.deleteOthers(user.id, session.id)
        await repos.tokens.revokeUnused(user.id, 'reset')
      })
    },

    /**
     * Starts a password reset. Always returns at once and the same way, whether or not the
     * address belongs to an active user; the e-mail is sent in the background.
     */
    requestReset(email: string): void {
      sendResetLink(email).catch((error: unknown) => logger.error('a password-reset e-mail could not be sent', error))
    },

    /** Completes a reset or an invitation: sets the password, uses up the link, ends all sessions. */
    async resetPassword(input: ResetPasswordInput): Promise<void> {
      const passwordHash = await hashPassword(input.password)
      await store.transaction(async (repos) => {
        const token = await repos.tokens.findByHashForUpdate(hashLinkToken(input.token))
        const now = new Date()
        if (!token || token.usedAt || token.expiresAt <= now) throw badRequest(INVALID_LINK, { token: INVALID_LINK })
        const user = await repos.users.findById(token.userId)
        if (!user || !user.active) throw badRequest(INVALID_LINK, { token: INVALID_LINK })
        await repos.users.update(user.id, { passwordHash })
        await repos.tokens.markUsed(token.id, now)
        await repos.tokens.revokeUnused(user.id)
        await repos.sessions.deleteAllOf(user.id)
      })
    },
  }
}
export type AuthService = ReturnType<typeof createAuthService>
