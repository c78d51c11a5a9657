/**
 * Messages between the page and the sky-check worker (plain, structured-clone data).
 */
import type { FeatureCollection } from 'geojson'
import type { SkyView } from '@shared/precision'
import type { GnssSystem } from '@shared/schemas/orbits'

export interface SkyRequest {
  point: { latDeg: number; lonDeg: number }
  atMs: number
  /** the farm's obstructions as drawn right now (unsaved edits included) */
  obstructions: FeatureCollection
  antennaHeightM: number
  maskDeg: number
  /** the terrain horizon of the point (360 bins, deg) from the farm's elevation model; null without one */
  terrainHorizonDeg?: number[] | null
}

/** Where the satellites of the sky check came from. */
export interface OrbitInfo {
  version: string | number | null
  sources: { system: GnssSystem; label: string; nominal: boolean }[]
  satelliteCount: number
  /** Set when the server's orbit data could not be used and the nominal sets stand in. */
  fallback: string | null
  /** Constellations that count. */
  enabledSystems: GnssSystem[]
}

export type ToWorker = { type: 'sky'; id: number; request: SkyRequest } | { type: 'refresh' }

export type FromWorker =
  | { type: 'sky'; id: number; view: SkyView; computeMs: number; orbit: OrbitInfo }
  | { type: 'error'; id: number; message: string }
