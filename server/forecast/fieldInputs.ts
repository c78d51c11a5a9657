// Everything a field's forecast depends on, read from the database: the field with its
// service level's sigma, the farm's obstructions, the active work types and the orbit
// data; with the engine settings of the stored forecasts. Used by the forecast jobs (which
// add the window and the inputs version) and by the hour detail alike, so both compute
// from the same inputs.
import { forecastWindow } from '../../shared/schemas/forecast.ts'
import type { StoredForecastMeta } from '../db/repositories/forecasts.ts'
import type { Repositories, Store } from '../db/repositories/index.ts'
import { inputsVersion, type EngineSettings } from './inputs.ts'
import { loadOrbitInputs } from './orbitInputs.ts'
import { terrainOfField, terrainVersionOf } from '../terrain/store.ts'
import { fieldCorrection, loadCorrectionInputs } from './correctionInputs.ts'

/** Elevation mask of the stored forecasts (deg), the engine's default. */
export const FORECAST_MASK_DEG = 10

export function engineSettings(config: { forecastStepMin: number; forecastSampleCount: number }): EngineSettings {
  return { stepMin: config.forecastStepMin, sampleCount: config.forecastSampleCount, maskDeg: FORECAST_MASK_DEG }
}

type ForecastField = NonNullable<Awaited<ReturnType<Repositories['forecasts']['fieldWithSigma']>>>

/**
 * The inputs besides the field itself (its farm's obstructions, the work types, the orbit
 * data, the elevation model covering it, and the correction part over `window`).
 */
export async function inputsOfField(store: Store, field: ForecastField, window: { startMs: number; endMs: number }) {
  const [obstructions, workTypes, orbits, terrain, corrections] = await Promise.all([
    store.repos.forecasts.obstructionsOfFarm(field.farmId),
    store.repos.forecasts.activeWorkTypes(),
    loadOrbitInputs(store),
    terrainOfField(store.repos, field),
    loadCorrectionInputs(store, window),
  ])
  // The correction part: the field's RTK link, baselines, closures, Kp blocks (correctionInputs.ts).
  const correction = fieldCorrection(field, workTypes, corrections)
  return { field, obstructions, workTypes, orbits, terrain, correction }
}

/** A field's forecast inputs for its farm's window at `nowMs`, with their version; null when the field is gone. */
export async function forecastInputsOf(store: Store, fieldId: number, settings: EngineSettings, nowMs: number) {
  const field = await store.repos.forecasts.fieldWithSigma(fieldId)
  if (!field) return null
  const window = forecastWindow(nowMs, field.farmTimeZone)
  const inputs = await inputsOfField(store, field, window)
  const version = inputsVersion({
    field,
    obstructions: inputs.obstructions,
    orbitVersion: inputs.orbits.version,
    outages: inputs.orbits.outages,
    workTypes: inputs.workTypes,
    windowStartMs: window.startMs,
    windowHours: window.hours,
    settings,
    terrain: terrainVersionOf(inputs.terrain),
    correction: inputs.correction.version,
  })
  return { ...inputs, window, version }
}

/** Whether a field's stored week covers exactly this window: its hour count and first hour. */
export function storedWeekHoldsWindow(
  meta: StoredForecastMeta | undefined,
  window: { startMs: number; hours: number },
): meta is StoredForecastMeta {
  return meta !== undefined && meta.hours === window.hours && meta.firstHour?.getTime() === window.startMs
}

/** Whether a field's stored week is complete, of this window and all of this inputs version. */
export function storedWeekIsCurrent(
  meta: StoredForecastMeta | undefined,
  window: { startMs: number; hours: number },
  version: string,
): boolean {
  return storedWeekHoldsWindow(meta, window) && meta.minVersion === version && meta.maxVersion === version
}
