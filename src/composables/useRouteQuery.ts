import { onUnmounted } from 'vue'
import { useRoute, useRouter, type RouteLocationNormalized } from 'vue-router'

/**
 * A page's choices kept in the address (?farm=3&field=12...), so a view can be shared:
 * read a positive whole number, change some keys (empty values drop the key). A change
 * asked for once the user has set off for another page (a default chosen when a fetch
 * comes back) is dropped, so that it neither pulls them back nor lands on the other page.
 */
export function useRouteQuery() {
  const route = useRoute()
  const router = useRouter()
  const ownRoute = route.name

  // The navigation under way, if any (between the router's first guard and its end).
  let underWay: RouteLocationNormalized | null = null
  const stopBefore = router.beforeEach((to) => {
    underWay = to
  })
  const stopAfter = router.afterEach(() => {
    underWay = null
  })
  onUnmounted(() => {
    stopBefore()
    stopAfter()
  })

  /** The key as a positive whole number, or null. */
  function queryNumber(name: string): number | null {
    const v = Number(route.query[name])
    return Number.isInteger(v) && v > 0 ? v : null
  }

  /** Replaces some keys of the address; null, undefined and '' remove a key. Nothing once the page is being left. */
  function setQuery(patch: Record<string, string | number | null | undefined>): void {
    if (route.name !== ownRoute || (underWay !== null && underWay.name !== ownRoute)) return
    const query: Record<string, string> = {}
    for (const [k, v] of Object.entries({ ...route.query, ...patch })) {
      if (v !== null && v !== undefined && v !== '') query[k] = String(v)
    }
    void router.replace({ query })
  }

  return { route, router, queryNumber, setQuery }
}
