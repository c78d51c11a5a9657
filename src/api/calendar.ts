import type { CalendarToken, CalendarTokenInput, CreatedCalendarToken } from '@shared/schemas/passes'
import { itemsOf } from './fields'
import { http } from './http'

export const listCalendarTokens = (farmId: number) =>
  http.get<CalendarToken[] | { items: CalendarToken[] }>(`/farms/${farmId}/calendar-tokens`).then(itemsOf)

/** The plain token and feed address come back once, here. */
export const createCalendarToken = (farmId: number, input: CalendarTokenInput) =>
  http.post<CreatedCalendarToken>(`/farms/${farmId}/calendar-tokens`, input)

export const revokeCalendarToken = (id: number) => http.delete(`/calendar-tokens/${id}`)
