// Which farms a user may see. Clients see only their linked farms; every other role sees all.
// Services call these before reading or writing anything that belongs to a farm.
import type { SessionUser } from '../../shared/schemas/auth.ts'
import type { Role } from '../../shared/schemas/common.ts'
import { forbidden, notFound } from '../http/errors.ts'

type Caller = Pick<SessionUser, 'role' | 'farmIds'>

/** The farm ids a caller is restricted to, or undefined when the caller sees every farm. */
export function visibleFarmIds(user: Caller): number[] | undefined {
  return user.role === 'client' ? user.farmIds : undefined
}

export function canSeeFarm(user: Caller, farmId: number): boolean {
  return user.role !== 'client' || user.farmIds.includes(farmId)
}

/**
 * Throws 404 when the caller may not see the farm, so that a client cannot even learn
 * whether another business's farm id exists.
 */
export function assertFarmVisible(user: Caller, farmId: number): void {
  if (!canSeeFarm(user, farmId)) throw notFound('The farm')
}

/** Throws 403 unless the caller's role is one of `roles` (for rules inside services). */
export function assertRole(user: Pick<SessionUser, 'role'>, ...roles: Role[]): void {
  if (!roles.includes(user.role)) throw forbidden()
}

/** Roles that may change farm data (fields, obstructions, passes) on farms they can see. */
export const farmEditorRoles: Role[] = ['admin', 'office', 'contractor']
