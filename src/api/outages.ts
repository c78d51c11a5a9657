import type { Outage, OutageInput } from '@shared/schemas/orbits'
import { itemsOf } from './fields'
import { http } from './http'

/** Satellites marked out of service for a span of time. */
export const listOutages = () => http.get<Outage[] | { items: Outage[] }>('/outages').then(itemsOf)

export const createOutage = (input: OutageInput) => http.post<Outage>('/outages', input)

export const updateOutage = (id: number, patch: Partial<OutageInput>) => http.patch<Outage>(`/outages/${id}`, patch)

export const deleteOutage = (id: number) => http.delete(`/outages/${id}`)
