/**
 * The live sky check: a Web Worker runs the engine's sky view for a point; the page
 * hands in the point, the time, the obstructions as drawn (unsaved edits included) and
 * the antenna height, and gets the view back. Only the newest answer is kept.
 */
import { onBeforeUnmount, ref, shallowRef } from 'vue'
import type { SkyView } from '@shared/precision'
import type { FromWorker, OrbitInfo, SkyRequest, ToWorker } from '@/workers/skyProtocol'

export function useSkyCheck() {
  const view = shallowRef<SkyView | null>(null)
  const orbit = shallowRef<OrbitInfo | null>(null)
  const error = ref<string | null>(null)
  const computing = ref(false)
  /** Time from asking to answer of the last request (ms), worker time included. */
  const roundTripMs = ref<number | null>(null)
  const computeMs = ref<number | null>(null)
  /** Bumped on every answer (tests and the page wait on it). */
  const answers = ref(0)

  let worker: Worker | null = null
  let lastId = 0
  let lastAnswered = 0
  const sentAt = new Map<number, number>()

  function ensureWorker(): Worker {
    if (worker) return worker
    worker = new Worker(new URL('../workers/sky.worker.ts', import.meta.url), { type: 'module', name: 'sky-check' })
    worker.onmessage = (event: MessageEvent<FromWorker>) => {
      const data = event.data
      const started = sentAt.get(data.id)
      // The worker skips requests overtaken by newer ones: forget those too.
      for (const id of [...sentAt.keys()]) if (id <= data.id) sentAt.delete(id)
      if (data.id < lastAnswered) return
      lastAnswered = data.id
      if (data.type === 'sky') {
        view.value = data.view
        orbit.value = data.orbit
        computeMs.value = data.computeMs
        error.value = null
      } else {
        error.value = data.message
      }
      if (started !== undefined) roundTripMs.value = performance.now() - started
      computing.value = sentAt.size > 0
      answers.value++
    }
    worker.onerror = (event) => {
      error.value = `The sky check stopped: ${event.message || 'the worker failed to start'}`
      computing.value = false
    }
    return worker
  }

  function request(input: SkyRequest): void {
    const id = ++lastId
    sentAt.set(id, performance.now())
    computing.value = true
    // Plain data only: reactive proxies cannot be cloned into a worker.
    const message: ToWorker = { type: 'sky', id, request: JSON.parse(JSON.stringify(input)) as SkyRequest }
    ensureWorker().postMessage(message)
  }

  /** Asks the worker to reload the orbit data (after an upload or an outage change). */
  function refreshOrbits(): void {
    ensureWorker().postMessage({ type: 'refresh' } satisfies ToWorker)
  }

  function clear(): void {
    view.value = null
    error.value = null
  }

  function stop(): void {
    worker?.terminate()
    worker = null
    sentAt.clear()
  }

  onBeforeUnmount(stop)

  return { view, orbit, error, computing, roundTripMs, computeMs, answers, request, refreshOrbits, clear, stop }
}
