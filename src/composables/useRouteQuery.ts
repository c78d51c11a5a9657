import { useRoute, useRouter } from 'vue-router'

/**
 * A page's choices kept in the address (?farm=3&field=12...), so a view can be shared:
 * read a positive whole number, change some keys (empty values drop the key).
 */
export function useRouteQuery() {
  const route = useRoute()
  const router = useRouter()

  /** The key as a positive whole number, or null. */
  function queryNumber(name: string): number | null {
    const v = Number(route.query[name])
    return Number.isInteger(v) && v > 0 ? v : null
  }

  /** Replaces some keys of the address; null, undefined and '' remove a key. */
  function setQuery(patch: Record<string, string | number | null | undefined>): void {
    const query: Record<string, string> = {}
    for (const [k, v] of Object.entries({ ...route.query, ...patch })) {
      if (v !== null && v !== undefined && v !== '') query[k] = String(v)
    }
    void router.replace({ query })
  }

  return { route, router, queryNumber, setQuery }
}
