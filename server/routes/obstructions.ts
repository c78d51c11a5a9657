// A farm's obstructions: /api/farms/:id/obstructions and /api/obstructions/:id. Everyone
// signed in reads those of the farms they may see; admins, office staff and contractors edit.
import { Router } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.ts'
import { obstructionInputSchema, obstructionPatchSchema } from '../../shared/schemas/fields.ts'
import { farmEditorRoles } from '../auth/access.ts'
import { currentAuth, requireAuth, requireRole } from '../auth/middleware.ts'
import { parse } from '../http/validate.ts'
import type { Services } from '../services/index.ts'

export function obstructionRoutes(services: Services): Router {
  const router = Router()
  const obstructions = services.obstructions

  router.get('/farms/:id/obstructions', requireAuth, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    res.json(await obstructions.list(currentAuth(req).user, id))
  })

  router.post('/farms/:id/obstructions', requireRole(...farmEditorRoles), async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    const input = parse(obstructionInputSchema, req.body)
    res.status(201).json(await obstructions.create(currentAuth(req).user, id, input))
  })

  router.patch('/obstructions/:id', requireRole(...farmEditorRoles), async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    const patch = parse(obstructionPatchSchema, req.body)
    res.json(await obstructions.update(currentAuth(req).user, id, patch))
  })

  router.delete('/obstructions/:id', requireRole(...farmEditorRoles), async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    await obstructions.remove(currentAuth(req).user, id)
    res.status(204).end()
  })

  return router
}
