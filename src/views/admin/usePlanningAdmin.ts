import { computed, onMounted } from 'vue'
import { useUnits } from '@/composables/useUnits'
import { usePlanningStore, type PlanningList } from '@/stores/planning'
import { useSessionStore } from '@/stores/session'

/**
 * What the planning admin pages (machines, work types, service levels) share: the
 * planning store with the page's lists loaded when it opens, the user's units, and whether
 * the user may change them (admins; everyone else reads).
 * @example const { planning, units, canEdit, refresh } = usePlanningAdmin('machines')
 */
export function usePlanningAdmin(...lists: PlanningList[]) {
  const session = useSessionStore()
  const planning = usePlanningStore()
  const units = useUnits()
  const canEdit = computed(() => session.isAdmin)
  /** Reloads the page's lists; a failure is shown by the http client and the last lists stay. */
  const refresh = () => planning.load(...lists).catch(() => undefined)
  onMounted(() => void refresh())
  return { planning, units, canEdit, refresh }
}
