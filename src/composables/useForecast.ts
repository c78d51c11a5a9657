import { onBeforeUnmount, ref, watch, type Ref } from 'vue'
import type { FarmForecastResponse, ForecastHour } from '@shared/schemas/forecast'
import { getFarmForecast } from '@/api/forecasts'

export type FieldForecast = FarmForecastResponse['fields'][number]

/** How often a page asks again while a recompute is queued or running. */
const STALE_POLL_MS = 10_000

/** Sent by the header's job bar when the forecast queue has emptied. */
export const FORECASTS_UPDATED_EVENT = 'skyfurrow:forecasts-updated'

/**
 * The stored forecasts of every field of a farm over [from, to), keyed by field id and
 * hour (UTC ISO with milliseconds, as LocalHour.iso). While any field is being
 * recomputed it asks again every few seconds, and once more when the job bar says the
 * queue is empty, so the grid fills in as jobs finish.
 */
export function useFarmForecast(farmId: Ref<number | null>, span: Ref<{ from: string; to: string } | null>) {
  const byField = ref(new Map<number, FieldForecast>())
  const hourIndex = ref(new Map<number, Map<string, ForecastHour>>())
  const loading = ref(false)
  const error = ref<string | null>(null)
  const stale = ref(false)
  let timer: ReturnType<typeof setTimeout> | null = null
  let generation = 0

  function clearTimer() {
    if (timer) clearTimeout(timer)
    timer = null
  }

  async function load(quietly = false) {
    clearTimer()
    const id = farmId.value
    const s = span.value
    if (!id || !s) {
      byField.value = new Map()
      hourIndex.value = new Map()
      return
    }
    const mine = ++generation
    if (!quietly) loading.value = true
    try {
      const result = await getFarmForecast(id, { from: s.from, to: s.to })
      if (mine !== generation) return
      const fields = new Map<number, FieldForecast>()
      const index = new Map<number, Map<string, ForecastHour>>()
      for (const f of result.fields) {
        fields.set(f.fieldId, f)
        index.set(f.fieldId, new Map(f.hours.map((h) => [new Date(h.time).toISOString(), h])))
      }
      byField.value = fields
      hourIndex.value = index
      stale.value = result.fields.some((f) => f.stale)
      error.value = null
      if (stale.value) timer = setTimeout(() => void load(true), STALE_POLL_MS)
    } catch (e) {
      if (mine !== generation) return
      error.value = e instanceof Error ? e.message : 'The forecast could not be loaded.'
    } finally {
      if (mine === generation) loading.value = false
    }
  }

  const onUpdated = () => void load(true)
  window.addEventListener(FORECASTS_UPDATED_EVENT, onUpdated)
  watch([farmId, span], () => void load(), { immediate: true })
  onBeforeUnmount(() => {
    clearTimer()
    window.removeEventListener(FORECASTS_UPDATED_EVENT, onUpdated)
  })

  return { byField, hourIndex, loading, error, stale, reload: () => load() }
}
