// GET /api/fields/:id/windows: find a window for a pass (admins, office staff, contractors).
import { Router } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.ts'
import { windowQuerySchema } from '../../shared/schemas/passes.ts'
import { farmEditorRoles } from '../auth/access.ts'
import { currentAuth, requireRole } from '../auth/middleware.ts'
import { parse } from '../http/validate.ts'
import type { Services } from '../services/index.ts'

export function windowRoutes(services: Services): Router {
  const router = Router()
  router.get('/fields/:id/windows', requireRole(...farmEditorRoles), async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    const query = parse(windowQuerySchema, req.query, 'query')
    res.json(await services.windows.find(currentAuth(req).user, id, query))
  })
  return router
}
