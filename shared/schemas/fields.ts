import { z } from 'zod'
import { boundarySchema, obstructionGeometrySchema, type Boundary, type ObstructionGeometry } from './geo'

export const fieldInputSchema = z.object({
  name: z.string().trim().min(1, 'Enter the field name').max(120),
  crop: z.string().trim().max(80).default(''),
  notes: z.string().trim().max(4000).default(''),
  serviceLevelId: z.number().int().positive(),
  antennaHeightM: z.number().min(0.5, 'Antenna height is at least 0.5 m').max(10, 'Antenna height is at most 10 m').default(3.5),
  boundary: boundarySchema,
  /** Set when the user confirmed an unusually large (> 2,000 ha) or small (< 0.05 ha) field. */
  confirmUnusualArea: z.boolean().default(false),
})
export type FieldInput = z.infer<typeof fieldInputSchema>
export const fieldPatchSchema = fieldInputSchema.partial()
export type FieldPatch = z.infer<typeof fieldPatchSchema>

export interface Field {
  id: number
  farmId: number
  name: string
  crop: string
  notes: string
  serviceLevelId: number
  antennaHeightM: number
  boundary: Boundary
  areaHa: number
  centroid: { latDeg: number; lonDeg: number }
  revision: number
  createdAt: string
  updatedAt: string
}

export const obstructionKinds = ['deciduous', 'evergreen', 'structure'] as const
const monthDay = z.string().regex(/^(0[1-9]|1[0-2])-(0[1-9]|[12]\d|3[01])$/, 'Use MM-DD, e.g. 11-15')

export const obstructionInputSchema = z.object({
  kind: z.enum(obstructionKinds),
  heightM: z.number().min(0.5, 'Height is at least 0.5 m').max(60, 'Height is at most 60 m'),
  geometry: obstructionGeometrySchema,
  leaflessFrom: monthDay.nullable().default(null),
  leaflessTo: monthDay.nullable().default(null),
  note: z.string().trim().max(1000).default(''),
})
export type ObstructionInput = z.infer<typeof obstructionInputSchema>
export const obstructionPatchSchema = obstructionInputSchema.partial()
export type ObstructionPatch = z.infer<typeof obstructionPatchSchema>

export interface Obstruction {
  id: number
  farmId: number
  kind: (typeof obstructionKinds)[number]
  heightM: number
  geometry: ObstructionGeometry
  leaflessFrom: string | null
  leaflessTo: string | null
  note: string
  createdAt: string
  updatedAt: string
}
