// Stored forecasts and the manual recompute:
//   GET  /api/fields/:id/forecast?from&to   every signed-in role (clients: their farms)
//   GET  /api/farms/:id/forecast?from&to    every signed-in role (clients: their farms)
//   POST /api/fields/:id/recompute          admin, office, contractor -> 202 + the job
import { Router } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.ts'
import { forecastQuerySchema } from '../../shared/schemas/forecast.ts'
import { currentAuth, requireAuth, requireRole } from '../auth/middleware.ts'
import { parse } from '../http/validate.ts'
import type { Services } from '../services/index.ts'

export function forecastRoutes(services: Services): Router {
  const router = Router()

  router.get('/fields/:id/forecast', requireAuth, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    const query = parse(forecastQuerySchema, req.query, 'query')
    const acceptsGzip = req.acceptsEncodings('gzip', 'identity') === 'gzip'
    const { parts, etag, encoding } = await services.forecasts.fieldBody(currentAuth(req).user, id, query, acceptsGzip)
    // Revalidated on every use: an unchanged week answers 304 without a body.
    res.set('Cache-Control', 'private, no-cache').set('ETag', etag).vary('Accept-Encoding')
    if (encoding) res.set('Content-Encoding', encoding)
    if (req.fresh) {
      res.status(304).end()
      return
    }
    // The stored hours are one shared buffer: written as they are, not copied into one body.
    res.type('json').set('Content-Length', String(parts.reduce((n, b) => n + b.length, 0)))
    if (req.method === 'HEAD') {
      res.end()
      return
    }
    for (const part of parts.slice(0, -1)) res.write(part)
    res.end(parts.at(-1))
  })

  router.get('/farms/:id/forecast', requireAuth, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    const query = parse(forecastQuerySchema, req.query, 'query')
    res.json(await services.forecasts.farm(currentAuth(req).user, id, query))
  })

  router.post('/fields/:id/recompute', requireRole('admin', 'office', 'contractor'), async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    res.status(202).json(await services.jobs.recompute(currentAuth(req).user, id))
  })

  return router
}
