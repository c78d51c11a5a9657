// At risk: a planned or confirmed pass whose hours no longer meet its work type (an hour
// Closed, or Tight where the work type needs Clear; shared/planning/risk.ts) is flagged
// with the reason and the best window for the same work, duration and machine.
// Checked when a pass is booked or changed, and for every pass of a field when the
// field's forecast is replaced ('forecast.stored').
import {
  HOUR_MS,
  MINUTE_MS,
  ceilHour,
  coveredHours,
  findWindows,
  floorHour,
  isNightHour,
  passRisk,
  requiresClear,
} from '../../shared/planning/index.ts'
import type { SessionUser } from '../../shared/schemas/auth.ts'
import { activePassStatuses, type AtRiskQuery, type Pass } from '../../shared/schemas/passes.ts'
import { assertFarmVisible, visibleFarmIds } from '../auth/access.ts'
import type { Repositories } from '../db/repositories/index.ts'
import type { PassDetailRow } from '../db/repositories/passes.ts'
import { on } from '../events.ts'
import type { ServiceContext } from './context.ts'
import { toPass } from './passView.ts'
import { planningHours } from './windows.ts'

/** How far ahead a suggested window may start (the stored forecast covers about a week). */
export const SUGGESTION_SPAN_MS = 8 * 24 * HOUR_MS

export interface RiskColumns {
  atRisk: boolean
  atRiskReason: string | null
  suggestedStartAt: Date | null
}

const noRisk: RiskColumns = { atRisk: false, atRiskReason: null, suggestedStartAt: null }

type Assessable = Pick<
  PassDetailRow,
  'id' | 'fieldId' | 'workTypeId' | 'machineId' | 'startAt' | 'durationMin' | 'status' | 'timeZone' | 'workTypeName' | 'requireN1'
>

/**
 * The at-risk columns of a pass from the stored forecast. Passes that are done, cancelled
 * or already over are never at risk. The suggestion keeps to daylight unless the pass
 * itself runs at night, leaves out the machine's other bookings and, for work that needs
 * Clear hours, accepts Clear hours only.
 */
export async function assessPass(repos: Repositories, pass: Assessable, nowMs: number): Promise<RiskColumns> {
  const startMs = pass.startAt.getTime()
  const endMs = startMs + pass.durationMin * MINUTE_MS
  if (!activePassStatuses.includes(pass.status) || endMs <= nowMs) return noRisk
  const strict = requiresClear({ requireN1: pass.requireN1 })
  const searchFrom = ceilHour(nowMs)
  const searchTo = searchFrom + SUGGESTION_SPAN_MS
  const hours = await planningHours(
    repos,
    pass.fieldId,
    pass.workTypeId,
    Math.min(floorHour(startMs), searchFrom),
    Math.max(endMs, searchTo),
  )
  const risk = passRisk({
    startMs,
    durationMin: pass.durationMin,
    hours,
    requiresClear: strict,
    workTypeName: pass.workTypeName,
    timeZone: pass.timeZone,
  })
  if (!risk.atRisk) return noRisk

  const field = await repos.fields.findById(pass.fieldId)
  let suggestedStartAt: Date | null = null
  if (field) {
    const centroid = { latDeg: field.centroidLat, lonDeg: field.centroidLon }
    const runsAtNight = coveredHours(startMs, pass.durationMin).some((h) => isNightHour(h, centroid))
    const busy = pass.machineId
      ? await repos.passes.machineBusy(pass.machineId, new Date(searchFrom), new Date(searchTo), pass.id)
      : []
    const [best] = findWindows({
      hours,
      durationMin: pass.durationMin,
      fromMs: searchFrom,
      toMs: searchTo,
      timeZone: pass.timeZone,
      excludeNightAt: runsAtNight ? null : centroid,
      busy,
      requireClear: strict,
      limit: 1,
    })
    if (best) suggestedStartAt = new Date(best.startMs)
  }
  return { atRisk: true, atRiskReason: risk.reason, suggestedStartAt }
}

const sameRisk = (a: RiskColumns, b: RiskColumns) =>
  a.atRisk === b.atRisk &&
  a.atRiskReason === b.atRiskReason &&
  (a.suggestedStartAt?.getTime() ?? null) === (b.suggestedStartAt?.getTime() ?? null)

export function createAtRiskService(ctx: ServiceContext) {
  const { store, logger } = ctx

  /**
   * Re-checks every planned or confirmed pass of a field that has not ended yet; writes the
   * at-risk columns that changed, in one transaction. Returns how many passes changed.
   */
  async function recheckField(fieldId: number, nowMs = Date.now()): Promise<number> {
    return store.transaction(async (repos) => {
      const list = await repos.passes.list({ fieldId, statuses: activePassStatuses, from: new Date(nowMs) })
      let changed = 0
      for (const pass of list) {
        const next = await assessPass(repos, pass, nowMs)
        if (sameRisk(next, pass)) continue
        await repos.passes.setRisk(pass.id, next)
        changed++
      }
      return changed
    })
  }

  return {
    recheckField,

    /** Listens for replaced forecasts; returns a function that stops listening. */
    listen(): () => void {
      return on('forecast.stored', async ({ fieldId }) => {
        const changed = await recheckField(fieldId)
        if (changed) logger.info(`at-risk check of field ${fieldId}: ${changed} pass(es) changed`)
      })
    },

    /** Planned or confirmed passes at risk that have not ended, earliest first. */
    async list(user: SessionUser, query: AtRiskQuery, nowMs = Date.now()): Promise<Pass[]> {
      if (query.farmId !== undefined) assertFarmVisible(user, query.farmId)
      const rows = await store.repos.passes.list({
        onlyFarmIds: visibleFarmIds(user),
        farmId: query.farmId,
        statuses: activePassStatuses,
        atRisk: true,
        from: new Date(nowMs),
      })
      return rows.map(toPass)
    },
  }
}
export type AtRiskService = ReturnType<typeof createAtRiskService>
