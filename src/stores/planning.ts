import { computed, reactive, shallowRef, type ShallowRef } from 'vue'
import { defineStore } from 'pinia'
import type { Machine, ServiceLevel, WorkType } from '@shared/schemas'
import { listMachines, listServiceLevels, listWorkTypes } from '@/api/planning'

export type PlanningList = 'workTypes' | 'machines' | 'serviceLevels'

/**
 * The planning lists every page picks from: work types, machines and service levels.
 * Pages call `load(...)` when they open (the lists are fetched anew, the last ones stay
 * shown meanwhile); the admin pages call it after every save or delete, so no page shows
 * a stale list.
 */
export const usePlanningStore = defineStore('planning', () => {
  const workTypes = shallowRef<WorkType[]>([])
  const machines = shallowRef<Machine[]>([])
  const serviceLevels = shallowRef<ServiceLevel[]>([])
  /** The work types the outlook and the passes offer: active ones, in their list order. */
  const activeWorkTypes = computed(() =>
    workTypes.value.filter((t) => t.active).sort((a, b) => a.sortOrder - b.sortOrder || a.name.localeCompare(b.name)),
  )
  /** The machines passes can be booked on. */
  const activeMachines = computed(() => machines.value.filter((m) => m.active))
  const loading = reactive<Record<PlanningList, boolean>>({ workTypes: false, machines: false, serviceLevels: false })
  const loaded = reactive<Record<PlanningList, boolean>>({ workTypes: false, machines: false, serviceLevels: false })

  const lists: Record<PlanningList, { target: ShallowRef<unknown[]>; fetch: () => Promise<unknown[]> }> = {
    workTypes: { target: workTypes as ShallowRef<unknown[]>, fetch: listWorkTypes },
    machines: { target: machines as ShallowRef<unknown[]>, fetch: listMachines },
    serviceLevels: { target: serviceLevels as ShallowRef<unknown[]>, fetch: listServiceLevels },
  }
  // The newest request of a list wins, so a save's reload is never undone by an older one.
  const generation: Record<PlanningList, number> = { workTypes: 0, machines: 0, serviceLevels: 0 }

  async function loadOne(kind: PlanningList): Promise<void> {
    const mine = ++generation[kind]
    loading[kind] = true
    try {
      const items = await lists[kind].fetch()
      if (mine !== generation[kind]) return
      lists[kind].target.value = items
      loaded[kind] = true
    } finally {
      if (mine === generation[kind]) loading[kind] = false
    }
  }

  /**
   * Fetches the named lists anew (all three when none is named). Rejects when one fails
   * (the http client has told the user); the lists already held stay.
   */
  async function load(...kinds: PlanningList[]): Promise<void> {
    const wanted = kinds.length > 0 ? kinds : (Object.keys(lists) as PlanningList[])
    await Promise.all(wanted.map(loadOne))
  }

  return { workTypes, machines, serviceLevels, activeWorkTypes, activeMachines, loading, loaded, load }
})
