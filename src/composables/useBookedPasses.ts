import { onBeforeUnmount, ref, watch, type Ref } from 'vue'
import type { Pass } from '@shared/schemas/passes'
import { listPasses } from '@/api/passes'
import { FORECASTS_UPDATED_EVENT } from '@/composables/useForecast'

/**
 * The passes booked on a farm within a span (planned, confirmed and done), loaded again
 * when the farm or span changes and after a recompute (it can flag passes at risk).
 */
export function useBookedPasses(farmId: Ref<number | null>, span: Ref<{ from: string; to: string } | null>) {
  const passes = ref<Pass[]>([])

  async function reload(): Promise<void> {
    const id = farmId.value
    if (!id || !span.value) {
      passes.value = []
      return
    }
    try {
      const list = await listPasses({ farmId: id, from: span.value.from, to: span.value.to, status: ['planned', 'confirmed', 'done'] })
      if (farmId.value === id) passes.value = list
    } catch {
      // The http client has shown the problem; the grid still shows the forecast.
    }
  }

  watch([farmId, span], () => void reload(), { immediate: true })
  const onForecastsUpdated = () => void reload()
  window.addEventListener(FORECASTS_UPDATED_EVENT, onForecastsUpdated)
  onBeforeUnmount(() => window.removeEventListener(FORECASTS_UPDATED_EVENT, onForecastsUpdated))

  return { passes, reload }
}
