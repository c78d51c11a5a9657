/**
 * The service worker answers the session check from its cache 'skyfurrow-session' when
 * there is no signal (vite.config.ts). Signing out drops that copy, so an offline start
 * after sign-out does not show the previous user.
 */
export async function forgetCachedSession(): Promise<void> {
  if (typeof caches === 'undefined') return
  await caches.delete('skyfurrow-session').catch(() => false)
}
