// /api/work-types: every signed-in role reads them; admins manage them.
import type { Router } from 'express'
import { workTypeInputSchema, workTypePatchSchema } from '../../shared/schemas/planning.ts'
import type { Services } from '../services/index.ts'
import { adminManagedRoutes } from './adminManaged.ts'

export function workTypeRoutes(services: Services): Router {
  return adminManagedRoutes(services.workTypes, workTypeInputSchema, workTypePatchSchema)
}
