// A farm's elevation model: GET/POST/DELETE /api/farms/:id/terrain (POST multipart: `file`,
// a GeoTIFF or an ESRI ASCII grid, and optionally `prj`, the text of the grid's .prj), and
// GET /api/farms/:id/terrain/horizon?latDeg&lonDeg&antennaHeightM for the sky check.
// Everyone who may see the farm reads; admins, office staff and contractors upload and remove.
import { Router } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.ts'
import { terrainHorizonQuerySchema } from '../../shared/schemas/terrain.ts'
import { farmEditorRoles } from '../auth/access.ts'
import { currentAuth, requireAuth, requireRole } from '../auth/middleware.ts'
import { parse } from '../http/validate.ts'
import { singleFileUpload } from '../imports/upload.ts'
import type { Services } from '../services/index.ts'

/**
 * `maxFileBytes`: the upload limit (TERRAIN_FILE_MAX_MB, 64 MB by default: a 2000 x 2000
 * ASCII grid with a few digits per height fits); larger files are refused with 413.
 */
export function terrainRoutes(services: Services, options: { maxFileBytes: number }): Router {
  const router = Router()
  const terrain = services.terrain
  const upload = singleFileUpload('file', options.maxFileBytes, 'elevation model file')

  router.get('/farms/:id/terrain', requireAuth, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    res.json({ model: await terrain.get(currentAuth(req).user, id) })
  })

  router.get('/farms/:id/terrain/horizon', requireAuth, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    const q = parse(terrainHorizonQuerySchema, req.query, 'query')
    res.json(await terrain.horizon(currentAuth(req).user, id, q))
  })

  router.post('/farms/:id/terrain', requireRole(...farmEditorRoles), upload, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    const prj = (req.body as { prj?: unknown } | undefined)?.prj
    res.status(201).json(await terrain.upload(currentAuth(req).user, id, req.file, typeof prj === 'string' ? prj : null))
  })

  router.delete('/farms/:id/terrain', requireRole(...farmEditorRoles), async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    await terrain.remove(currentAuth(req).user, id)
    res.status(204).end()
  })

  return router
}
