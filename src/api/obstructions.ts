import type { Obstruction, ObstructionInput, ObstructionPatch } from '@shared/schemas/fields'
import { itemsOf } from './fields'
import { http } from './http'

/** The tree lines, woodlots and buildings of a farm. */
export const listObstructions = (farmId: number) =>
  http.get<Obstruction[] | { items: Obstruction[] }>(`/farms/${farmId}/obstructions`).then(itemsOf)

export const createObstruction = (farmId: number, input: ObstructionInput) =>
  http.post<Obstruction>(`/farms/${farmId}/obstructions`, input)

export const updateObstruction = (id: number, patch: ObstructionPatch) => http.patch<Obstruction>(`/obstructions/${id}`, patch)

export const deleteObstruction = (id: number) => http.delete(`/obstructions/${id}`)
