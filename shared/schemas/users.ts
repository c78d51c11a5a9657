import { z } from 'zod'
import { listQuerySchema, roleSchema, unitSystemSchema, type Role, type UnitSystem } from './common'
import { emailSchema } from './auth'

/** Admin invites a user: an e-mail with a set-password link goes out. */
export const userInviteSchema = z.object({
  email: emailSchema,
  name: z.string().trim().min(1, 'Enter a name').max(120),
  role: roleSchema,
  farmIds: z.array(z.number().int().positive()).max(200).default([]),
})
export type UserInvite = z.infer<typeof userInviteSchema>

export const userPatchSchema = z.object({
  name: z.string().trim().min(1, 'Enter a name').max(120).optional(),
  role: roleSchema.optional(),
  farmIds: z.array(z.number().int().positive()).max(200).optional(),
  active: z.boolean().optional(),
  units: unitSystemSchema.optional(),
})
export type UserPatch = z.infer<typeof userPatchSchema>

export interface User {
  id: number
  email: string
  name: string
  role: Role
  active: boolean
  units: UnitSystem
  farmIds: number[]
  /** False until an invited user has set a password. */
  passwordSet: boolean
  lastSignInAt: string | null
  createdAt: string
}

/** Columns the Users table can be sorted by. */
export const userSortKeys = ['name', 'email', 'role', 'active', 'createdAt', 'lastSignInAt'] as const
export type UserSortKey = (typeof userSortKeys)[number]

/** GET /api/users: paging, sorting, search (name or e-mail) and filters. */
export const userListQuerySchema = listQuerySchema.extend({
  sort: z.enum(userSortKeys, { error: `Sort by one of: ${userSortKeys.join(', ')}` }).optional(),
  role: roleSchema.optional(),
  active: z
    .enum(['true', 'false'], { error: 'Use true or false' })
    .transform((v) => v === 'true')
    .optional(),
})
export type UserListQuery = z.infer<typeof userListQuerySchema>
