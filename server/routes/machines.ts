// /api/machines: machines and their crews; every signed-in role reads them, admins manage them.
import type { Router } from 'express'
import { machineInputSchema, machinePatchSchema } from '../../shared/schemas/planning.ts'
import type { Services } from '../services/index.ts'
import { adminManagedRoutes } from './adminManaged.ts'

export function machineRoutes(services: Services): Router {
  return adminManagedRoutes(services.machines, machineInputSchema, machinePatchSchema)
}
