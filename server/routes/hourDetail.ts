// GET /api/fields/:id/hour-detail?hour=ISO: an hour's stored figures, the sample points and
// the sky view; every signed-in user for the farms they may see.
import { Router } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.ts'
import { hourDetailQuerySchema } from '../../shared/schemas/passes.ts'
import { currentAuth, requireAuth } from '../auth/middleware.ts'
import { parse } from '../http/validate.ts'
import type { Services } from '../services/index.ts'

export function hourDetailRoutes(services: Services): Router {
  const router = Router()
  router.get('/fields/:id/hour-detail', requireAuth, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    const { hour } = parse(hourDetailQuerySchema, req.query, 'query')
    res.json(await services.hourDetail.get(currentAuth(req).user, id, hour))
  })
  return router
}
