import { z } from 'zod'

/** Roles of the one contracting business that runs an installation. */
export const roles = ['admin', 'office', 'contractor', 'client'] as const
export const roleSchema = z.enum(roles)
export type Role = z.infer<typeof roleSchema>

export const unitSystems = ['metric', 'imperial'] as const
export const unitSystemSchema = z.enum(unitSystems)
export type UnitSystem = z.infer<typeof unitSystemSchema>

export const idSchema = z.coerce.number().int().positive()
export const idParamsSchema = z.object({ id: idSchema })

/** Server-side paging, sorting and search for tables. */
export const listQuerySchema = z.object({
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(20),
  sort: z.string().max(40).optional(),
  order: z.enum(['asc', 'desc']).default('asc'),
  q: z.string().trim().max(200).optional(),
})
export type ListQuery = z.infer<typeof listQuerySchema>

export interface Page<T> {
  items: T[]
  total: number
  page: number
  pageSize: number
}

/** Every API error body: a code, a sentence for people, and per-field messages for forms. */
export interface ApiErrorBody {
  error: { code: string; message: string; fields?: Record<string, string> }
}
