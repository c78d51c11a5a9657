import { computed } from 'vue'
import type { UnitSystem } from '@shared/schemas'
import { useSessionStore } from '@/stores/session'

/** The signed-in user's unit system (metric when unknown). */
export function useUnits() {
  const session = useSessionStore()
  return computed<UnitSystem>(() => session.user?.units ?? 'metric')
}
