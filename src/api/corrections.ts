// RTK base stations, correction networks, a field's correction source and the Kp feed.
import type {
  BaseStation,
  BaseStationInput,
  BaseStationPatch,
  CorrectionNetwork,
  CorrectionSources,
  FieldCorrection,
  FieldCorrectionInput,
  NetworkInput,
  NetworkPatch,
  SpaceWeatherStatus,
} from '@shared/schemas/corrections'
import { http } from './http'

export const listCorrectionSources = () => http.get<CorrectionSources>('/corrections')
export const createBaseStation = (input: BaseStationInput) => http.post<BaseStation>('/base-stations', input)
export const updateBaseStation = (id: number, patch: BaseStationPatch) => http.patch<BaseStation>(`/base-stations/${id}`, patch)
export const deleteBaseStation = (id: number) => http.delete(`/base-stations/${id}`)
export const createNetwork = (input: NetworkInput) => http.post<CorrectionNetwork>('/correction-networks', input)
export const updateNetwork = (id: number, patch: NetworkPatch) => http.patch<CorrectionNetwork>(`/correction-networks/${id}`, patch)
export const deleteNetwork = (id: number) => http.delete(`/correction-networks/${id}`)
export const getFieldCorrection = (fieldId: number) => http.get<FieldCorrection>(`/fields/${fieldId}/correction`)
export const setFieldCorrection = (fieldId: number, input: FieldCorrectionInput) => http.put<FieldCorrection>(`/fields/${fieldId}/correction`, input)
export const getSpaceWeather = () => http.get<SpaceWeatherStatus>('/space-weather')
export const runSpaceWeatherFeed = () => http.post<{ message: string }>('/space-weather/run')
