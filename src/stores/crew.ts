import { computed, ref } from 'vue'
import { defineStore } from 'pinia'
import type { CrewPass, CrewWeek } from '@shared/schemas/crew'
import type { Pass, PassStatus } from '@shared/schemas/passes'
import { fetchCrewWeek, sendPassNote, sendPassStatus } from '@/api/crew'
import { ApiError } from '@/api/http'
import { loadOutbox, loadWeek, newKey, saveOutbox, saveWeek, type OutboxItem } from '@/lib/crewOutbox'

/**
 * The cab view's week and its outbox. The week comes from the server when there is
 * signal and from the device otherwise; changes go into the outbox first (so nothing is
 * lost when the signal drops mid-send) and are sent in order whenever the server answers.
 * A change the server refuses (the pass changed meanwhile, 409) stays in the outbox with
 * the server's sentence until the crew sends it anyway or drops it.
 */
export const useCrewStore = defineStore('crew', () => {
  const userId = ref<number | null>(null)
  const week = ref<CrewWeek | null>(null)
  /** when this device last received the week (ms) */
  const savedAtMs = ref<number | null>(null)
  const outbox = ref<OutboxItem[]>([])
  const online = ref(typeof navigator === 'undefined' ? true : navigator.onLine)
  const loading = ref(false)
  const sending = ref(false)
  /** the last refresh reached the server */
  const reachable = ref(true)

  /** The week as the crew sees it: the server's copy with the changes still in the outbox. */
  const passes = computed<Array<CrewPass & { pending: OutboxItem[]; problems: OutboxItem[] }>>(() =>
    (week.value?.passes ?? []).map((p) => {
      const mine = outbox.value.filter((i) => i.passId === p.id)
      const pending = mine.filter((i) => !i.problem)
      const lastStatus = [...pending].reverse().find((i) => i.kind === 'status')
      return { ...p, status: lastStatus?.status ?? p.status, pending, problems: mine.filter((i) => i.problem) }
    }),
  )

  async function persistOutbox() {
    if (userId.value !== null) await saveOutbox(userId.value, outbox.value.map((i) => ({ ...i })))
  }

  function replacePass(updated: Pass) {
    if (!week.value) return
    week.value = {
      ...week.value,
      passes: week.value.passes.map((p) => (p.id === updated.id ? { ...p, ...updated } : p)),
    }
  }

  async function refresh(): Promise<void> {
    if (userId.value === null) return
    loading.value = true
    try {
      const fresh = await fetchCrewWeek()
      week.value = fresh
      savedAtMs.value = Date.now()
      reachable.value = true
      await saveWeek(userId.value, { week: fresh, savedAtMs: savedAtMs.value })
    } catch (error) {
      if (error instanceof ApiError && error.status === 0) reachable.value = false
    } finally {
      loading.value = false
    }
  }

  /** Sends the outbox in order; stops at the first change that cannot reach the server. */
  async function flush(): Promise<void> {
    if (sending.value || userId.value === null) return
    sending.value = true
    let sentAny = false
    try {
      const blocked = new Set<number>()
      for (const item of [...outbox.value]) {
        if (item.problem) {
          blocked.add(item.passId)
          continue
        }
        // A later change to a pass waits behind a refused one (it was made on top of it).
        if (blocked.has(item.passId)) continue
        try {
          const version = item.version ?? undefined
          const updated =
            item.kind === 'status'
              ? await sendPassStatus(item.passId, { status: item.status!, note: item.note, version })
              : await sendPassNote(item.passId, { text: item.note, version })
          sentAny = true
          // Later changes made on top of this one now refer to the server's new version.
          outbox.value = outbox.value
            .filter((i) => i.key !== item.key)
            .map((i) => (i.passId === item.passId && i.version === item.version && i.version !== null ? { ...i, version: updated.version } : i))
          replacePass(updated)
          await persistOutbox()
        } catch (error) {
          if (!(error instanceof ApiError) || error.status === 0 || error.status === 401 || error.status >= 500) {
            reachable.value = !(error instanceof ApiError && error.status === 0)
            return
          }
          outbox.value = outbox.value.map((i) => (i.key === item.key ? { ...i, problem: error.message } : i))
          blocked.add(item.passId)
          await persistOutbox()
        }
      }
    } finally {
      sending.value = false
      if (sentAny || outbox.value.some((i) => i.problem)) void refresh()
    }
  }

  /** Queues a status change or a note made from the pass as the crew sees it now. */
  async function queue(pass: Pick<Pass, 'id' | 'version'>, change: { kind: 'status'; status: PassStatus; note?: string } | { kind: 'note'; note: string }) {
    const item: OutboxItem = {
      key: newKey(Date.now()),
      passId: pass.id,
      kind: change.kind,
      status: change.kind === 'status' ? change.status : undefined,
      note: change.note?.trim() ?? '',
      version: pass.version,
      queuedAtMs: Date.now(),
    }
    outbox.value = [...outbox.value, item]
    await persistOutbox()
    void flush()
  }

  /** For a refused change: send it anyway over the pass as it is now, or drop it. */
  async function settle(key: string, how: 'send-anyway' | 'drop') {
    outbox.value =
      how === 'drop'
        ? outbox.value.filter((i) => i.key !== key)
        : outbox.value.map((i) => (i.key === key ? { ...i, problem: undefined, version: null } : i))
    await persistOutbox()
    void flush()
  }

  function onOnline() {
    online.value = true
    void flush().then(refresh)
  }
  function onOffline() {
    online.value = false
  }

  /** Loads what the device has for this user, then asks the server; call once per page visit. */
  async function start(id: number): Promise<void> {
    if (userId.value !== id) {
      userId.value = id
      week.value = null
      savedAtMs.value = null
      outbox.value = []
      const [saved, items] = await Promise.all([loadWeek(id), loadOutbox(id)])
      if (userId.value !== id) return
      if (saved) {
        week.value = saved.week
        savedAtMs.value = saved.savedAtMs
      }
      outbox.value = items
    }
    window.addEventListener('online', onOnline)
    window.addEventListener('offline', onOffline)
    online.value = navigator.onLine
    await flush()
    await refresh()
  }

  function stop(): void {
    window.removeEventListener('online', onOnline)
    window.removeEventListener('offline', onOffline)
  }

  return { week, savedAtMs, outbox, online, reachable, loading, sending, passes, start, stop, refresh, flush, queue, settle }
})
