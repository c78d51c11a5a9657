import { ref, shallowRef } from 'vue'
import { defineStore } from 'pinia'
import type { Farm } from '@shared/schemas'
import { listFarms } from '@/api/farms'

/** The most farms a picker lists (the API's largest page). */
const FARMS_PAGE = 200

/**
 * The farms the signed-in user may see, by name: what the Fields, Outlook, Passes, Plans
 * and Jobs pages pick from and the account page lists. `load()` fetches them anew (pages call it when they open; the farm
 * admin page after every save or delete); the last list stays shown meanwhile.
 */
export const useFarmsStore = defineStore('farms', () => {
  const farms = shallowRef<Farm[]>([])
  /** how many farms the user may see (more than `farms` holds when past the first page) */
  const total = ref(0)
  const loading = ref(false)
  const loaded = ref(false)
  let generation = 0

  /** Fetches the list anew; rejects when that fails (the http client has told the user). */
  async function load(): Promise<Farm[]> {
    const mine = ++generation
    loading.value = true
    try {
      const page = await listFarms({ pageSize: FARMS_PAGE, sort: 'name', order: 'asc' })
      if (mine === generation) {
        farms.value = page.items
        total.value = page.total
        loaded.value = true
      }
      return farms.value
    } finally {
      if (mine === generation) loading.value = false
    }
  }

  function byId(id: number | null | undefined): Farm | undefined {
    return id == null ? undefined : farms.value.find((f) => f.id === id)
  }

  return { farms, total, loading, loaded, load, byId }
})
