// Satellite outages (/api/outages): office staff and admins list, enter, edit and remove them.
// Everyone signed in receives the current ones with GET /api/orbit-data.
import { Router } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.ts'
import { outageInputSchema, outageListQuerySchema, outagePatchSchema } from '../../shared/schemas/orbits.ts'
import { currentAuth, requireRole } from '../auth/middleware.ts'
import { parse } from '../http/validate.ts'
import type { Services } from '../services/index.ts'

export function outageRoutes(services: Services): Router {
  const router = Router()
  const outages = services.outages
  const orbitStaff = requireRole('admin', 'office')

  router.get('/', orbitStaff, async (req, res) => {
    const query = parse(outageListQuerySchema, req.query, 'query')
    res.json(await outages.list(query))
  })

  router.post('/', orbitStaff, async (req, res) => {
    const input = parse(outageInputSchema, req.body)
    res.status(201).json(await outages.create(currentAuth(req).user.id, input))
  })

  router.patch('/:id', orbitStaff, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    const patch = parse(outagePatchSchema, req.body)
    res.json(await outages.update(id, patch))
  })

  router.delete('/:id', orbitStaff, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    await outages.remove(id)
    res.status(204).end()
  })

  return router
}
