// /api/machines: machines and their crews; every signed-in role reads them, admins manage them.
import { Router } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.ts'
import { machineInputSchema, machinePatchSchema } from '../../shared/schemas/planning.ts'
import { requireAuth, requireRole } from '../auth/middleware.ts'
import { parse } from '../http/validate.ts'
import type { Services } from '../services/index.ts'

export function machineRoutes(services: Services): Router {
  const router = Router()
  const items = services.machines

  router.get('/', requireAuth, async (_req, res) => {
    res.json(await items.list())
  })

  router.get('/:id', requireAuth, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    res.json(await items.get(id))
  })

  router.post('/', requireRole('admin'), async (req, res) => {
    res.status(201).json(await items.create(parse(machineInputSchema, req.body)))
  })

  router.patch('/:id', requireRole('admin'), async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    res.json(await items.update(id, parse(machinePatchSchema, req.body)))
  })

  router.delete('/:id', requireRole('admin'), async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    await items.remove(id)
    res.status(204).end()
  })

  return router
}
