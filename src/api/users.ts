import type { Page, Role, User, UserInvite, UserPatch } from '@shared/schemas'
import { http } from './http'
import type { ListParams } from './farms'

export interface UserListParams extends ListParams {
  role?: Role
}

export const listUsers = (params: UserListParams = {}) => http.get<Page<User>>('/users', params)

export const inviteUser = (input: UserInvite) => http.post<User>('/users', input)

export const updateUser = (id: number, patch: UserPatch) => http.patch<User>(`/users/${id}`, patch)

export const resendInvite = (id: number) => http.post<void>(`/users/${id}/resend-invite`)
