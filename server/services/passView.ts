// A booked pass as the API shows it, from its joined row (field, farm, work type, machine).
// Shared by the pass service and the at-risk checks.
import { MINUTE_MS } from '../../shared/planning/index.ts'
import type { Pass } from '../../shared/schemas/passes.ts'
import type { PassDetailRow } from '../db/repositories/passes.ts'

export function toPass(row: PassDetailRow): Pass {
  const start = row.startAt.getTime()
  return {
    id: row.id,
    farmId: row.farmId,
    farmName: row.farmName,
    timeZone: row.timeZone,
    fieldId: row.fieldId,
    fieldName: row.fieldName,
    fieldAreaHa: row.fieldAreaHa,
    workTypeId: row.workTypeId,
    workTypeName: row.workTypeName,
    requiresClear: row.requireN1,
    machineId: row.machineId,
    machineName: row.machineName,
    crew: row.crew,
    start: row.startAt.toISOString(),
    end: new Date(start + row.durationMin * MINUTE_MS).toISOString(),
    durationMin: row.durationMin,
    status: row.status,
    atRisk: row.atRisk,
    atRiskReason: row.atRiskReason,
    suggestedStart: row.suggestedStartAt?.toISOString() ?? null,
    notes: row.notes,
    createdBy: row.createdBy,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
  }
}
