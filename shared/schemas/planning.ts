import { z } from 'zod'

// Correction service levels, work types and machines (admin reference data).
// GET for every signed-in role; POST/PATCH/DELETE for admins. PATCH bodies carry only
// the fields that change (no defaults). DELETE of something still in use answers 409
// naming what uses it.

const serviceLevelFields = {
  name: z.string().trim().min(1, 'Enter a name').max(80, 'Use at most 80 characters'),
  sigmaUereM: z
    .number({ error: 'Enter sigma in metres' })
    .positive('sigma must be above 0 m')
    .max(100, 'sigma must be at most 100 m'),
  note: z.string().trim().max(500, 'Use at most 500 characters'),
  /** Error model with a baseline (shared/precision/errorModel.ts): mm per km, horizontal and vertical. */
  ppmH: z.number({ error: 'Enter the horizontal part in mm per km' }).min(0, 'The mm per km part cannot be negative').max(100, 'The mm per km part must be at most 100'),
  ppmV: z.number({ error: 'Enter the vertical part in mm per km' }).min(0, 'The mm per km part cannot be negative').max(100, 'The mm per km part must be at most 100'),
  /** null: no limit */
  maxBaselineKm: z.number({ error: 'Enter the longest baseline in km, or leave it empty' }).positive('The longest baseline must be above 0 km').max(1000, 'The longest baseline must be at most 1000 km').nullable(),
  /** the service needs a base station or network (RTK) */
  needsBase: z.boolean(),
}

export const serviceLevelInputSchema = z.object({
  ...serviceLevelFields,
  note: serviceLevelFields.note.default(''),
  ppmH: serviceLevelFields.ppmH.default(0),
  ppmV: serviceLevelFields.ppmV.default(0),
  maxBaselineKm: serviceLevelFields.maxBaselineKm.default(null),
  needsBase: serviceLevelFields.needsBase.default(false),
})
export type ServiceLevelInput = z.infer<typeof serviceLevelInputSchema>
export const serviceLevelPatchSchema = z.object(serviceLevelFields).partial()
export type ServiceLevelPatch = z.infer<typeof serviceLevelPatchSchema>
export interface ServiceLevel extends ServiceLevelInput {
  id: number
}

const workTypeFields = {
  name: z.string().trim().min(1, 'Enter a name').max(80, 'Use at most 80 characters'),
  serviceLevelId: z.number({ error: 'Choose a service level' }).int().positive('Choose a service level'),
  maxH95M: z
    .number({ error: 'Enter the largest horizontal error' })
    .positive('The horizontal limit must be above 0')
    .max(100, 'The horizontal limit must be at most 100 m'),
  /** null: the work has no vertical need. */
  maxV95M: z
    .number({ error: 'Enter the largest vertical error, or leave it empty' })
    .positive('The vertical limit must be above 0')
    .max(100, 'The vertical limit must be at most 100 m')
    .nullable(),
  minSats: z
    .number({ error: 'Enter the fewest satellites' })
    .int('Use a whole number of satellites')
    .min(4, 'A fix needs at least 4 satellites')
    .max(60, 'At most 60 satellites'),
  maxPdop: z.number({ error: 'Enter the highest PDOP' }).positive('PDOP must be above 0').max(50, 'PDOP must be at most 50'),
  requiredShare: z
    .number({ error: 'Enter the share of the field' })
    .gt(0, 'The share must be above 0 %')
    .lte(1, 'The share must be at most 100 %'),
  requireN1: z.boolean(),
  rateHaPerH: z
    .number({ error: 'Enter the work rate' })
    .positive('The work rate must be above 0')
    .max(1000, 'The work rate must be at most 1000 ha/h'),
  sortOrder: z.number().int().min(0).max(1000),
  active: z.boolean(),
  /** What an hour of a G3-or-worse geomagnetic storm does to this work. */
  stormAction: z.enum(['none', 'tight', 'closed'], { error: 'Choose none, tight or closed for storm hours' }),
}

export const workTypeInputSchema = z.object({
  ...workTypeFields,
  stormAction: workTypeFields.stormAction.default('none'),
  maxV95M: workTypeFields.maxV95M.default(null),
  sortOrder: workTypeFields.sortOrder.default(0),
  active: workTypeFields.active.default(true),
})
export type WorkTypeInput = z.infer<typeof workTypeInputSchema>
export const workTypePatchSchema = z.object(workTypeFields).partial()
export type WorkTypePatch = z.infer<typeof workTypePatchSchema>
export interface WorkType extends WorkTypeInput {
  id: number
}

const machineFields = {
  name: z.string().trim().min(1, 'Enter a name').max(120, 'Use at most 120 characters'),
  crew: z.string().trim().max(120, 'Use at most 120 characters'),
  antennaHeightM: z
    .number({ error: 'Enter the antenna height' })
    .min(0.5, 'Antenna height is at least 0.5 m')
    .max(10, 'Antenna height is at most 10 m'),
  /** Overrides the work type's rate when set. */
  rateHaPerH: z.number().positive('The work rate must be above 0').max(1000, 'The work rate must be at most 1000 ha/h').nullable(),
  active: z.boolean(),
  notes: z.string().trim().max(1000, 'Use at most 1000 characters'),
  /** the user who runs the machine: its passes show in that user's cab view */
  operatorUserId: z.number().int().positive().nullable(),
}

export const machineInputSchema = z.object({
  ...machineFields,
  operatorUserId: machineFields.operatorUserId.default(null),
  crew: machineFields.crew.default(''),
  rateHaPerH: machineFields.rateHaPerH.default(null),
  active: machineFields.active.default(true),
  notes: machineFields.notes.default(''),
})
export type MachineInput = z.infer<typeof machineInputSchema>
export const machinePatchSchema = z.object(machineFields).partial()
export type MachinePatch = z.infer<typeof machinePatchSchema>
export interface Machine extends MachineInput {
  id: number
}

/** State of an hour for a work type (see the product design). */
export const hourStates = ['clear', 'tight', 'closed'] as const
export type HourState = (typeof hourStates)[number]
