// /api/service-levels: every signed-in role reads them; admins manage them.
import type { Router } from 'express'
import { serviceLevelInputSchema, serviceLevelPatchSchema } from '../../shared/schemas/planning.ts'
import type { Services } from '../services/index.ts'
import { adminManagedRoutes } from './adminManaged.ts'

export function serviceLevelRoutes(services: Services): Router {
  return adminManagedRoutes(services.serviceLevels, serviceLevelInputSchema, serviceLevelPatchSchema)
}
