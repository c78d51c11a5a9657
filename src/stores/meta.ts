import { ref } from 'vue'
import { defineStore } from 'pinia'
import { fetchMeta, type Meta } from '@/api/meta'

/** Facts about this installation (fake mailbox in use, version, demo data). */
export const useMetaStore = defineStore('meta', () => {
  const meta = ref<Meta | null>(null)
  let pending: Promise<void> | null = null

  function ensureLoaded(): Promise<void> {
    if (meta.value) return Promise.resolve()
    pending ??= fetchMeta()
      .then((value) => {
        meta.value = value
      })
      .catch(() => {
        // The page still works without it; the Mailbox link stays hidden.
        meta.value = { fakeMailbox: false, version: '', demo: false }
      })
      .finally(() => {
        pending = null
      })
    return pending
  }

  return { meta, ensureLoaded }
})
