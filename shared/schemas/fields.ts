import { z } from 'zod'
import { boundarySchema, obstructionGeometrySchema, type Boundary, type ObstructionGeometry } from './geo'

// The fields without defaults: a PATCH must change only what it sends.
const fieldShape = {
  name: z.string().trim().min(1, 'Enter the field name').max(120),
  crop: z.string().trim().max(80),
  notes: z.string().trim().max(4000),
  serviceLevelId: z.number().int().positive(),
  antennaHeightM: z.number().min(0.5, 'Antenna height is at least 0.5 m').max(10, 'Antenna height is at most 10 m'),
  boundary: boundarySchema,
  /** Set when the user confirmed an unusually large (> 2,000 ha) or small (< 0.05 ha) field. */
  confirmUnusualArea: z.boolean(),
}
export const fieldInputSchema = z.object({
  ...fieldShape,
  crop: fieldShape.crop.default(''),
  notes: fieldShape.notes.default(''),
  antennaHeightM: fieldShape.antennaHeightM.default(3.5),
  confirmUnusualArea: fieldShape.confirmUnusualArea.default(false),
})
export type FieldInput = z.infer<typeof fieldInputSchema>
export const fieldPatchSchema = z.object(fieldShape).partial()
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
  /** The same area in acres (1 ha = 2.4710538 ac). */
  areaAc: number
  centroid: { latDeg: number; lonDeg: number }
  revision: number
  createdAt: string
  updatedAt: string
}

export const obstructionKinds = ['deciduous', 'evergreen', 'structure'] as const
const monthDay = z.string().regex(/^(0[1-9]|1[0-2])-(0[1-9]|[12]\d|3[01])$/, 'Use MM-DD, e.g. 11-15')

const obstructionShape = {
  kind: z.enum(obstructionKinds),
  heightM: z.number().min(0.5, 'Height is at least 0.5 m').max(60, 'Height is at most 60 m'),
  geometry: obstructionGeometrySchema,
  leaflessFrom: monthDay.nullable(),
  leaflessTo: monthDay.nullable(),
  note: z.string().trim().max(1000),
}
export const obstructionInputSchema = z.object({
  ...obstructionShape,
  leaflessFrom: obstructionShape.leaflessFrom.default(null),
  leaflessTo: obstructionShape.leaflessTo.default(null),
  note: obstructionShape.note.default(''),
})
export type ObstructionInput = z.infer<typeof obstructionInputSchema>
/** A PATCH changes only what it sends (no defaults). */
export const obstructionPatchSchema = z.object(obstructionShape).partial()
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

/** Area limits outside which saving a field needs `confirmUnusualArea: true` (else 422, code 'confirm-area'). */
export const UNUSUAL_AREA_LIMITS_HA = { min: 0.05, max: 2000 } as const

// ---------------------------------------------------------------------------------------
// Boundary uploads: POST /api/farms/:id/fields/import/preview (or ?preview=1), multipart
// `file`; then POST /api/farms/:id/fields/import, multipart `file` + `options` (JSON text
// of fieldImportOptionsSchema). The server keeps nothing between the two steps.

export const boundaryFileFormats = ['geojson', 'kml', 'kmz', 'shapefile', 'isoxml'] as const
export type BoundaryFileFormat = (typeof boundaryFileFormats)[number]

/** One polygon feature found in an uploaded file. */
export interface ImportFeature {
  /** Position among the file's polygon features (0-based); what `selections[].index` names. */
  index: number
  /** Polygon or MultiPolygon, WGS-84 lon/lat (reprojected when the file was not). */
  geometry: Boundary
  /** The feature's attributes as read (values are strings, numbers, booleans or null). */
  properties: Record<string, string | number | boolean | null>
  /** Area in ha (null when the geometry is too broken to measure). */
  areaHa: number | null
  areaAc: number | null
  /** Why this feature cannot become a field as it is (empty: it can). */
  problems: string[]
  /** True when the area is outside UNUSUAL_AREA_LIMITS_HA (import needs confirmUnusualArea). */
  unusualArea: boolean
  /** A name taken from the first name-like attribute (name, Name, NAME, FIELD_NAME, ...), or ''. */
  suggestedName: string
}

export interface ImportPreview {
  format: BoundaryFileFormat
  fileName: string
  /** Where coordinates were reprojected from, e.g. 'NAD_1983_UTM_Zone_15N'; null when already WGS-84. */
  sourceCrs: string | null
  features: ImportFeature[]
  /** Attribute names seen on any feature, in first-seen order (for the name picker). */
  attributes: string[]
  /** Features that are not polygons (points, lines) and were left out, counted by type. */
  ignored: Record<string, number>
}

export const fieldImportOptionsSchema = z
  .object({
    selections: z
      .array(
        z.object({
          index: z.number().int().min(0),
          /** The field name; when empty, taken from `nameAttribute`. */
          name: z.string().trim().max(120).default(''),
        }),
      )
      .min(1, 'Choose at least one feature')
      .max(500),
    nameAttribute: z.string().max(120).optional(),
    serviceLevelId: z.number().int().positive(),
    antennaHeightM: z.number().min(0.5, 'Antenna height is at least 0.5 m').max(10, 'Antenna height is at most 10 m').default(3.5),
    crop: z.string().trim().max(80).default(''),
    confirmUnusualArea: z.boolean().default(false),
  })
  .refine((o) => new Set(o.selections.map((s) => s.index)).size === o.selections.length, {
    message: 'A feature is chosen twice',
    path: ['selections'],
  })
export type FieldImportOptions = z.infer<typeof fieldImportOptionsSchema>

export interface FieldImportResult {
  created: Field[]
}
