// Fields of a farm: /api/farms/:id/fields and /api/fields/:id. Everyone signed in reads the
// fields of the farms they may see; admins, office staff and contractors edit them.
import { Router } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.ts'
import { fieldInputSchema, fieldPatchSchema } from '../../shared/schemas/fields.ts'
import { farmEditorRoles } from '../auth/access.ts'
import { currentAuth, requireAuth, requireRole } from '../auth/middleware.ts'
import { parse } from '../http/validate.ts'
import type { Services } from '../services/index.ts'

export function fieldRoutes(services: Services): Router {
  const router = Router()
  const fields = services.fields

  router.get('/farms/:id/fields', requireAuth, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    res.json(await fields.list(currentAuth(req).user, id))
  })

  router.post('/farms/:id/fields', requireRole(...farmEditorRoles), async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    const input = parse(fieldInputSchema, req.body)
    res.status(201).json(await fields.create(currentAuth(req).user, id, input))
  })

  router.get('/fields/:id', requireAuth, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    res.json(await fields.get(currentAuth(req).user, id))
  })

  router.patch('/fields/:id', requireRole(...farmEditorRoles), async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    const patch = parse(fieldPatchSchema, req.body)
    res.json(await fields.update(currentAuth(req).user, id, patch))
  })

  router.delete('/fields/:id', requireRole(...farmEditorRoles), async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    await fields.remove(currentAuth(req).user, id)
    res.status(204).end()
  })

  return router
}
