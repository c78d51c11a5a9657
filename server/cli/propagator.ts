/**
 * Chooses how the CLI propagates SGP4 satellites: satellite.js's JavaScript SGP4
 * loop or its bulk WASM propagator.
 *
 * Measured with `npm run bench` (102 satellites x 2016 epochs, best of 5): the bulk
 * propagator took 281 ms against 793 ms for the JavaScript loop, but creating its
 * WASM runtime costs about 200 ms once. 'auto' therefore uses the bulk propagator only
 * when there are enough SGP4 propagations to repay that start-up (a week of a full
 * constellation), and the JavaScript loop for short runs.
 */
import { createSingleThreadRuntime } from 'satellite.js'
import type { PropagationOptions, Satellite } from '../../shared/precision/index'

/** SGP4 propagations (satellites x epochs) from which the bulk propagator pays off. */
export const BULK_FROM_PROPAGATIONS = 100_000

export async function createSgp4Options(satellites: readonly Satellite[], choice: string, epochs: number): Promise<PropagationOptions> {
  if (choice !== 'auto' && choice !== 'js' && choice !== 'bulk') throw new Error(`--propagator ${choice}: use auto, js or bulk`)
  const sgp4Count = satellites.filter((s) => s.orbit.kind === 'sgp4').length
  if (sgp4Count === 0) return {}
  const useBulk = choice === 'bulk' || (choice === 'auto' && sgp4Count * epochs >= BULK_FROM_PROPAGATIONS)
  return useBulk ? { bulkRuntime: await createSingleThreadRuntime() } : {}
}
