// /api/jobs: the job list and the storage report (office and admin) and the summary for the
// progress bar (everyone).
import { Router } from 'express'
import { jobListQuerySchema } from '../../shared/schemas/jobs.ts'
import { requireAuth, requireRole } from '../auth/middleware.ts'
import { parse } from '../http/validate.ts'
import type { Services } from '../services/index.ts'

export function jobRoutes(services: Services): Router {
  const router = Router()

  router.get('/', requireRole('admin', 'office'), async (req, res) => {
    res.json(await services.jobs.list(parse(jobListQuerySchema, req.query, 'query')))
  })

  router.get('/storage', requireRole('admin', 'office'), async (_req, res) => {
    res.json(await services.jobs.storage())
  })

  router.get('/summary', requireAuth, async (_req, res) => {
    res.json(await services.jobs.summary())
  })

  return router
}
