import { getCurrentInstance, onUnmounted } from 'vue'
import { useRoute, useRouter } from 'vue-router'
import { leavingFor } from '@/router/pending'

/**
 * A page's choices kept in the address (?farm=3&field=12...), so a view can be shared:
 * read a positive whole number, change some keys (empty values drop the key).
 */
export function useRouteQuery() {
  const route = useRoute()
  const router = useRouter()
  // The page this address belongs to: a change asked for once the user has left it, or
  // while a click on another page is on its way, would pull the user back here.
  const path = route.path
  let mounted = true
  if (getCurrentInstance()) onUnmounted(() => (mounted = false))

  /** The key as a positive whole number, or null. */
  function queryNumber(name: string): number | null {
    const v = Number(route.query[name])
    return Number.isInteger(v) && v > 0 ? v : null
  }

  /**
   * Replaces some keys of the address; null, undefined and '' remove a key. Nothing
   * happens once the user has left the page or is on the way to another one.
   */
  function setQuery(patch: Record<string, string | number | null | undefined>): void {
    if (!mounted || route.path !== path || leavingFor(path)) return
    const query: Record<string, string> = {}
    for (const [k, v] of Object.entries({ ...route.query, ...patch })) {
      if (v !== null && v !== undefined && v !== '') query[k] = String(v)
    }
    void router.replace({ query })
  }

  return { route, router, queryNumber, setQuery }
}
