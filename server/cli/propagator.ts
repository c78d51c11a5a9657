/**
 * Chooses how the CLI propagates SGP4 satellites: satellite.js's JavaScript SGP4
 * loop or its bulk WASM propagator. The benchmark (`npm run bench`) measures both on
 * the same element sets; 'auto' uses the one that measured faster there.
 */
import { createSingleThreadRuntime } from 'satellite.js'
import type { PropagationOptions, Satellite } from '../../shared/precision/index'

/** Which SGP4 propagator 'auto' picks (from the benchmark figures). */
export const MEASURED_FASTER: 'js' | 'bulk' = 'js'

export async function createSgp4Options(satellites: readonly Satellite[], choice: string): Promise<PropagationOptions> {
  if (choice !== 'auto' && choice !== 'js' && choice !== 'bulk') throw new Error(`--propagator ${choice}: use auto, js or bulk`)
  const pick = choice === 'auto' ? MEASURED_FASTER : choice
  if (pick === 'js' || !satellites.some((s) => s.orbit.kind === 'sgp4')) return {}
  return { bulkRuntime: await createSingleThreadRuntime() }
}
