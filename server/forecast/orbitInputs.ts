// The orbit data a forecast job uses: the active orbit sets or nominal constellations,
// the outages, and their version, from the orbit data service.
import type { Outage, Satellite } from '../../shared/precision/index.ts'
import type { Store } from '../db/repositories/index.ts'
import { loadActiveSatellites } from '../services/orbitData.ts'

export interface OrbitInputs {
  satellites: Satellite[]
  outages: Outage[]
  version: string
  summary: string
}

export async function loadOrbitInputs(store: Store): Promise<OrbitInputs> {
  const active = await loadActiveSatellites(store)
  return { satellites: active.satellites, outages: active.outages, version: active.version, summary: active.summary }
}
