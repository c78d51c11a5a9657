import type { HourDetail } from '@shared/schemas/passes'
import { http } from './http'

/** The figures of one hour, the field's sample points and the sky at the worst point. */
export const getHourDetail = (fieldId: number, hourIso: string) =>
  http.get<HourDetail>(`/fields/${fieldId}/hour-detail`, { hour: hourIso })
