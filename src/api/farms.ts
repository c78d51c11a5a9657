import type { Farm, FarmInput, FarmPatch, Page } from '@shared/schemas'
import { http, type Query } from './http'

export interface ListParams extends Query {
  page?: number
  pageSize?: number
  sort?: string
  order?: 'asc' | 'desc'
  q?: string
}

export const listFarms = (params: ListParams = {}) => http.get<Page<Farm>>('/farms', params)

/** One farm; 403/404 are left to the caller, which shows its own "not found" state. */
export const getFarm = (id: number) => http.get<Farm>(`/farms/${id}`, undefined, { quiet: [403, 404] })

export const createFarm = (input: FarmInput) => http.post<Farm>('/farms', input)

export const updateFarm = (id: number, patch: FarmPatch) => http.patch<Farm>(`/farms/${id}`, patch)

export const deleteFarm = (id: number) => http.delete(`/farms/${id}`)
