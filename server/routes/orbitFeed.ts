// The orbit feed: the local fake feed (GET /api/orbit-feed/nominal.json, open to all: it
// holds only the published nominal constellations), a run now and the status for office
// staff and admins.
import { Router } from 'express'
import { currentAuth, requireRole } from '../auth/middleware.ts'
import type { Services } from '../services/index.ts'
import { nominalFeedOmm } from '../services/orbitFeed.ts'

export function orbitFeedRoutes(services: Services): Router {
  const router = Router()
  const feed = services.orbitFeed
  const orbitStaff = requireRole('admin', 'office')

  router.get('/nominal.json', (_req, res) => {
    res.set('Cache-Control', 'public, max-age=3600').json(nominalFeedOmm(Date.now()))
  })

  router.post('/run', orbitStaff, async (req, res) => {
    res.json(await feed.run(currentAuth(req).user.id))
  })

  router.get('/status', orbitStaff, async (_req, res) => {
    res.json(await feed.status())
  })

  return router
}
