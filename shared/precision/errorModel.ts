/**
 * The error model of a correction service level with a baseline (DESIGN.md "Beyond
 * geometry"; common practice, no single published source: receiver data sheets quote
 * RTK accuracy as "a few mm + 1 ppm" RMS, ppm meaning mm per km of baseline):
 *
 *   H95 = 2    (HDOP sigma_UERE + ppm_H b)        (2DRMS, ENGINE.md step 8)
 *   V95 = 1.96 (VDOP sigma_UERE + ppm_V b)        (ENGINE.md step 8 keeps 1.96 for vertical;
 *                                                 DESIGN.md rounds it to 2)
 *
 * b is the geodesic baseline to the base or the nearest mount point in km (baseline.ts),
 * ppm in mm per km, so ppm b is in mm (divided by 1000 for metres). With ppm = 0 the
 * model is the geometry-only one of ENGINE.md, so service levels without a baseline part
 * keep their figures. Past the service level's maximum baseline (often 20-40 km for
 * single-base RTK, common practice) or outside the base's radio range, a work type on
 * a service that needs a base is Closed with that reason.
 */

/** A correction service level's error model. */
export interface ErrorModel {
  sigmaUereM: number
  /** horizontal part per km of baseline (mm/km = ppm) */
  ppmH: number
  /** vertical part per km of baseline (mm/km = ppm) */
  ppmV: number
  /** longest usable baseline (km); null: no limit */
  maxBaselineKm: number | null
  /** whether the service needs a base station or network at all (RTK) */
  needsBase: boolean
}

export const H95_FACTOR = 2
export const V95_FACTOR = 1.96

/**
 * The largest DOP that keeps `factor (sigma DOP + baselinePart)` within `max95M`, the error
 * model solved for the DOP: (max95M / factor - baselinePart) / sigma. With no baseline part
 * it is max95M / (factor sigma), computed as such (the engine's figures stay as they were).
 * Zero or less: no geometry meets the limit at this baseline.
 *
 * @example
 * allowedDop(0.05, H95_FACTOR, 0.012, 0)     // -> 2.0833 (0.05 / 0.024)
 * allowedDop(0.05, H95_FACTOR, 0.012, 0.003) // -> 1.8333 ((0.025 - 0.003) / 0.012)
 */
export function allowedDop(max95M: number, factor: number, sigmaUereM: number, baselinePartM: number): number {
  return baselinePartM === 0 ? max95M / (factor * sigmaUereM) : (max95M / factor - baselinePartM) / sigmaUereM
}

/** Why a work type is closed regardless of geometry. */
export type LinkReason = 'no-source' | 'out-of-range' | 'baseline-limit'

/** Why an hour's state is worse than its geometry alone: the link, or a storm (correction.ts). */
export type HourReason = LinkReason | 'storm'

/** The baseline part of the error, as a ranging-like figure (m): ppm b / 1000. */
export function baselinePartM(ppm: number, baselineKm: number): number {
  return (ppm * baselineKm) / 1000
}

/** What the engine needs per work type from the error model and the field's link. */
export interface LinkEffect {
  /** ppm_H b in metres (before the 95 % factor) */
  baselineHM: number
  /** ppm_V b in metres */
  baselineVM: number
  /** set when the work cannot run at all on this field */
  closedReason: LinkReason | null
}

/**
 * The effect of a field's correction link on a service level.
 *
 * @example
 * linkEffect({ sigmaUereM: 0.012, ppmH: 1, ppmV: 2, maxBaselineKm: 30, needsBase: true },
 *            { baselineKm: 12, farthestKm: 12.4, reachable: true })
 * // -> { baselineHM: 0.012, baselineVM: 0.024, closedReason: null }
 */
export function linkEffect(model: ErrorModel, link: { baselineKm: number; farthestKm: number; reachable: boolean } | null): LinkEffect {
  if (!model.needsBase) return { baselineHM: 0, baselineVM: 0, closedReason: null }
  if (!link) return { baselineHM: 0, baselineVM: 0, closedReason: 'no-source' }
  const effect = { baselineHM: baselinePartM(model.ppmH, link.baselineKm), baselineVM: baselinePartM(model.ppmV, link.baselineKm) }
  if (!link.reachable) return { ...effect, closedReason: 'out-of-range' }
  if (model.maxBaselineKm !== null && link.farthestKm > model.maxBaselineKm) return { ...effect, closedReason: 'baseline-limit' }
  return { ...effect, closedReason: null }
}

/** The error budget of one fix: each part with its figure (m, at 95 %). */
export interface ErrorBudget {
  /** 2 HDOP sigma */
  geometryH95M: number | null
  /** 2 ppm_H b */
  baselineH95M: number
  h95M: number | null
  /** 1.96 VDOP sigma */
  geometryV95M: number | null
  /** 1.96 ppm_V b */
  baselineV95M: number
  v95M: number | null
}

/**
 * Expected errors at 95 % with the baseline part, split into their parts.
 *
 * @example
 * errorBudget({ hdop: 0.9, vdop: 1.5 }, 0.012, { baselineHM: 0.01, baselineVM: 0.02 })
 * // -> { geometryH95M: 0.0216, baselineH95M: 0.02, h95M: 0.0416, geometryV95M: 0.03528, baselineV95M: 0.0392, v95M: 0.07448 }
 */
export function errorBudget(
  dop: { hdop: number | null; vdop: number | null },
  sigmaUereM: number,
  link: { baselineHM: number; baselineVM: number },
): ErrorBudget {
  const geometryH95M = dop.hdop === null ? null : H95_FACTOR * sigmaUereM * dop.hdop
  const geometryV95M = dop.vdop === null ? null : V95_FACTOR * sigmaUereM * dop.vdop
  const baselineH95M = H95_FACTOR * link.baselineHM
  const baselineV95M = V95_FACTOR * link.baselineVM
  return {
    geometryH95M,
    baselineH95M,
    h95M: geometryH95M === null ? null : geometryH95M + baselineH95M,
    geometryV95M,
    baselineV95M,
    v95M: geometryV95M === null ? null : geometryV95M + baselineV95M,
  }
}
