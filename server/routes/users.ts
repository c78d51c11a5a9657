// /api/users: user administration (admins only).
import { Router } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.ts'
import { userInviteSchema, userListQuerySchema, userPatchSchema } from '../../shared/schemas/users.ts'
import { currentAuth, requireRole } from '../auth/middleware.ts'
import { parse } from '../http/validate.ts'
import type { Services } from '../services/index.ts'

export function userRoutes(services: Services): Router {
  const router = Router()
  const users = services.users
  router.use(requireRole('admin'))

  router.get('/', async (req, res) => {
    const query = parse(userListQuerySchema, req.query, 'query')
    res.json(await users.list(query))
  })

  router.get('/:id', async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    res.json(await users.get(id))
  })

  router.post('/', async (req, res) => {
    const input = parse(userInviteSchema, req.body)
    res.status(201).json(await users.invite(currentAuth(req).user, input))
  })

  router.patch('/:id', async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    const input = parse(userPatchSchema, req.body)
    res.json(await users.update(currentAuth(req).user, id, input))
  })

  router.post('/:id/resend-invite', async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    await users.resendInvite(currentAuth(req).user, id)
    res.status(204).end()
  })

  return router
}
