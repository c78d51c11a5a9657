// GET /api/health and GET /api/meta (public).
import { Router } from 'express'
import type { Services } from '../services/index.ts'

export function systemRoutes(services: Services): Router {
  const router = Router()
  router.get('/health', async (_req, res) => {
    const health = await services.meta.health()
    res.status(health.database === 'ok' ? 200 : 503).json(health)
  })
  router.get('/meta', async (_req, res) => {
    res.json(await services.meta.meta())
  })
  return router
}
