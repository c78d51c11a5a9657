import { z } from 'zod'
import { polygonSchema } from './geo'

// RTK base stations and correction networks (GET for every signed-in role, clients only
// those their farms' fields use; POST/PATCH/DELETE for admins and office staff), a field's
// choice of correction source, and the space-weather (Kp) feed.

const lat = (what: string) =>
  z.number({ error: `Enter the ${what} latitude in degrees` }).gte(-90, `The ${what} latitude must be between -90 and 90 degrees`).lte(90, `The ${what} latitude must be between -90 and 90 degrees`)
const lon = (what: string) =>
  z.number({ error: `Enter the ${what} longitude in degrees` }).gte(-180, `The ${what} longitude must be between -180 and 180 degrees`).lte(180, `The ${what} longitude must be between -180 and 180 degrees`)

const baseStationFields = {
  name: z.string().trim().min(1, 'Enter a name').max(120, 'Use at most 120 characters'),
  latDeg: lat('base'),
  lonDeg: lon('base'),
  antennaHeightM: z.number({ error: 'Enter the antenna height in metres' }).min(0, 'The antenna height cannot be below 0 m').max(300, 'The antenna height must be at most 300 m'),
  radioRangeKm: z.number({ error: 'Enter the radio range in km' }).positive('The radio range must be above 0 km').max(200, 'The radio range must be at most 200 km'),
  note: z.string().trim().max(1000, 'Use at most 1000 characters'),
}
export const baseStationInputSchema = z.object({
  ...baseStationFields,
  antennaHeightM: baseStationFields.antennaHeightM.default(2),
  note: baseStationFields.note.default(''),
})
export type BaseStationInput = z.infer<typeof baseStationInputSchema>
export const baseStationPatchSchema = z.object(baseStationFields).partial()
export type BaseStationPatch = z.infer<typeof baseStationPatchSchema>
export interface BaseStation extends BaseStationInput {
  id: number
}

export const mountPointSchema = z.object({
  name: z.string().trim().min(1, 'Name each mount point').max(80, 'Use at most 80 characters for a mount point'),
  latDeg: lat('mount point'),
  lonDeg: lon('mount point'),
})
export type MountPoint = z.infer<typeof mountPointSchema>

const networkFields = {
  name: z.string().trim().min(1, 'Enter a name').max(120, 'Use at most 120 characters'),
  /** The area the network serves; null: it reaches every field (mount points then give the baseline). */
  coverage: polygonSchema.nullable(),
  mountPoints: z.array(mountPointSchema).max(500, 'At most 500 mount points'),
  note: z.string().trim().max(1000, 'Use at most 1000 characters'),
}
const needsOne = (n: { coverage?: unknown; mountPoints?: unknown[] }) => n.coverage !== null || (n.mountPoints?.length ?? 0) > 0
export const networkInputSchema = z
  .object({ ...networkFields, coverage: networkFields.coverage.default(null), mountPoints: networkFields.mountPoints.default([]), note: networkFields.note.default('') })
  .refine(needsOne, { message: 'Give the network a coverage area or at least one mount point', path: ['coverage'] })
export type NetworkInput = z.infer<typeof networkInputSchema>
export const networkPatchSchema = z.object(networkFields).partial()
export type NetworkPatch = z.infer<typeof networkPatchSchema>
export interface CorrectionNetwork extends NetworkInput {
  id: number
}

export interface CorrectionSources {
  bases: BaseStation[]
  networks: CorrectionNetwork[]
}

/** PUT /api/fields/:id/correction: 'auto' = the nearest reachable source. */
export const fieldCorrectionInputSchema = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('auto') }),
  z.object({ kind: z.literal('base'), id: z.number().int().positive('Choose a base station') }),
  z.object({ kind: z.literal('network'), id: z.number().int().positive('Choose a correction network') }),
])
export type FieldCorrectionInput = z.infer<typeof fieldCorrectionInputSchema>

/** Why RTK work cannot run on a field. */
export type CorrectionProblem = 'no-source' | 'out-of-range' | 'baseline-limit'

/** GET /api/fields/:id/correction: the field's link and what it means for each service level. */
export interface FieldCorrection {
  fieldId: number
  choice: FieldCorrectionInput
  /** the source in use (the choice, or the nearest reachable one) */
  link: {
    kind: 'base' | 'network'
    id: number
    name: string
    baselineKm: number
    farthestKm: number
    reachable: boolean
    /** false for a network known only by its coverage (no mount points): baselineKm is 0 for want of a figure */
    baselineKnown: boolean
  } | null
  /** the field's own service level: its error model and the baseline part */
  serviceLevel: {
    id: number
    name: string
    needsBase: boolean
    sigmaUereM: number
    ppmH: number
    ppmV: number
    maxBaselineKm: number | null
    /** 2 ppm_H b and 1.96 ppm_V b (m) */
    baselineH95M: number
    baselineV95M: number
  }
  /** sentences for the field's warning; empty when RTK work can run */
  warnings: string[]
  problem: CorrectionProblem | null
}

/** One 3-hour Kp block with its NOAA G level. */
export interface KpBlockView {
  start: string
  end: string
  kp: number
  g: number
  observed: boolean
}

/** 'current': fetched within 36 h; 'stale': older, or the last fetch failed; 'none': never fetched */
export type SpaceWeatherState = 'current' | 'stale' | 'none'

/** GET /api/space-weather. */
export interface SpaceWeatherStatus {
  state: SpaceWeatherState
  url: string
  usesLocalFake: boolean
  lastOkAt: string | null
  lastAttemptAt: string | null
  lastError: string | null
  blocks: KpBlockView[]
  /** UTC days (YYYY-MM-DD) with a block of G3 or worse */
  stormDays: string[]
}

/** The error budget of an hour (hour detail): each part with its figure, at the field's worst. */
export interface HourErrorBudget {
  sigmaUereM: number
  hdop: number | null
  vdop: number | null
  /** 2 HDOP sigma, 1.96 VDOP sigma (m) */
  geometryH95M: number | null
  geometryV95M: number | null
  /** 2 ppm_H b, 1.96 ppm_V b (m) */
  baselineH95M: number
  baselineV95M: number
  h95M: number | null
  v95M: number | null
  link: { kind: 'base' | 'network'; name: string; baselineKm: number; farthestKm: number; reachable: boolean; baselineKnown: boolean } | null
  /** highest Kp of the hour and its G level; null: no Kp forecast covers the hour */
  spaceWeather: { kpMax: number; g: number } | null
  /**
   * the Kp feed the flag comes from: when 'stale' or 'none', storms are unknown and the
   * flag (from an old forecast, or none) must not be read as quiet
   */
  spaceWeatherFeed: { state: SpaceWeatherState; lastOkAt: string | null }
  /** work type id -> why it is Closed regardless of the geometry */
  closedReasons: Record<string, CorrectionProblem>
}
