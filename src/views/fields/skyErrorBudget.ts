// The error budget of the sky check: the point's geometry (DOP x sigma of the chosen service
// level), the baseline part from the field's RTK link and the space-weather flag of the
// hour, by the error model of shared/precision/errorModel.ts (the same figures as the
// Outlook's hour detail, there at the field's worst point). The flag carries the feed's
// state: a stale or missing Kp feed leaves storms unknown, never quiet.
import { errorBudget, hourSpaceWeather, linkEffect } from '@shared/precision'
import type { FieldCorrection, HourErrorBudget, SpaceWeatherStatus } from '@shared/schemas/corrections'
import type { ServiceLevel, WorkType } from '@shared/schemas/planning'

const HOUR_MS = 3_600_000

export function skyErrorBudget(
  dop: { hdop: number; vdop: number } | null,
  level: ServiceLevel,
  /** undefined: the link is not known (a field not saved yet): no baseline part, nothing Closed for it */
  link: FieldCorrection['link'] | undefined,
  /** the Kp feed (its state and blocks); null: not loaded or not readable, so storms are unknown */
  spaceWeather: Pick<SpaceWeatherStatus, 'state' | 'lastOkAt' | 'blocks'> | null,
  atMs: number,
  workTypes: readonly WorkType[],
): HourErrorBudget {
  const effect = link === undefined ? { baselineHM: 0, baselineVM: 0, closedReason: null } : linkEffect(level, link)
  const parts = errorBudget({ hdop: dop?.hdop ?? null, vdop: dop?.vdop ?? null }, level.sigmaUereM, effect)
  const hourStartMs = Math.floor(atMs / HOUR_MS) * HOUR_MS
  const blocks = (spaceWeather?.blocks ?? []).map((b) => ({ startMs: Date.parse(b.start), endMs: Date.parse(b.end), kp: b.kp }))
  const closedReasons: HourErrorBudget['closedReasons'] = {}
  if (effect.closedReason) {
    for (const w of workTypes) if (w.active && w.serviceLevelId === level.id) closedReasons[String(w.id)] = effect.closedReason
  }
  return {
    sigmaUereM: level.sigmaUereM,
    hdop: dop?.hdop ?? null,
    vdop: dop?.vdop ?? null,
    ...parts,
    link:
      level.needsBase && link
        ? { kind: link.kind, name: link.name, baselineKm: link.baselineKm, farthestKm: link.farthestKm, reachable: link.reachable, baselineKnown: link.baselineKnown }
        : null,
    spaceWeather: spaceWeather ? hourSpaceWeather(blocks, hourStartMs) : null,
    spaceWeatherFeed: { state: spaceWeather?.state ?? 'none', lastOkAt: spaceWeather?.lastOkAt ?? null },
    closedReasons,
  }
}
