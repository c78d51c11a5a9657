// User administration: list, invite (with a set-password e-mail), change, re-invite.
// Rules: e-mails are unique; only client users are linked to farms; there is always at
// least one active admin; deactivating a user ends their sessions at once.
import type { Page } from '../../shared/schemas/common.ts'
import type { User, UserInvite, UserListQuery, UserPatch } from '../../shared/schemas/users.ts'
import type { SessionUser } from '../../shared/schemas/auth.ts'
import type { Repositories } from '../db/repositories/index.ts'
import type { UserRow } from '../db/schema.ts'
import { newLinkToken } from '../auth/password.ts'
import { badRequest, conflict, HttpError, notFound } from '../http/errors.ts'
import { inviteMail } from '../mail/templates.ts'
import { INVITE_LINK_DAYS, pageOf, rethrowUniqueAsConflict, type ServiceContext } from './context.ts'

const EMAIL_TAKEN = 'A user with this e-mail already exists.'

export function toUser(row: UserRow, farmIds: number[]): User {
  return {
    id: row.id,
    email: row.email,
    name: row.name,
    role: row.role,
    active: row.active,
    units: row.units,
    farmIds,
    passwordSet: row.passwordHash !== null,
    lastSignInAt: row.lastSignInAt ? row.lastSignInAt.toISOString() : null,
    createdAt: row.createdAt.toISOString(),
  }
}

const LAST_ADMIN_MESSAGE =
  'Skyfurrow needs at least one active admin. Make another user an admin first, then change this one.'

export function createUsersService(ctx: ServiceContext) {
  const { store, config, mailer } = ctx

  /** Checks farm links against the role: 400 naming farmIds when they do not fit. */
  async function checkFarmIds(repos: Repositories, role: UserRow['role'], farmIds: number[]): Promise<number[]> {
    const unique = [...new Set(farmIds)]
    if (role !== 'client') {
      if (unique.length) {
        throw badRequest('Only client users are linked to farms.', {
          farmIds: 'Only client users are linked to farms; the other roles see every farm.',
        })
      }
      return []
    }
    const existing = await repos.farms.existingIds(unique)
    const missing = unique.filter((id) => !existing.has(id))
    if (missing.length) throw badRequest('Some farms do not exist.', { farmIds: `No farm with id ${missing.join(', ')}.` })
    return unique
  }

  async function sendInvite(repos: Repositories, user: UserRow, invitedBy: string): Promise<void> {
    await repos.tokens.revokeUnused(user.id, 'invite')
    const { token, tokenHash } = newLinkToken()
    await repos.tokens.insert({
      userId: user.id,
      purpose: 'invite',
      tokenHash,
      expiresAt: new Date(Date.now() + INVITE_LINK_DAYS * 86_400_000),
    })
    const businessName = (await repos.business.get())?.name ?? 'Your contractor'
    const link = `${config.publicUrl}/reset-password?token=${encodeURIComponent(token)}&invite=1`
    try {
      await mailer.send(
        inviteMail({ to: user.email, name: user.name, businessName, invitedBy, link, expiresInDays: INVITE_LINK_DAYS }),
      )
    } catch (error) {
      ctx.logger.error(`the invitation to ${user.email} could not be sent`, error)
      throw new HttpError(
        502,
        'mail_failed',
        'The invitation e-mail could not be sent, so nothing was saved. Check the mail settings and try again.',
      )
    }
  }

  return {
    async list(query: UserListQuery): Promise<Page<User>> {
      const { rows, total } = await store.repos.users.list(query)
      const farmIds = await store.repos.users.farmIdsByUser(rows.map((r) => r.id))
      return pageOf(
        rows.map((r) => toUser(r, farmIds.get(r.id) ?? [])),
        total,
        query,
      )
    },

    async get(id: number): Promise<User> {
      const row = await store.repos.users.findById(id)
      if (!row) throw notFound('The user')
      return toUser(row, await store.repos.users.farmIdsOf(id))
    },

    /** Creates the user without a password and e-mails a set-password link; all or nothing. */
    async invite(admin: SessionUser, input: UserInvite): Promise<User> {
      try {
        const id = await store.transaction(async (repos) => {
          if (await repos.users.findByEmail(input.email)) {
            throw conflict(EMAIL_TAKEN, { email: EMAIL_TAKEN })
          }
          const farmIds = await checkFarmIds(repos, input.role, input.farmIds)
          const userId = await repos.users.insert({ email: input.email, name: input.name, role: input.role })
          await repos.users.setFarmIds(userId, farmIds)
          const row = (await repos.users.findById(userId))!
          // Sent inside the transaction: when the mail cannot go out, the user is not kept.
          await sendInvite(repos, row, admin.name)
          return userId
        })
        return await this.get(id)
      } catch (error) {
        rethrowUniqueAsConflict(error, EMAIL_TAKEN, 'email')
      }
    },

    async update(id: number, patch: UserPatch): Promise<User> {
      await store.transaction(async (repos) => {
        // A change that may take away an admin locks the active admins first, before reading.
        const mayRemoveAdmin = (patch.role !== undefined && patch.role !== 'admin') || patch.active === false
        const activeAdmins = mayRemoveAdmin ? await repos.users.lockActiveAdmins() : []
        const row = await repos.users.findById(id)
        if (!row) throw notFound('The user')
        const role = patch.role ?? row.role
        const active = patch.active ?? row.active
        const losesAdmin = row.role === 'admin' && row.active && (role !== 'admin' || !active)
        if (losesAdmin && activeAdmins.filter((adminId) => adminId !== id).length === 0) {
          throw conflict(LAST_ADMIN_MESSAGE, patch.role && patch.role !== 'admin' ? { role: LAST_ADMIN_MESSAGE } : { active: LAST_ADMIN_MESSAGE })
        }
        if (patch.farmIds !== undefined || role !== row.role) {
          const wanted = patch.farmIds ?? (role === 'client' ? await repos.users.farmIdsOf(id) : [])
          await repos.users.setFarmIds(id, await checkFarmIds(repos, role, wanted))
        }
        await repos.users.update(id, {
          ...(patch.name !== undefined ? { name: patch.name } : {}),
          ...(patch.units !== undefined ? { units: patch.units } : {}),
          role,
          active,
        })
        if (!active && row.active) {
          await repos.sessions.deleteAllOf(id)
          await repos.tokens.revokeUnused(id)
        }
      })
      return this.get(id)
    },

    /** A new invitation link for a user who has not set a password yet. */
    async resendInvite(admin: SessionUser, id: number): Promise<void> {
      await store.transaction(async (repos) => {
        const row = await repos.users.findById(id)
        if (!row) throw notFound('The user')
        if (row.passwordHash !== null) {
          throw conflict('This user has already set a password; they can use "Forgot password" instead.')
        }
        if (!row.active) throw conflict('This user is deactivated; activate them before inviting again.')
        await sendInvite(repos, row, admin.name)
      })
    },
  }
}
export type UsersService = ReturnType<typeof createUsersService>
