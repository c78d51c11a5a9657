// /api/farms: everyone signed in lists and reads the farms they may see; admins manage them.
import { Router } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.ts'
import { farmInputSchema, farmListQuerySchema, farmPatchSchema } from '../../shared/schemas/farms.ts'
import { currentAuth, requireAuth, requireRole } from '../auth/middleware.ts'
import { parse } from '../http/validate.ts'
import type { Services } from '../services/index.ts'

export function farmRoutes(services: Services): Router {
  const router = Router()
  const farms = services.farms

  router.get('/', requireAuth, async (req, res) => {
    const query = parse(farmListQuerySchema, req.query, 'query')
    res.json(await farms.list(currentAuth(req).user, query))
  })

  router.get('/:id', requireAuth, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    res.json(await farms.get(currentAuth(req).user, id))
  })

  router.post('/', requireRole('admin'), async (req, res) => {
    const input = parse(farmInputSchema, req.body)
    res.status(201).json(await farms.create(input))
  })

  router.patch('/:id', requireRole('admin'), async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    const input = parse(farmPatchSchema, req.body)
    res.json(await farms.update(id, input))
  })

  router.delete('/:id', requireRole('admin'), async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    await farms.remove(id)
    res.status(204).end()
  })

  return router
}
