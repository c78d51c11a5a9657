import type { RouteLocationNormalized, RouteLocationRaw } from 'vue-router'
import type { SessionUser } from '@shared/schemas'
import { RouteNames } from './names'

export interface GuardContext {
  user: SessionUser | null
  fakeMailbox: boolean
}

/**
 * Decides a navigation: `true` to go ahead, or where to go instead. Pure, so that the
 * rules are unit-tested without a browser.
 */
export function decideNavigation(
  to: Pick<RouteLocationNormalized, 'meta' | 'fullPath' | 'name'>,
  { user, fakeMailbox }: GuardContext,
): true | RouteLocationRaw {
  if (to.meta.guestOnly && user) return { name: RouteNames.outlook }
  if (to.meta.public) return true
  if (!user) return { name: RouteNames.signIn, query: { next: to.fullPath } }
  if (to.meta.roles && !to.meta.roles.includes(user.role)) {
    return { name: RouteNames.notAllowed, query: { from: to.fullPath } }
  }
  if (to.meta.needsFakeMailbox && !fakeMailbox) {
    return { name: RouteNames.notAllowed, query: { from: to.fullPath, reason: 'mailbox' } }
  }
  return true
}

/** Only same-site paths are followed after sign-in (no open redirect through ?next=). */
export function safeNext(next: unknown): string | null {
  if (typeof next !== 'string') return null
  if (!next.startsWith('/') || next.startsWith('//') || next.startsWith('/\\')) return null
  if (next.startsWith('/sign-in')) return null
  return next
}
