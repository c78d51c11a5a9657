// Correction service levels, work types and machines (admin reference data).
import type {
  Machine,
  MachineInput,
  MachinePatch,
  ServiceLevel,
  ServiceLevelInput,
  ServiceLevelPatch,
  WorkType,
  WorkTypeInput,
  WorkTypePatch,
} from '@shared/schemas/planning'
import { http } from './http'

export const listServiceLevels = () => http.get<ServiceLevel[]>('/service-levels')
export const createServiceLevel = (input: ServiceLevelInput) => http.post<ServiceLevel>('/service-levels', input)
export const updateServiceLevel = (id: number, patch: ServiceLevelPatch) => http.patch<ServiceLevel>(`/service-levels/${id}`, patch)
export const deleteServiceLevel = (id: number) => http.delete(`/service-levels/${id}`)

export const listWorkTypes = () => http.get<WorkType[]>('/work-types')
export const createWorkType = (input: WorkTypeInput) => http.post<WorkType>('/work-types', input)
export const updateWorkType = (id: number, patch: WorkTypePatch) => http.patch<WorkType>(`/work-types/${id}`, patch)
export const deleteWorkType = (id: number) => http.delete(`/work-types/${id}`)

export const listMachines = () => http.get<Machine[]>('/machines')
export const createMachine = (input: MachineInput) => http.post<Machine>('/machines', input)
export const updateMachine = (id: number, patch: MachinePatch) => http.patch<Machine>(`/machines/${id}`, patch)
export const deleteMachine = (id: number) => http.delete(`/machines/${id}`)
