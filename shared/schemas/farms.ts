import { z } from 'zod'
import { listQuerySchema } from './common'

/** True when the runtime knows the IANA time zone name. */
export function isTimeZone(name: string): boolean {
  try {
    new Intl.DateTimeFormat('en-GB', { timeZone: name })
    return name.includes('/') || name === 'UTC'
  } catch {
    return false
  }
}

const farmFields = {
  name: z.string().trim().min(1, 'Enter the farm name').max(120, 'Use at most 120 characters'),
  timeZone: z.string().trim().refine(isTimeZone, 'Choose an IANA time zone such as America/Chicago'),
  address: z.string().trim().max(500, 'Use at most 500 characters'),
  notes: z.string().trim().max(4000, 'Use at most 4000 characters'),
  clientIds: z.array(z.number().int().positive()).max(200),
}

export const farmInputSchema = z.object({
  ...farmFields,
  address: farmFields.address.default(''),
  notes: farmFields.notes.default(''),
  clientIds: farmFields.clientIds.default([]),
})
export type FarmInput = z.infer<typeof farmInputSchema>
/** PATCH: only the fields sent change (no defaults, so a missing field is left alone). */
export const farmPatchSchema = z.object(farmFields).partial()
export type FarmPatch = z.infer<typeof farmPatchSchema>

export interface FarmClient {
  id: number
  name: string
  email: string
}

export interface Farm {
  id: number
  name: string
  timeZone: string
  address: string
  notes: string
  clients: FarmClient[]
  createdAt: string
  updatedAt: string
}

/** Columns the Farms table can be sorted by. */
export const farmSortKeys = ['name', 'timeZone', 'createdAt', 'updatedAt'] as const
export type FarmSortKey = (typeof farmSortKeys)[number]

/** GET /api/farms: paging, sorting and search (name, address, notes). */
export const farmListQuerySchema = listQuerySchema.extend({
  sort: z.enum(farmSortKeys, { error: `Sort by one of: ${farmSortKeys.join(', ')}` }).optional(),
})
export type FarmListQuery = z.infer<typeof farmListQuerySchema>
