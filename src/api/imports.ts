import type { Boundary } from '@shared/schemas/geo'
import type { Field } from '@shared/schemas/fields'
import { postForm } from './multipart'

/** One feature found in an uploaded boundary file. */
export interface ImportFeature {
  index: number
  geometry: Boundary | null
  properties: Record<string, unknown>
  areaHa: number | null
  /** Why the feature cannot become a field as it is (empty when it can). */
  problems: string[]
}

export interface ImportPreview {
  format?: string
  features: ImportFeature[]
  /** Property names found on the features, to map one to the field name. */
  attributes: string[]
  /** A token the server gives to create from the same upload without sending it again. */
  uploadId?: string
}

export interface ImportChoice {
  selections: { index: number; name: string }[]
  nameAttribute?: string
  serviceLevelId: number
  antennaHeightM: number
}

export interface ImportResult {
  created: Field[]
}

/** Step 1: the server reads the file and lists what it found; nothing is stored. */
export function previewImport(farmId: number, file: File): Promise<ImportPreview> {
  const form = new FormData()
  form.append('file', file)
  form.append('step', 'preview')
  return postForm<ImportPreview>(`/farms/${farmId}/fields/import`, form, { quiet: [400, 413, 415, 422] })
}

/** Step 2: the chosen features become fields. */
export function createFromImport(farmId: number, file: File, choice: ImportChoice, uploadId?: string): Promise<ImportResult> {
  const form = new FormData()
  form.append('file', file)
  form.append('step', 'create')
  if (uploadId) form.append('uploadId', uploadId)
  form.append('options', JSON.stringify(choice))
  return postForm<ImportResult>(`/farms/${farmId}/fields/import`, form, { quiet: [400, 409, 413, 415, 422] })
}
