// The demo reference data: correction service levels, work types and machines with crews.
//
// Service levels and work types follow the product's demo defaults (DESIGN.md, "Demo
// defaults"). They are common-practice approximations, not published requirements:
// sigma_UERE of about 3 m for an uncorrected single-frequency fix, under 1 m with SBAS,
// about a centimetre with RTK; the work type thresholds are what precision planting,
// strip-till, spraying, drainage tile and levelling usually ask of a guidance system.
// The admin edits them. Machines and crews are invented.
//
// Idempotent: each table is filled only while it is empty, so rows the admin has since
// edited, renamed or deleted are never brought back; all in one transaction.
import type { Database } from '../server/db/index.ts'
import { createStore, type Repositories } from '../server/db/repositories/index.ts'

const COMMON_PRACTICE = 'Demo value: a common-practice approximation, not a published requirement.'

export const demoServiceLevels = [
  { name: 'Standalone', sigmaUereM: 3.0, note: `Uncorrected single-frequency fix. ${COMMON_PRACTICE}` },
  { name: 'SBAS', sigmaUereM: 0.8, note: `Satellite-based augmentation (free wide-area corrections). ${COMMON_PRACTICE}` },
  {
    name: 'RTK',
    sigmaUereM: 0.012,
    // "A few mm + 1 ppm" as receiver data sheets quote it; 30 km is a usual single-base limit.
    ppmH: 1,
    ppmV: 1,
    maxBaselineKm: 30,
    needsBase: true,
    note: `Real-time kinematic from a base station or network: 12 mm + 1 mm per km of baseline, up to 30 km. ${COMMON_PRACTICE}`,
  },
] as const

export type DemoServiceLevelName = (typeof demoServiceLevels)[number]['name']

/** The demo work types (common-practice approximations, see the header). */
export const demoWorkTypes: Array<{
  name: string
  serviceLevel: DemoServiceLevelName
  maxH95M: number
  maxV95M: number | null
  minSats: number
  maxPdop: number
  requiredShare: number
  requireN1: boolean
  rateHaPerH: number
  sortOrder: number
  /** G3-or-worse storm hours (common practice: planting and strip-till can run with care, grade work cannot) */
  stormAction: 'none' | 'tight' | 'closed'
}> = [
  { name: 'Planting', serviceLevel: 'RTK', maxH95M: 0.05, maxV95M: null, minSats: 6, maxPdop: 4, requiredShare: 0.95, requireN1: true, rateHaPerH: 6, sortOrder: 10, stormAction: 'tight' },
  { name: 'Strip-till', serviceLevel: 'RTK', maxH95M: 0.05, maxV95M: null, minSats: 6, maxPdop: 4, requiredShare: 0.9, requireN1: true, rateHaPerH: 5, sortOrder: 20, stormAction: 'tight' },
  { name: 'Spraying', serviceLevel: 'SBAS', maxH95M: 3, maxV95M: null, minSats: 5, maxPdop: 6, requiredShare: 0.8, requireN1: false, rateHaPerH: 25, sortOrder: 30, stormAction: 'none' },
  { name: 'Tile drainage', serviceLevel: 'RTK', maxH95M: 0.05, maxV95M: 0.04, minSats: 7, maxPdop: 3, requiredShare: 0.95, requireN1: true, rateHaPerH: 1.5, sortOrder: 40, stormAction: 'closed' },
  { name: 'Land levelling', serviceLevel: 'RTK', maxH95M: 0.05, maxV95M: 0.035, minSats: 7, maxPdop: 3, requiredShare: 0.95, requireN1: true, rateHaPerH: 2, sortOrder: 50, stormAction: 'closed' },
]

/** Invented machines and crews; antenna heights of a tractor cab roof (about 3-4 m). */
export const demoMachines = [
  { name: 'Tractor 14 · 16-row planter', crew: 'Wade Ostrowski', antennaHeightM: 3.4, rateHaPerH: null, notes: 'Planter tractor; also pulls the strip-till bar in the fall.' },
  { name: 'Tractor 22 · strip-till bar', crew: 'Ines Kowalczyk', antennaHeightM: 3.6, rateHaPerH: 4.5, notes: 'Older cab, slightly slower on the bar than the book rate.' },
  { name: 'Sprayer 3 · 36 m boom', crew: 'Dale Fitzsimmons', antennaHeightM: 3.9, rateHaPerH: null, notes: 'Self-propelled; receiver on the cab roof.' },
  { name: 'Tile plow 1 · tracked', crew: 'Marisol Oyelaran & Rudy Beck', antennaHeightM: 3.2, rateHaPerH: 1.2, notes: 'Drainage plow with grade control; two-person crew.' },
] as const

export interface PlanningSeedResult {
  serviceLevels: number
  workTypes: number
  machines: number
}

/** Fills the empty reference tables through the repositories; returns how many rows were added. */
export async function seedPlanningWith(repos: Repositories): Promise<PlanningSeedResult> {
  const added = { serviceLevels: 0, workTypes: 0, machines: 0 }
  if ((await repos.serviceLevels.list()).length === 0) {
    for (const level of demoServiceLevels) {
      await repos.serviceLevels.insert({ ...level })
      added.serviceLevels++
    }
  }
  if ((await repos.workTypes.list()).length === 0) {
    for (const { serviceLevel, ...workType } of demoWorkTypes) {
      // A demo work type whose service level the admin removed is left out.
      const level = await repos.serviceLevels.findByName(serviceLevel)
      if (!level) continue
      await repos.workTypes.insert({ ...workType, serviceLevelId: level.id, active: true })
      added.workTypes++
    }
  }
  if ((await repos.machines.list()).length === 0) {
    for (const machine of demoMachines) {
      await repos.machines.insert({ ...machine, active: true })
      added.machines++
    }
  }
  return added
}

/** Seeds the planning reference data in one transaction. */
export async function seedPlanning(db: Database): Promise<PlanningSeedResult> {
  return createStore(db).transaction((repos) => seedPlanningWith(repos))
}
