import { z } from 'zod'
import { roleSchema, unitSystemSchema } from './common'

export const emailSchema = z.string().trim().toLowerCase().email('Enter a valid e-mail address').max(254)
export const passwordSchema = z
  .string()
  .min(12, 'Use at least 12 characters')
  .max(200, 'Use at most 200 characters')

export const signInSchema = z.object({
  email: emailSchema,
  password: z.string().min(1, 'Enter your password').max(200),
})
export type SignInInput = z.infer<typeof signInSchema>

export const changePasswordSchema = z.object({
  currentPassword: z.string().min(1, 'Enter your current password').max(200),
  newPassword: passwordSchema,
})
export type ChangePasswordInput = z.infer<typeof changePasswordSchema>

export const requestResetSchema = z.object({ email: emailSchema })
export type RequestResetInput = z.infer<typeof requestResetSchema>

/** Used both for "forgot password" links and for invitation (set your password) links. */
export const resetPasswordSchema = z.object({
  token: z.string().min(20).max(200),
  password: passwordSchema,
})
export type ResetPasswordInput = z.infer<typeof resetPasswordSchema>

export const updateProfileSchema = z.object({
  name: z.string().trim().min(1, 'Enter a name').max(120).optional(),
  units: unitSystemSchema.optional(),
})
export type UpdateProfileInput = z.infer<typeof updateProfileSchema>

/** The signed-in user as the client sees it (GET /api/auth/me, POST /api/auth/sign-in). */
export const sessionUserSchema = z.object({
  id: z.number().int(),
  email: z.string(),
  name: z.string(),
  role: roleSchema,
  units: unitSystemSchema,
  farmIds: z.array(z.number().int()),
})
export type SessionUser = z.infer<typeof sessionUserSchema>
