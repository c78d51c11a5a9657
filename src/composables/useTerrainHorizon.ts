/**
 * The terrain horizon of the sky check's point, from the farm's elevation model on the
 * server (360 bins, deg; null where the farm has no model or it does not cover the point).
 * Only the newest answer is kept; a failed look-up leaves the sky check without terrain.
 */
import { ref, shallowRef } from 'vue'
import { getTerrainHorizon } from '@/api/terrain'

export function useTerrainHorizon() {
  const horizonDeg = shallowRef<number[] | null>(null)
  const loading = ref(false)
  let asked = 0

  async function load(farmId: number, lonLat: [number, number], antennaHeightM: number): Promise<void> {
    const id = ++asked
    loading.value = true
    try {
      const res = await getTerrainHorizon(farmId, lonLat[0], lonLat[1], antennaHeightM)
      if (id === asked) horizonDeg.value = res.horizonDeg
    } catch {
      if (id === asked) horizonDeg.value = null
    } finally {
      if (id === asked) loading.value = false
    }
  }

  return { horizonDeg, loading, load }
}
