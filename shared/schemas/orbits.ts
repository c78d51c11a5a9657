import { z } from 'zod'

export const gnssSystems = ['GPS', 'GLONASS', 'Galileo', 'BeiDou', 'QZSS', 'SBAS', 'Other'] as const
export type GnssSystem = (typeof gnssSystems)[number]
export const gnssSystemSchema = z.enum(gnssSystems)

/** Metadata sent with an orbit file upload (the file itself goes as multipart `file`). */
export const orbitUploadSchema = z.object({
  name: z.string().trim().min(1, 'Enter a name for the orbit set').max(160),
  /** Constellation for every record of the file when the records do not say. */
  system: gnssSystemSchema.optional(),
})

export interface OrbitRecordProblem {
  record: string
  line: number
  message: string
}

export interface OrbitSet {
  id: number
  name: string
  source: 'upload' | 'feed'
  format: string
  satelliteCount: number
  skippedCount: number
  /** Skipped records with the reason (the list shows at most 20; problemCount has the total). */
  problems: OrbitRecordProblem[]
  problemCount: number
  /** Records used with a remark (constellation unknown -> Other, unhealthy, ...). */
  notes: OrbitRecordProblem[]
  oldestEpoch: string | null
  newestEpoch: string | null
  /** Age of the newest element set in days at the time of the request. */
  ageDays: number | null
  /** True when the elements are older than ORBIT_AGE_WARNING_DAYS. */
  ageWarning: boolean
  /** Satellites per constellation. */
  systems: Partial<Record<GnssSystem, number>>
  /** The constellation chosen for the whole file at upload, if any. */
  fileSystem: GnssSystem | null
  /** Constellations this set is active for. */
  activeFor: GnssSystem[]
  uploadedBy: number | null
  createdAt: string
}

/**
 * Elements older than this many days are flagged. Common practice, not a standard: SGP4
 * predictions from general-perturbation elements drift by kilometres per day.
 */
export const ORBIT_AGE_WARNING_DAYS = 7

export interface OrbitSetSatellite {
  id: string
  name: string
  system: GnssSystem
  epoch: string
  ageDays: number
}
export interface OrbitSetDetail extends OrbitSet {
  satellites: OrbitSetSatellite[]
}

/** POST /api/orbit-sets answer (201). */
export interface OrbitUploadResult {
  orbitSet: OrbitSet
  /** How many records were skipped (listed in orbitSet.problems). */
  skipped: number
}

export const activeOrbitSchema = z.object({
  system: gnssSystemSchema,
  /** null: the nominal constellation. */
  orbitSetId: z.number().int().positive().nullable(),
  enabled: z.boolean(),
})
export type ActiveOrbit = z.infer<typeof activeOrbitSchema>
/** PUT /api/orbits/active: the constellations to change (others keep their choice). */
export const activeOrbitsPutSchema = z
  .array(activeOrbitSchema)
  .min(1, 'Send at least one constellation')
  .max(gnssSystems.length)
  .refine((list) => new Set(list.map((a) => a.system)).size === list.length, { message: 'A constellation is listed twice' })
export type ActiveOrbitsPut = z.infer<typeof activeOrbitsPutSchema>

/** Constellations that have a nominal (built-in) constellation. */
export const nominalSystems = ['GPS', 'GLONASS', 'Galileo', 'BeiDou'] as const satisfies readonly GnssSystem[]

/** GET/PUT /api/orbits/active answer: one row per constellation that can be chosen. */
export interface ActiveOrbitState extends ActiveOrbit {
  /** True for GPS, GLONASS, Galileo, BeiDou. */
  nominalAvailable: boolean
  orbitSetName: string | null
  /** Satellites this choice contributes (nominal count or the set's satellites of this system). */
  satelliteCount: number
}

/**
 * GET /api/orbit-data: what the browser (sky check) and the forecast jobs compute with.
 * A 'set' source is the stored file: parse it with parseOrbitFile(content, parseOptions)
 * and keep the satellites whose system is `system`.
 */
export type OrbitDataSource =
  | { system: GnssSystem; kind: 'nominal'; nominal: 'gps' | 'glonass' | 'galileo' | 'beidou' }
  | {
      system: GnssSystem
      kind: 'set'
      orbitSetId: number
      name: string
      format: string
      content: string
      parseOptions: { system?: GnssSystem }
    }
export interface OrbitData {
  sources: OrbitDataSource[]
  enabledSystems: GnssSystem[]
  /** Outages that end after now minus one day, UTC ms. */
  outages: { satId: string; fromMs: number; toMs: number }[]
  /** Changes whenever any of the above changes (a hash); also sent as the ETag. */
  version: string
}

export interface OrbitFeedStatus {
  /** The feed address in use ('' means the app's own local fake feed). */
  url: string
  usesLocalFake: boolean
  lastRun: {
    at: string
    ok: boolean
    message: string
    orbitSetId: number | null
    attempts: number
  } | null
  /** The newest orbit set fetched from the feed. */
  newestFeedSet: { id: number; name: string; createdAt: string; satelliteCount: number } | null
}

const outageFieldsSchema = z.object({
  satId: z.string().trim().min(1, 'Enter the satellite id').max(32),
  from: z.iso.datetime({ offset: true }),
  to: z.iso.datetime({ offset: true }),
  note: z.string().trim().max(1000),
})
export const outageInputSchema = outageFieldsSchema
  .extend({ note: outageFieldsSchema.shape.note.default('') })
  .refine((o) => Date.parse(o.to) > Date.parse(o.from), { message: 'The end must be after the start', path: ['to'] })
export type OutageInput = z.infer<typeof outageInputSchema>
/** PATCH /api/outages/:id; the end must still be after the start once merged. */
export const outagePatchSchema = outageFieldsSchema.partial().refine(
  (o) => !o.from || !o.to || Date.parse(o.to) > Date.parse(o.from),
  { message: 'The end must be after the start', path: ['to'] },
)
export type OutagePatch = z.infer<typeof outagePatchSchema>

export interface Outage {
  id: number
  satId: string
  from: string
  to: string
  note: string
  createdBy: number | null
  createdAt: string
  updatedAt: string
}

export const outageListQuerySchema = z.object({
  /** Only outages that end at or after this instant (default: all). */
  from: z.iso.datetime({ offset: true }).optional(),
})
