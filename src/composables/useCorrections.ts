// Fetch state of the correction-quality resources a page shows: the Kp feed's state and a
// field's RTK link (with its warning). Pages read these; only this module fetches them.
import { ref, watch, type Ref } from 'vue'
import type { FieldCorrection, SpaceWeatherStatus } from '@shared/schemas/corrections'
import { getFieldCorrection, getSpaceWeather } from '@/api/corrections'

/** The space-weather feed: its state (current / stale / none) and its Kp blocks. */
export function useSpaceWeather() {
  const status = ref<SpaceWeatherStatus | null>(null)
  const failed = ref(false)
  async function load() {
    try {
      status.value = await getSpaceWeather()
      failed.value = false
    } catch {
      failed.value = true
    }
  }
  void load()
  return { status, failed, reload: load }
}

/** A field's correction link, refetched when the field changes. */
export function useFieldCorrection(fieldId: Ref<number | null>) {
  const correction = ref<FieldCorrection | null>(null)
  const loading = ref(false)
  async function load(id: number | null) {
    correction.value = null
    if (!id) return
    loading.value = true
    try {
      const c = await getFieldCorrection(id)
      if (fieldId.value === id) correction.value = c
    } catch {
      // Shown by the http client.
    } finally {
      loading.value = false
    }
  }
  watch(fieldId, (id) => void load(id), { immediate: true })
  return { correction, loading, reload: () => load(fieldId.value) }
}
