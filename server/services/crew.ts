// The cab view: the signed-in user's week on the machines they run (machines.operator_user_id),
// with what the page needs offline: each pass with its field's shape and the stored hour
// states of its work type over the week, each hour flagged when it is a night hour at the
// field's centroid (the cab's window reading keeps to daylight; shared/planning/crew.ts).
// Done and cancelled passes of the last half day stay in the list so the crew sees what
// they finished.
import { HOUR_MS, floorHour, nightFlagged } from '../../shared/planning/index.ts'
import type { SessionUser } from '../../shared/schemas/auth.ts'
import type { CrewPass, CrewWeek } from '../../shared/schemas/crew.ts'
import type { Boundary } from '../../shared/schemas/geo.ts'
import type { ServiceContext } from './context.ts'
import { toPass } from './passView.ts'
import { hourStates } from './windows.ts'

/** How far back the week starts (a pass started this morning is still shown tonight). */
export const CREW_LOOKBACK_MS = 12 * HOUR_MS
/** How far ahead it reaches: the stored forecast's week. */
export const CREW_SPAN_MS = 7 * 24 * HOUR_MS

export function createCrewService(ctx: ServiceContext) {
  const { store } = ctx

  return {
    async week(user: SessionUser, nowMs = Date.now()): Promise<CrewWeek> {
      const from = floorHour(nowMs - CREW_LOOKBACK_MS)
      const to = floorHour(nowMs) + CREW_SPAN_MS
      const repos = store.repos
      const machines = await repos.machines.listByOperator(user.id)
      const rows = machines.length
        ? await repos.passes.list({
            operatorUserId: user.id,
            from: new Date(from),
            to: new Date(to),
            statuses: ['planned', 'confirmed', 'started', 'done'],
          })
        : []
      const fieldIds = [...new Set(rows.map((r) => r.fieldId))]
      const hourRows = fieldIds.length ? await repos.forecasts.hours(fieldIds, new Date(from), new Date(to)) : []
      const passes: CrewPass[] = []
      for (const row of rows) {
        const field = await repos.fields.findById(row.fieldId)
        if (!field) continue
        const ofField = hourRows.filter((h) => h.fieldId === row.fieldId)
        const centroid = { latDeg: field.centroidLat, lonDeg: field.centroidLon }
        passes.push({
          ...toPass(row),
          boundary: JSON.parse(field.boundary) as Boundary,
          centroid,
          hours: nightFlagged(hourStates(ofField, row.workTypeId), centroid),
        })
      }
      return {
        generatedAt: new Date(nowMs).toISOString(),
        from: new Date(from).toISOString(),
        to: new Date(to).toISOString(),
        user: { id: user.id, name: user.name },
        machines: machines.map((m) => ({ id: m.id, name: m.name, crew: m.crew })),
        passes,
      }
    },
  }
}
export type CrewService = ReturnType<typeof createCrewService>
