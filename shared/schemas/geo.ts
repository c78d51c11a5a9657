import { z } from 'zod'

/** A WGS-84 position [longitude, latitude] in degrees (GeoJSON order). */
export const positionSchema = z
  .tuple([z.number().gte(-180).lte(180), z.number().gte(-90).lte(90)])
  .rest(z.number())
  .transform((p) => [p[0], p[1]] as [number, number])

const ringSchema = z.array(positionSchema).min(4, 'A ring needs at least 4 positions (first = last)')

export const polygonSchema = z.object({
  type: z.literal('Polygon'),
  coordinates: z.array(ringSchema).min(1, 'A polygon needs an outer ring').max(200),
})
export const multiPolygonSchema = z.object({
  type: z.literal('MultiPolygon'),
  coordinates: z.array(z.array(ringSchema).min(1).max(200)).min(1).max(200),
})
export const lineStringSchema = z.object({
  type: z.literal('LineString'),
  coordinates: z.array(positionSchema).min(2, 'A line needs at least 2 positions').max(5000),
})

export const boundarySchema = z.discriminatedUnion('type', [polygonSchema, multiPolygonSchema])
export type Boundary = z.infer<typeof boundarySchema>
export const obstructionGeometrySchema = z.discriminatedUnion('type', [lineStringSchema, polygonSchema])
export type ObstructionGeometry = z.infer<typeof obstructionGeometrySchema>
