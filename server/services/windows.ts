// Find a window: the best contiguous stretches of the coming week for a pass on a field,
// from the field's stored forecast hours (shared/planning/windows.ts ranks them). Also the
// helpers other planning services share: a field's hour states for one work type and the
// duration estimate.
import {
  HOUR_MS,
  MINUTE_MS,
  ceilHour,
  comingWeek,
  estimateDurationMin,
  findWindows,
  type PlanningHour,
  type PlanningHourState,
} from '../../shared/planning/index.ts'
import type { SessionUser } from '../../shared/schemas/auth.ts'
import type { WindowQuery, WindowSearchResult } from '../../shared/schemas/passes.ts'
import { assertFarmVisible } from '../auth/access.ts'
import type { Repositories } from '../db/repositories/index.ts'
import type { FieldRow, ForecastHourRow, MachineRow, WorkTypeRow } from '../db/schema-planning.ts'
import { badRequest, notFound } from '../http/errors.ts'
import type { ServiceContext } from './context.ts'

/** Longest span a window search may cover (the stored forecast is about a week). */
const MAX_SEARCH_MS = 16 * 24 * HOUR_MS

const states = new Set<PlanningHourState>(['clear', 'tight', 'closed'])

/** The state of each stored hour of a field for one work type, in [from, to). */
export async function planningHours(
  repos: Repositories,
  fieldId: number,
  workTypeId: number,
  fromMs: number,
  toMs: number,
): Promise<PlanningHour[]> {
  const rows = await repos.forecasts.hours([fieldId], new Date(fromMs), new Date(toMs))
  return hourStates(rows, workTypeId)
}

/** The state of each stored row for one work type (rows of any fields: filter first). */
export function hourStates(rows: ReadonlyArray<Pick<ForecastHourRow, 'hourStart' | 'workJson'>>, workTypeId: number): PlanningHour[] {
  const key = String(workTypeId)
  const out: PlanningHour[] = []
  for (const row of rows) {
    let work: Record<string, { state?: string } | undefined>
    try {
      work = JSON.parse(row.workJson) as typeof work
    } catch {
      continue
    }
    const state = work[key]?.state as PlanningHourState | undefined
    // An hour computed before the work type existed says nothing about it: unknown.
    if (state && states.has(state)) out.push({ startMs: row.hourStart.getTime(), state })
  }
  return out
}

/** The estimated duration of a pass on a field (area / rate, machine's rate first). */
export function estimatedDuration(field: Pick<FieldRow, 'areaHa'>, workType: Pick<WorkTypeRow, 'rateHaPerH'>, machine: Pick<MachineRow, 'rateHaPerH'> | null): number {
  return estimateDurationMin(field.areaHa, workType.rateHaPerH, machine?.rateHaPerH ?? null)
}

export function createWindowsService(ctx: ServiceContext) {
  const { store } = ctx

  return {
    async find(user: SessionUser, fieldId: number, query: WindowQuery, nowMs = Date.now()): Promise<WindowSearchResult> {
      const repos = store.repos
      const field = await repos.fields.findById(fieldId)
      if (!field) throw notFound('The field')
      assertFarmVisible(user, field.farmId)
      const farm = await repos.farms.findById(field.farmId)
      if (!farm) throw notFound('The field')
      const workType = await repos.workTypes.findById(query.workTypeId)
      if (!workType) throw badRequest(`No work type with id ${query.workTypeId}.`, { workTypeId: 'No such work type.' })
      let machine: MachineRow | null = null
      if (query.machineId !== undefined) {
        machine = await repos.machines.findById(query.machineId)
        if (!machine) throw badRequest(`No machine with id ${query.machineId}.`, { machineId: 'No such machine.' })
      }

      const week = comingWeek(nowMs, farm.timeZone)
      const fromMs = query.from ? ceilHour(Date.parse(query.from)) : week.startMs
      const toMs = query.to ? Date.parse(query.to) : week.endMs
      if (!(toMs > fromMs)) throw badRequest('The search span is empty: to must be after from.', { to: 'Must be after from.' })
      if (toMs - fromMs > MAX_SEARCH_MS) {
        throw badRequest('Search at most 16 days at a time.', { to: 'Search at most 16 days at a time.' })
      }

      const durationEstimated = query.durationMin === undefined
      const durationMin = query.durationMin ?? estimatedDuration(field, workType, machine)
      const hours = await planningHours(repos, field.id, workType.id, fromMs, toMs)
      const busy = machine ? await repos.passes.machineBusy(machine.id, new Date(fromMs), new Date(toMs)) : []
      const found =
        durationMin * MINUTE_MS > toMs - fromMs
          ? []
          : findWindows({
              hours,
              durationMin,
              fromMs,
              toMs,
              timeZone: farm.timeZone,
              excludeNightAt: query.allowNight ? null : { latDeg: field.centroidLat, lonDeg: field.centroidLon },
              busy,
              limit: query.limit,
            })
      return {
        fieldId: field.id,
        workTypeId: workType.id,
        machineId: machine?.id ?? null,
        durationMin,
        durationEstimated,
        allowNight: query.allowNight,
        timeZone: farm.timeZone,
        from: new Date(fromMs).toISOString(),
        to: new Date(toMs).toISOString(),
        forecastHours: hours.length,
        windows: found.map((w) => ({
          start: new Date(w.startMs).toISOString(),
          end: new Date(w.endMs).toISOString(),
          localStart: w.localStart,
          localEnd: w.localEnd,
          clearHours: w.clearHours,
          tightHours: w.tightHours,
          score: w.score,
        })),
      }
    },
  }
}
export type WindowsService = ReturnType<typeof createWindowsService>
