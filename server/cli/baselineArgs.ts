// The forecast command line's correction-quality flags: --base LAT,LON[,HEIGHT_M], --ppm-h,
// --ppm-v (mm per km of baseline) and --max-baseline-km. Turns them into the baseline
// (ellipsoidal geodesic on WGS-84 from the point or the field's centroid, baseline.ts) and
// the engine's baseline parts and closures (errorModel.ts) for the RTK demo work types.
import * as turf from '@turf/turf'
import {
  DEMO_SERVICE_LEVELS,
  fieldVertices,
  geodesicDistanceKm,
  linkEffect,
  type FieldGeometry,
  type WorkType,
} from '../../shared/precision/index'

export interface BaseArgs {
  base: { latDeg: number; lonDeg: number; heightM: number }
  ppmH: number
  ppmV: number
  maxBaselineKm: number | null
}

/** Parses the flags; null without --base. Throws an Error with a one-line reason. */
export function parseBaseArgs(values: { base?: string; 'ppm-h'?: string; 'ppm-v'?: string; 'max-baseline-km'?: string }): BaseArgs | null {
  const ppm = (name: string, v: string | undefined) => {
    if (v === undefined) return 0
    const n = Number(v)
    if (!Number.isFinite(n) || n < 0 || n > 100) throw new Error(`--${name} ${v}: mm per km must be in [0, 100]`)
    return n
  }
  const ppmH = ppm('ppm-h', values['ppm-h'])
  const ppmV = ppm('ppm-v', values['ppm-v'])
  let maxBaselineKm: number | null = null
  if (values['max-baseline-km'] !== undefined) {
    maxBaselineKm = Number(values['max-baseline-km'])
    if (!(maxBaselineKm > 0)) throw new Error(`--max-baseline-km ${values['max-baseline-km']}: must be a distance above 0 km`)
  }
  if (values.base === undefined) {
    if (values['ppm-h'] !== undefined || values['ppm-v'] !== undefined || values['max-baseline-km'] !== undefined) {
      throw new Error('--ppm-h, --ppm-v and --max-baseline-km need --base LAT,LON[,HEIGHT_M]')
    }
    return null
  }
  const parts = values.base.split(',').map((p) => Number(p.trim()))
  if (parts.length < 2 || parts.length > 3 || parts.some((p) => !Number.isFinite(p))) throw new Error(`--base ${values.base}: use LAT,LON or LAT,LON,HEIGHT_M`)
  const [latDeg, lonDeg, heightM = 0] = parts
  if (latDeg < -90 || latDeg > 90) throw new Error(`--base ${values.base}: latitude must be in [-90, 90] degrees`)
  if (lonDeg < -180 || lonDeg > 180) throw new Error(`--base ${values.base}: longitude must be in [-180, 180] degrees`)
  return { base: { latDeg, lonDeg, heightM }, ppmH, ppmV, maxBaselineKm }
}

/** Baseline from a point (km). */
export function pointBaseline(b: BaseArgs, point: { latDeg: number; lonDeg: number }) {
  const baselineKm = geodesicDistanceKm(point, b.base)
  return { baselineKm, baselineH95M: (2 * b.ppmH * baselineKm) / 1000, baselineV95M: (1.96 * b.ppmV * baselineKm) / 1000 }
}

/** Baselines of a field (centroid and farthest vertex) and the engine inputs they give. */
export function fieldBaseline(b: BaseArgs, field: FieldGeometry, workTypes: readonly WorkType[]) {
  const c = turf.centerOfMass(turf.feature(('type' in field && field.type === 'Feature' ? field.geometry : field) as GeoJSON.Geometry)).geometry.coordinates
  const centroid = { lonDeg: c[0], latDeg: c[1] }
  const baselineKm = geodesicDistanceKm(centroid, b.base)
  const farthestKm = Math.max(baselineKm, ...fieldVertices(field).map((v) => geodesicDistanceKm(v, b.base)))
  const model = { sigmaUereM: DEMO_SERVICE_LEVELS.RTK, ppmH: b.ppmH, ppmV: b.ppmV, maxBaselineKm: b.maxBaselineKm, needsBase: true }
  const effect = linkEffect(model, { baselineKm, farthestKm, reachable: true })
  return {
    baselineKm,
    farthestKm,
    baselineHM: effect.baselineHM,
    baselineVM: effect.baselineVM,
    // The baseline applies to the RTK demo work types (those on the RTK sigma).
    workTypes: workTypes.map((w) => (w.sigmaUereM === DEMO_SERVICE_LEVELS.RTK ? { ...w, baselineHM: effect.baselineHM, baselineVM: effect.baselineVM, closedReason: effect.closedReason } : w)),
  }
}
