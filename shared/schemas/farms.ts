import { z } from 'zod'

/** True when the runtime knows the IANA time zone name. */
export function isTimeZone(name: string): boolean {
  try {
    new Intl.DateTimeFormat('en-GB', { timeZone: name })
    return name.includes('/') || name === 'UTC'
  } catch {
    return false
  }
}

export const farmInputSchema = z.object({
  name: z.string().trim().min(1, 'Enter the farm name').max(120),
  timeZone: z.string().trim().refine(isTimeZone, 'Choose an IANA time zone such as America/Chicago'),
  address: z.string().trim().max(500).default(''),
  notes: z.string().trim().max(4000).default(''),
  clientIds: z.array(z.number().int().positive()).max(200).default([]),
})
export type FarmInput = z.infer<typeof farmInputSchema>
export const farmPatchSchema = farmInputSchema.partial()
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
