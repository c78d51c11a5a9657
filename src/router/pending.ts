import type { RouteLocationNormalized } from 'vue-router'

// The navigation under way (from its first guard until it lands or fails), so that a page
// that finishes loading late does not rewrite the address while the user is leaving it:
// that change would start a navigation of its own and cancel the user's.
let pending: RouteLocationNormalized | null = null

export function navigationStarted(to: RouteLocationNormalized): void {
  pending = to
}

/** `to` is the navigation that landed or failed; null when the router reports an error. */
export function navigationEnded(to: RouteLocationNormalized | null): void {
  if (to === null || pending === to) pending = null
}

/** True while a navigation to another page than `path` is under way. */
export function leavingFor(path: string): boolean {
  return pending !== null && pending.path !== path
}
