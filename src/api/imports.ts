import type { FieldImportOptions, FieldImportResult, ImportPreview } from '@shared/schemas/fields'
import { postForm } from './multipart'

export type { ImportFeature, ImportPreview } from '@shared/schemas/fields'

/** Step 1: the server reads the file and lists what it found; nothing is stored. */
export function previewImport(farmId: number, file: File): Promise<ImportPreview> {
  const form = new FormData()
  form.append('file', file)
  return postForm<ImportPreview>(`/farms/${farmId}/fields/import/preview`, form, { quiet: [400, 413, 415, 422] })
}

/**
 * Step 2: the chosen features become fields (the file is sent again: the server keeps
 * nothing between the steps). 422 'confirm-area' asks to confirm unusual areas.
 */
export function createFromImport(farmId: number, file: File, options: FieldImportOptions): Promise<FieldImportResult> {
  const form = new FormData()
  form.append('options', JSON.stringify(options))
  form.append('file', file)
  return postForm<FieldImportResult>(`/farms/${farmId}/fields/import`, form, { quiet: [400, 409, 413, 415, 422] })
}
