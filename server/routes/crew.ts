// /api/crew/week: the signed-in crew member's week for the cab view (admins, office staff
// and contractors; a farm client runs no machine).
import { Router } from 'express'
import { farmEditorRoles } from '../auth/access.ts'
import { currentAuth, requireRole } from '../auth/middleware.ts'
import type { Services } from '../services/index.ts'

export function crewRoutes(services: Services): Router {
  const router = Router()
  router.get('/week', requireRole(...farmEditorRoles), async (req, res) => {
    res.json(await services.crew.week(currentAuth(req).user))
  })
  return router
}
