// /api/service-levels: every signed-in role reads them; admins manage them.
import { Router } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.ts'
import { serviceLevelInputSchema, serviceLevelPatchSchema } from '../../shared/schemas/planning.ts'
import { requireAuth, requireRole } from '../auth/middleware.ts'
import { parse } from '../http/validate.ts'
import type { Services } from '../services/index.ts'

export function serviceLevelRoutes(services: Services): Router {
  const router = Router()
  const levels = services.serviceLevels

  router.get('/', requireAuth, async (_req, res) => {
    res.json(await levels.list())
  })

  router.get('/:id', requireAuth, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    res.json(await levels.get(id))
  })

  router.post('/', requireRole('admin'), async (req, res) => {
    res.status(201).json(await levels.create(parse(serviceLevelInputSchema, req.body)))
  })

  router.patch('/:id', requireRole('admin'), async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    res.json(await levels.update(id, parse(serviceLevelPatchSchema, req.body)))
  })

  router.delete('/:id', requireRole('admin'), async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    await levels.remove(id)
    res.status(204).end()
  })

  return router
}
