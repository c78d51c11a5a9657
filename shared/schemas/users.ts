import { z } from 'zod'
import { roleSchema, unitSystemSchema, type Role, type UnitSystem } from './common'
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
