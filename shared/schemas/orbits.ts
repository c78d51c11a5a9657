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
  problems: OrbitRecordProblem[]
  oldestEpoch: string | null
  newestEpoch: string | null
  createdAt: string
}

export const activeOrbitSchema = z.object({
  system: gnssSystemSchema,
  /** null: the nominal constellation. */
  orbitSetId: z.number().int().positive().nullable(),
  enabled: z.boolean(),
})
export type ActiveOrbit = z.infer<typeof activeOrbitSchema>

export const outageInputSchema = z
  .object({
    satId: z.string().trim().min(1, 'Enter the satellite id').max(32),
    from: z.iso.datetime({ offset: true }),
    to: z.iso.datetime({ offset: true }),
    note: z.string().trim().max(1000).default(''),
  })
  .refine((o) => Date.parse(o.to) > Date.parse(o.from), { message: 'The end must be after the start', path: ['to'] })
export type OutageInput = z.infer<typeof outageInputSchema>

export interface Outage {
  id: number
  satId: string
  from: string
  to: string
  note: string
}
