import { z } from 'zod'

export const serviceLevelInputSchema = z.object({
  name: z.string().trim().min(1, 'Enter a name').max(80),
  sigmaUereM: z.number().positive('sigma must be above 0 m').max(100, 'sigma must be at most 100 m'),
  note: z.string().trim().max(500).default(''),
})
export type ServiceLevelInput = z.infer<typeof serviceLevelInputSchema>
export interface ServiceLevel extends ServiceLevelInput {
  id: number
}

export const workTypeInputSchema = z.object({
  name: z.string().trim().min(1, 'Enter a name').max(80),
  serviceLevelId: z.number().int().positive(),
  maxH95M: z.number().positive().max(100),
  maxV95M: z.number().positive().max(100).nullable(),
  minSats: z.number().int().min(4).max(60),
  maxPdop: z.number().positive().max(50),
  requiredShare: z.number().gt(0).lte(1),
  requireN1: z.boolean(),
  rateHaPerH: z.number().positive().max(1000),
  sortOrder: z.number().int().min(0).max(1000).default(0),
  active: z.boolean().default(true),
})
export type WorkTypeInput = z.infer<typeof workTypeInputSchema>
export interface WorkType extends WorkTypeInput {
  id: number
}

export const machineInputSchema = z.object({
  name: z.string().trim().min(1, 'Enter a name').max(120),
  crew: z.string().trim().max(120).default(''),
  antennaHeightM: z.number().min(0.5).max(10),
  rateHaPerH: z.number().positive().max(1000).nullable().default(null),
  active: z.boolean().default(true),
  notes: z.string().trim().max(1000).default(''),
})
export type MachineInput = z.infer<typeof machineInputSchema>
export interface Machine extends MachineInput {
  id: number
}

/** State of an hour for a work type (see the product design). */
export const hourStates = ['clear', 'tight', 'closed'] as const
export type HourState = (typeof hourStates)[number]
