/// <reference lib="webworker" />
/**
 * The sky-check worker: loads the orbit data once (kept until its version changes),
 * builds the satellites, and answers sky-view requests for a point, an instant, the
 * obstructions as drawn and the antenna height. Only the newest request waiting is
 * computed, so dragging a height slider never builds a queue.
 */
import { skyView, type Outage, type Satellite } from '@shared/precision'
import type { OrbitData } from '@shared/schemas/orbits'
import { config } from '@/config'
import { nominalFallback, satellitesFromOrbitData, type BuiltSatellites } from './orbitSatellites'
import type { FromWorker, SkyRequest, ToWorker } from './skyProtocol'

declare const self: DedicatedWorkerGlobalScope

let built: BuiltSatellites | null = null
let outages: Outage[] = []
let loading: Promise<void> | null = null
const parseCache = new Map<string, Satellite[]>()
let pending: { id: number; request: SkyRequest } | null = null
let busy = false

async function load(force: boolean): Promise<void> {
  if (built && !force) return
  loading ??= (async () => {
    try {
      const response = await fetch(`${config.apiBase}/orbit-data`, { credentials: 'same-origin', headers: { Accept: 'application/json' } })
      if (!response.ok) throw new Error(`the server answered ${response.status}`)
      const data = (await response.json()) as OrbitData
      if (built && built.info.version !== null && built.info.version === data.version) return
      built = satellitesFromOrbitData(data, parseCache)
      outages = data.outages ?? []
    } catch (error) {
      if (!built || built.info.fallback) {
        built = nominalFallback(`The orbit data could not be loaded (${(error as Error).message}); the nominal constellations are shown.`)
        outages = []
      }
    } finally {
      loading = null
    }
  })()
  await loading
}

async function pump(): Promise<void> {
  if (busy) return
  busy = true
  try {
    while (pending) {
      const { id, request } = pending
      pending = null
      try {
        await load(false)
        const started = performance.now()
        const view = skyView({
          point: request.point,
          atMs: request.atMs,
          satellites: built!.satellites,
          systems: built!.info.enabledSystems.length ? built!.info.enabledSystems : undefined,
          outages,
          obstructions: request.obstructions,
          antennaHeightM: request.antennaHeightM,
          maskDeg: request.maskDeg,
          terrain: request.terrainHorizonDeg ? { grid: null, pointHorizonsDeg: request.terrainHorizonDeg } : null,
        })
        const message: FromWorker = { type: 'sky', id, view, computeMs: performance.now() - started, orbit: built!.info }
        self.postMessage(message)
      } catch (error) {
        const message: FromWorker = { type: 'error', id, message: (error as Error).message }
        self.postMessage(message)
      }
    }
  } finally {
    busy = false
  }
}

self.onmessage = (event: MessageEvent<ToWorker>) => {
  const data = event.data
  if (data.type === 'refresh') {
    void load(true)
    return
  }
  pending = { id: data.id, request: data.request }
  void pump()
}
