import type { WindowSearchResult } from '@shared/schemas/passes'
import { http } from './http'

export interface WindowSearch {
  workTypeId: number
  durationMin?: number
  machineId?: number | null
  allowNight: boolean
  limit?: number
}

/** The best windows of the coming week for a kind of work on a field, ranked. */
export const findWindows = (fieldId: number, search: WindowSearch) =>
  http.get<WindowSearchResult>(`/fields/${fieldId}/windows`, {
    workTypeId: search.workTypeId,
    durationMin: search.durationMin,
    machineId: search.machineId ?? undefined,
    allowNight: search.allowNight ? 1 : 0,
    limit: search.limit,
  })
