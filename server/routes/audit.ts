// /api/audit: the audit log of admin actions (admins only), newest first.
import { Router } from 'express'
import { auditListQuerySchema } from '../../shared/schemas/audit.ts'
import { requireRole } from '../auth/middleware.ts'
import { parse } from '../http/validate.ts'
import type { Services } from '../services/index.ts'

export function auditRoutes(services: Services): Router {
  const router = Router()
  router.get('/', requireRole('admin'), async (req, res) => {
    res.json(await services.audit.list(parse(auditListQuerySchema, req.query, 'query')))
  })
  return router
}
