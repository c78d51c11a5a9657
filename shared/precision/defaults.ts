/**
 * Demo defaults of the product (DESIGN.md, "Demo defaults"): correction service levels
 * with their ranging sigma and the work types with their thresholds. They are
 * common-practice approximations that the admin edits; the engine takes any values.
 */
import type { WorkType } from './forecast'

/** Correction service levels and sigma_UERE (m), common practice. */
export const DEMO_SERVICE_LEVELS = {
  Standalone: 3.0,
  SBAS: 0.8,
  RTK: 0.012,
} as const

/** Demo work types, each with the sigma of its correction service. */
export const DEMO_WORK_TYPES: WorkType[] = [
  { id: 'planting', maxH95M: 0.05, maxV95M: null, minSats: 6, maxPdop: 4, requiredShare: 0.95, requireN1: true, sigmaUereM: DEMO_SERVICE_LEVELS.RTK },
  { id: 'strip-till', maxH95M: 0.05, maxV95M: null, minSats: 6, maxPdop: 4, requiredShare: 0.9, requireN1: true, sigmaUereM: DEMO_SERVICE_LEVELS.RTK },
  { id: 'spraying', maxH95M: 3, maxV95M: null, minSats: 5, maxPdop: 6, requiredShare: 0.8, requireN1: false, sigmaUereM: DEMO_SERVICE_LEVELS.SBAS },
  { id: 'tile-drainage', maxH95M: 0.05, maxV95M: 0.04, minSats: 7, maxPdop: 3, requiredShare: 0.95, requireN1: true, sigmaUereM: DEMO_SERVICE_LEVELS.RTK },
  { id: 'land-levelling', maxH95M: 0.05, maxV95M: 0.035, minSats: 7, maxPdop: 3, requiredShare: 0.95, requireN1: true, sigmaUereM: DEMO_SERVICE_LEVELS.RTK },
]
