import type {
  ActiveOrbit,
  ActiveOrbitState,
  GnssSystem,
  OrbitData,
  OrbitFeedStatus,
  OrbitSet,
  OrbitSetDetail,
  OrbitUploadResult,
} from '@shared/schemas/orbits'
import { itemsOf } from './fields'
import { http } from './http'
import { postForm } from './multipart'

export type { OrbitData }

/** Everything the sky check needs to rebuild the satellites in the browser. */
export const getOrbitData = () => http.get<OrbitData>('/orbit-data', undefined, { quiet: [404] })

export const listOrbitSets = () => http.get<OrbitSet[] | { items: OrbitSet[] }>('/orbit-sets').then(itemsOf)

export const getOrbitSet = (id: number) => http.get<OrbitSetDetail>(`/orbit-sets/${id}`)

export const deleteOrbitSet = (id: number) => http.delete(`/orbit-sets/${id}`, { quiet: [409] })

/** Uploads an orbit file; a file without one usable record is refused with its problems (400). */
export function uploadOrbitSet(file: File, name: string, system?: GnssSystem): Promise<OrbitUploadResult> {
  const form = new FormData()
  form.append('name', name)
  if (system) form.append('system', system)
  form.append('file', file)
  return postForm<OrbitUploadResult>('/orbit-sets', form, { quiet: [400, 413, 415, 422] })
}

export const getActiveOrbits = () => http.get<ActiveOrbitState[] | { items: ActiveOrbitState[] }>('/orbits/active').then(itemsOf)

export const setActiveOrbits = (active: ActiveOrbit[]) =>
  http.put<ActiveOrbitState[] | { items: ActiveOrbitState[] }>('/orbits/active', active).then(itemsOf)

/** Runs the feed now; a failed run answers 502 with the reason. */
export const runOrbitFeed = () => http.post<{ ok: boolean; orbitSetId: number; name: string; satelliteCount: number; message?: string }>('/orbit-feed/run')

export const getOrbitFeedStatus = () => http.get<OrbitFeedStatus>('/orbit-feed/status', undefined, { quiet: [404] })
