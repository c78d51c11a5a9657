/**
 * After an hour is aggregated: the rules that do not come from the geometry.
 * - A work type whose field lies out of its base's radio range, past its service level's
 *   maximum baseline or without any correction source is Closed, with that reason
 *   (errorModel.ts, DESIGN.md "Beyond geometry").
 * - In an hour touched by a Kp block of G3 or worse (spaceWeather.ts, NOAA Space Weather
 *   Scales) a work type set to 'tight' is at most Tight and one set to 'closed' is Closed,
 *   with the reason 'storm'.
 * The geometric shares stay as computed; only the state and its reason change.
 */
import type { HourReason } from './errorModel'
import type { HourAggregate, WorkType } from './types'
import { hourSpaceWeather, stormState, STORM_G, type KpBlock } from './spaceWeather'

export type { HourReason }

/**
 * Applies link closures and storm flags to one aggregated hour (returns it, changed in place).
 *
 * @example
 * applyHourCorrections(hour, [{ ...planting, closedReason: 'out-of-range' }], [])
 * // hour.workTypes[0] -> { ..., state: 'closed', reason: 'out-of-range' }
 */
export function applyHourCorrections(
  hour: HourAggregate,
  workTypes: readonly WorkType[] | undefined,
  kpBlocks: readonly KpBlock[] | undefined,
): HourAggregate {
  const weather = kpBlocks ? hourSpaceWeather(kpBlocks, hour.startMs) : undefined
  if (kpBlocks) hour.spaceWeather = weather ?? null
  const storm = weather !== undefined && weather !== null && weather.g >= STORM_G
  if (!workTypes) return hour
  const byId = new Map(workTypes.map((w) => [w.id, w]))
  for (const entry of hour.workTypes) {
    const w = byId.get(entry.id)
    if (!w) continue
    if (w.closedReason) {
      entry.state = 'closed'
      entry.reason = w.closedReason
      continue
    }
    if (storm && w.stormAction && w.stormAction !== 'none') {
      const next = stormState(entry.state, w.stormAction)
      if (next !== entry.state || entry.state !== 'closed') entry.reason = 'storm'
      entry.state = next
    }
  }
  return hour
}
