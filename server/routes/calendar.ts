// Calendar feeds: GET /api/calendar/:token.ics needs no session (the token is the key);
// links are listed and created per farm (admins and office staff; clients for their own
// farms) and revoked by id.
import { Router } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.ts'
import { calendarTokenInputSchema } from '../../shared/schemas/passes.ts'
import { currentAuth, requireRole } from '../auth/middleware.ts'
import { parse } from '../http/validate.ts'
import type { Services } from '../services/index.ts'

export function calendarRoutes(services: Services): Router {
  const router = Router()
  const { calendar } = services
  const linkRoles = requireRole('admin', 'office', 'client')

  router.get('/calendar/:token.ics', async (req, res) => {
    const file = await calendar.feed(String(req.params.token))
    res.type('text/calendar; charset=utf-8').set('Content-Disposition', `inline; filename="${file.filename}"`).send(file.content)
  })

  router.get('/farms/:id/calendar-tokens', linkRoles, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    res.json(await calendar.listTokens(currentAuth(req).user, id))
  })

  router.post('/farms/:id/calendar-tokens', linkRoles, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    const input = parse(calendarTokenInputSchema, req.body)
    res.status(201).json(await calendar.createToken(currentAuth(req).user, id, input))
  })

  router.delete('/calendar-tokens/:id', linkRoles, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    await calendar.revokeToken(currentAuth(req).user, id)
    res.status(204).end()
  })

  return router
}
