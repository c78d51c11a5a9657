import type { ElevationModelInfo, TerrainHorizon } from '@shared/schemas/terrain'
import { http } from './http'
import { postForm } from './multipart'

export type { ElevationModelInfo, TerrainHorizon } from '@shared/schemas/terrain'

/** The farm's elevation model, or null. */
export const getElevationModel = (farmId: number) =>
  http.get<{ model: ElevationModelInfo | null }>(`/farms/${farmId}/terrain`).then((r) => r.model)

/** Uploads a GeoTIFF or an ESRI ASCII grid (with the text of its .prj when there is one). */
export function uploadElevationModel(farmId: number, file: File, prjText?: string): Promise<ElevationModelInfo> {
  const form = new FormData()
  if (prjText) form.append('prj', prjText)
  form.append('file', file)
  return postForm<ElevationModelInfo>(`/farms/${farmId}/terrain`, form, { quiet: [400, 413] })
}

export const deleteElevationModel = (farmId: number) => http.delete(`/farms/${farmId}/terrain`)

/** The terrain horizon of a point (360 bins), horizonDeg null where the farm has no model. */
export const getTerrainHorizon = (farmId: number, lonDeg: number, latDeg: number, antennaHeightM: number) =>
  http.get<TerrainHorizon>(`/farms/${farmId}/terrain/horizon`, { latDeg, lonDeg, antennaHeightM })
