import type { Pass, PassInput, PassPatch, PassStatus } from '@shared/schemas/passes'
import { itemsOf } from './fields'
import { buildUrl, http } from './http'

export interface PassFilter {
  farmId?: number
  fieldId?: number
  machineId?: number
  from?: string
  to?: string
  status?: PassStatus[]
}

function query(filter: PassFilter) {
  return {
    farmId: filter.farmId,
    fieldId: filter.fieldId,
    machineId: filter.machineId,
    from: filter.from,
    to: filter.to,
    status: filter.status && filter.status.length > 0 ? filter.status.join(',') : undefined,
  }
}

export const listPasses = (filter: PassFilter = {}) =>
  http.get<Pass[] | { items: Pass[] }>('/passes', query(filter)).then(itemsOf)

/** 409 (the machine is booked) and field errors are shown by the form itself. */
export const createPass = (input: Partial<PassInput> & Pick<PassInput, 'fieldId' | 'workTypeId' | 'start'>) =>
  http.post<Pass>('/passes', input, { quiet: [409] })

export const updatePass = (id: number, patch: PassPatch) => http.patch<Pass>(`/passes/${id}`, patch, { quiet: [409] })

export const cancelPass = (id: number) => http.post<Pass>(`/passes/${id}/cancel`)

export const markPassDone = (id: number) => http.post<Pass>(`/passes/${id}/done`)

export const listAtRisk = (farmId?: number) =>
  http.get<Pass[] | { items: Pass[] }>('/passes/at-risk', { farmId }).then(itemsOf)

/** Address of the CSV export of one farm's passes in [from, to). */
export const passesCsvUrl = (farmId: number, from: string, to: string) => buildUrl('/passes.csv', { farmId, from, to })
