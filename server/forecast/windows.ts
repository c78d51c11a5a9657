// The forecast windows of all farms at once: each farm's week runs over its own local
// days (shared/schemas/forecast.ts forecastWindow), so "the current week" of the whole
// store is the span from the earliest farm's midnight to the latest farm's week end.
import { forecastWindow, windowSpan } from '../../shared/schemas/forecast.ts'
import type { Repositories } from '../db/repositories/index.ts'

/** The span every farm's current window covers at `nowMs` (the UTC window when there are no farms). */
export async function allFarmsWindowSpan(repos: Pick<Repositories, 'forecasts'>, nowMs: number): Promise<{ startMs: number; endMs: number }> {
  return windowSpan(nowMs, (await repos.forecasts.farmZones()).values()) ?? forecastWindow(nowMs, 'UTC')
}
