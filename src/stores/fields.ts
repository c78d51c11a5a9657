import { reactive, ref } from 'vue'
import { defineStore } from 'pinia'
import type { Field } from '@shared/schemas/fields'
import { listFields } from '@/api/fields'

/**
 * The fields of each farm, as the Fields, Outlook and Passes pages show them. `load(farmId)`
 * fetches a farm's fields anew (pages call it when they show the farm); the Fields page
 * puts each save, import and delete here, so the other pages see them at once.
 */
export const useFieldsStore = defineStore('fields', () => {
  const byFarm = ref<Record<number, Field[]>>({})
  const loading = reactive<Record<number, boolean>>({})
  const generation = new Map<number, number>()

  /** The farm's fields in the order the API gives them (empty before the first load). */
  function of(farmId: number | null | undefined): Field[] {
    return farmId == null ? [] : (byFarm.value[farmId] ?? [])
  }

  /** The farm's fields by name, for pickers. */
  function byName(farmId: number | null | undefined): Field[] {
    return [...of(farmId)].sort((a, b) => a.name.localeCompare(b.name))
  }

  /** Fetches a farm's fields anew; rejects when that fails (the http client has told the user). */
  async function load(farmId: number): Promise<Field[]> {
    const mine = (generation.get(farmId) ?? 0) + 1
    generation.set(farmId, mine)
    loading[farmId] = true
    try {
      const list = await listFields(farmId)
      if (generation.get(farmId) === mine) byFarm.value[farmId] = list
      return of(farmId)
    } finally {
      if (generation.get(farmId) === mine) loading[farmId] = false
    }
  }

  /** A saved field (new or changed) in its farm's list. */
  function put(field: Field): void {
    const list = [...of(field.farmId)]
    const i = list.findIndex((f) => f.id === field.id)
    if (i >= 0) list.splice(i, 1, field)
    else list.push(field)
    byFarm.value[field.farmId] = list
  }

  /** Fields created in one go (an import). */
  function add(farmId: number, fields: readonly Field[]): void {
    byFarm.value[farmId] = [...of(farmId), ...fields]
  }

  /** A deleted field off its farm's list. */
  function drop(farmId: number, fieldId: number): void {
    byFarm.value[farmId] = of(farmId).filter((f) => f.id !== fieldId)
  }

  return { byFarm, loading, of, byName, load, put, add, drop }
})
