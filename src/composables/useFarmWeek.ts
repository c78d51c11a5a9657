import { computed, onBeforeUnmount, ref, watch, type Ref } from 'vue'
import { farmToday, localDays } from '@/lib/farmTime'
import { chosenDate, daysSpan } from '@/lib/outlookDays'

/**
 * The coming seven days in a farm's time zone, from the farm's today: their hours, their
 * span in UTC, the day the page asks for, and a clock (minute steps) so the past fades
 * while the page stays open.
 */
export function useFarmWeek(zone: Ref<string>, wantedDate: Ref<string>) {
  const today = ref('')
  const nowMs = ref(Date.now())
  watch(zone, (z) => (today.value = farmToday(z)), { immediate: true })
  const clock = setInterval(() => (nowMs.value = Date.now()), 60_000)
  onBeforeUnmount(() => clearInterval(clock))

  const days = computed(() => (today.value ? localDays(today.value, zone.value, 7) : []))
  const span = computed(() => daysSpan(days.value))
  const dayDate = computed(() => chosenDate(days.value, wantedDate.value))
  const day = computed(() => days.value.find((d) => d.date === dayDate.value) ?? null)

  return { today, nowMs, days, span, dayDate, day }
}
