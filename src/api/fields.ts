import type { Field, FieldInput, FieldPatch } from '@shared/schemas/fields'
import { buildUrl, http } from './http'

/** The fields of a farm (every field; a farm has tens, not thousands). */
export const listFields = (farmId: number) => http.get<Field[] | { items: Field[] }>(`/farms/${farmId}/fields`).then(itemsOf)

export const getField = (id: number) => http.get<Field>(`/fields/${id}`)

/**
 * Creating and changing a field: a boundary problem (400, self-crossing) and the
 * unusual-area question (409/422, code 'confirm-area') are handled by the page itself.
 */
export const createField = (farmId: number, input: FieldInput) =>
  http.post<Field>(`/farms/${farmId}/fields`, input, { quiet: [400, 409, 422] })

export const updateField = (id: number, patch: FieldPatch) => http.patch<Field>(`/fields/${id}`, patch, { quiet: [400, 409, 422] })

export const deleteField = (id: number) => http.delete(`/fields/${id}`)

/** Lists come as a plain array or as a page `{ items }`: both are read. */
export function itemsOf<T>(body: T[] | { items: T[] }): T[] {
  return Array.isArray(body) ? body : body.items
}

/** Address of a farm's ISO 11783-10 task data (a zip with TASKDATA/TASKDATA.XML) for farm terminals. */
export const taskDataUrl = (farmId: number) => buildUrl(`/farms/${farmId}/taskdata.zip`)
