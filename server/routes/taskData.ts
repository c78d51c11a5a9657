// /api/farms/:id/taskdata.zip and /api/farms/:id/taskdata.xml: a farm's fields and planned
// passes as ISO 11783-10 task data for farm terminals. Everyone who may see the farm.
import { Router } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.ts'
import { currentAuth, requireAuth } from '../auth/middleware.ts'
import { parse } from '../http/validate.ts'
import type { Services } from '../services/index.ts'

export function taskDataRoutes(services: Services): Router {
  const router = Router()
  router.get('/farms/:id/taskdata.zip', requireAuth, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    const file = await services.taskData.zip(currentAuth(req).user, id)
    res.type('application/zip').attachment(file.filename).send(file.content)
  })
  router.get('/farms/:id/taskdata.xml', requireAuth, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    const file = await services.taskData.xml(currentAuth(req).user, id)
    res.type('application/xml; charset=utf-8').attachment(file.filename).send(file.content)
  })
  return router
}
