// The inputs of a field's forecast, as plain data for the engine (and the worker thread),
// and their version: a SHA-256 over everything that can change the stored hours. Pure:
// rows in, data out; no database, no clock.
import { createHash } from 'node:crypto'
import type { FeatureCollection } from 'geojson'
import type { FieldForecastInput, Outage, Satellite, TerrainGrid, WorkType } from '../../shared/precision/index.ts'
import { TERRAIN_SETTINGS } from '../../shared/schemas/terrain.ts'

/** What the inputs version covers of a field (the row plus its service level's sigma). */
export interface FieldInputs {
  id: number
  revision: number
  /** GeoJSON text as stored */
  boundary: string
  antennaHeightM: number
  sigmaUereM: number
}

export interface ObstructionInputs {
  id: number
  kind: string
  heightM: number
  /** GeoJSON text as stored */
  geometry: string
  leaflessFrom: string | null
  leaflessTo: string | null
}

/** A work type's thresholds (the engine's WorkType) with its database id and the sigma of its own service level. */
export type WorkTypeInputs = Omit<WorkType, 'id' | 'sigmaUereM'> & { id: number; sigmaUereM: number }

export interface EngineSettings {
  stepMin: number
  sampleCount: number
  maskDeg: number
}

export interface VersionInputs {
  field: FieldInputs
  obstructions: ObstructionInputs[]
  /** the orbit data version (active sets, enabled constellations) */
  orbitVersion: string
  /** outages overlapping the window */
  outages: Outage[]
  workTypes: WorkTypeInputs[]
  windowStartMs: number
  windowHours: number
  settings: EngineSettings
  /** the elevation model covering the field (server/terrain/store.ts terrainVersionOf); absent or null without one */
  terrain?: string | null
  /** the correction part (correctionInputs.ts): link, baselines, Kp blocks, storm settings */
  correction?: string
}

/** Outages that overlap [startMs, endMs). */
export function outagesInWindow(outages: readonly Outage[], startMs: number, endMs: number): Outage[] {
  return outages.filter((o) => o.fromMs < endMs && o.toMs > startMs)
}

/**
 * The inputs version: SHA-256 (hex) of a canonical JSON of every input. Lists are sorted by
 * id (obstructions, work types) or by satellite and time (outages), so the order rows
 * come back from the database never matters.
 *
 * @example
 * inputsVersion({ field, obstructions: [], orbitVersion: 'abc', outages: [], workTypes, windowStartMs, windowHours: 168, settings })
 * // -> '5f1c...' (64 hex digits)
 */
export function inputsVersion(v: VersionInputs): string {
  const canonical = {
    f: [v.field.id, v.field.revision, v.field.boundary, v.field.antennaHeightM, v.field.sigmaUereM],
    o: [...v.obstructions]
      .sort((a, b) => a.id - b.id)
      .map((o) => [o.id, o.kind, o.heightM, o.geometry, o.leaflessFrom, o.leaflessTo]),
    orbits: v.orbitVersion,
    out: outagesInWindow(v.outages, v.windowStartMs, v.windowStartMs + v.windowHours * 3_600_000)
      .map((o) => [o.satId, o.fromMs, o.toMs] as const)
      .sort((a, b) => (a[0] < b[0] ? -1 : a[0] > b[0] ? 1 : a[1] - b[1] || a[2] - b[2])),
    wt: [...v.workTypes]
      .sort((a, b) => a.id - b.id)
      .map((w) => [w.id, w.maxH95M, w.maxV95M, w.minSats, w.maxPdop, w.requiredShare, w.requireN1, w.sigmaUereM]),
    win: [v.windowStartMs, v.windowHours],
    s: [v.settings.stepMin, v.settings.sampleCount, v.settings.maskDeg],
    // Only with an elevation model, so that the versions of fields without one stay as they were.
    ...(v.terrain ? { t: v.terrain } : {}),
    ...(v.correction === undefined ? {} : { c: v.correction }),
  }
  return createHash('sha256').update(JSON.stringify(canonical)).digest('hex')
}

/** The farm's obstructions as the engine's FeatureCollection. */
export function obstructionCollection(rows: readonly ObstructionInputs[]): FeatureCollection {
  return {
    type: 'FeatureCollection',
    features: rows.map((o) => ({
      type: 'Feature',
      id: o.id,
      properties: { heightM: o.heightM, kind: o.kind, leaflessFrom: o.leaflessFrom, leaflessTo: o.leaflessTo },
      geometry: JSON.parse(o.geometry),
    })),
  }
}

/** Work types in the engine's shape; the id is the database id as text. */
export function engineWorkTypes(rows: readonly WorkTypeInputs[]): WorkType[] {
  return rows.map((w) => ({
    id: String(w.id),
    maxH95M: w.maxH95M,
    maxV95M: w.maxV95M,
    minSats: w.minSats,
    maxPdop: w.maxPdop,
    requiredShare: w.requiredShare,
    requireN1: w.requireN1,
    sigmaUereM: w.sigmaUereM,
  }))
}

/** Everything the worker thread needs for one field (structured-clone friendly). */
export type EngineTask = Omit<FieldForecastInput, 'detailHourMs' | 'includeSamples' | 'propagation'> & {
  satellites: Satellite[]
  /** split the hours into chunks of this many, reporting progress after each */
  chunkHours: number
}

export function engineTask(input: {
  field: FieldInputs
  obstructions: readonly ObstructionInputs[]
  satellites: Satellite[]
  outages: Outage[]
  workTypes: readonly WorkTypeInputs[]
  windowStartMs: number
  windowHours: number
  settings: EngineSettings
  terrain?: TerrainGrid | null
}): EngineTask {
  return {
    field: JSON.parse(input.field.boundary),
    obstructions: obstructionCollection(input.obstructions),
    antennaHeightM: input.field.antennaHeightM,
    satellites: input.satellites,
    outages: outagesInWindow(input.outages, input.windowStartMs, input.windowStartMs + input.windowHours * 3_600_000),
    startMs: input.windowStartMs,
    hours: input.windowHours,
    stepMin: input.settings.stepMin,
    maskDeg: input.settings.maskDeg,
    sampleCount: input.settings.sampleCount,
    sigmaUereM: input.field.sigmaUereM,
    workTypes: engineWorkTypes(input.workTypes),
    chunkHours: 24,
    terrain: input.terrain ? { grid: input.terrain, options: TERRAIN_SETTINGS } : null,
  }
}
