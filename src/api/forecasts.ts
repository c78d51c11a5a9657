// Stored field forecasts and the manual recompute.
import type { FarmForecastResponse, FieldForecastResponse } from '@shared/schemas/forecast'
import type { Job } from '@shared/schemas/jobs'
import { http } from './http'

export interface ForecastRange {
  from?: string
  to?: string
}

/** A field's stored hours (default: the stored window). 404 is left to the caller. */
export const getFieldForecast = (fieldId: number, range: ForecastRange = {}) =>
  http.get<FieldForecastResponse>(`/fields/${fieldId}/forecast`, { ...range }, { quiet: [404] })

/** Every field of a farm over a range (default: the current window). */
export const getFarmForecast = (farmId: number, range: ForecastRange = {}) =>
  http.get<FarmForecastResponse>(`/farms/${farmId}/forecast`, { ...range })

/** Queues a recompute of the field now; answers with the queued job. */
export const recomputeField = (fieldId: number) => http.post<Job>(`/fields/${fieldId}/recompute`)
