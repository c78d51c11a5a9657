import type {
  ChangePasswordInput,
  RequestResetInput,
  ResetPasswordInput,
  SessionUser,
  SignInInput,
  UpdateProfileInput,
} from '@shared/schemas'
import { ApiError, http } from './http'

/** The signed-in user, or null when signed out (GET /api/auth/me answers 401). */
export async function fetchMe(): Promise<SessionUser | null> {
  try {
    return await http.get<SessionUser>('/auth/me', undefined, { allowAnonymous: true })
  } catch (error) {
    if (error instanceof ApiError && error.status === 401) return null
    throw error
  }
}

export const signIn = (input: SignInInput) =>
  http.post<SessionUser>('/auth/sign-in', input, { allowAnonymous: true, quiet: [401] })

export const signOut = () => http.post<void>('/auth/sign-out', {}, { allowAnonymous: true })

export const signOutEverywhere = () => http.post<void>('/auth/sign-out-everywhere')

export const updateProfile = (input: UpdateProfileInput) => http.patch<SessionUser>('/auth/me', input)

export const changePassword = (input: ChangePasswordInput) =>
  http.post<void>('/auth/change-password', input, { quiet: [401] })

export const requestReset = (input: RequestResetInput) =>
  http.post<void>('/auth/request-reset', input, { allowAnonymous: true })

export const resetPassword = (input: ResetPasswordInput) =>
  http.post<void>('/auth/reset', input, { allowAnonymous: true })
