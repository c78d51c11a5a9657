// Orbit sets (/api/orbit-sets), the active choice per constellation (/api/orbits/active):
// office staff and admins. The orbit data for browsers and jobs (/api/orbit-data): everyone
// signed in, with an ETag so the browser can revalidate instead of downloading again.
import { Router } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.ts'
import { activeOrbitsPutSchema, orbitUploadSchema } from '../../shared/schemas/orbits.ts'
import { currentAuth, requireAuth, requireRole } from '../auth/middleware.ts'
import { MB, singleFileUpload } from '../imports/upload.ts'
import { parse } from '../http/validate.ts'
import type { Services } from '../services/index.ts'

/** Orbit files are text: a full public GNSS element set is well under 1 MB. */
export const ORBIT_FILE_MAX_BYTES = 10 * MB

export function orbitRoutes(services: Services): Router {
  const router = Router()
  const orbits = services.orbits
  const orbitStaff = requireRole('admin', 'office')

  router.get('/orbit-sets', orbitStaff, async (_req, res) => {
    res.json(await orbits.list())
  })

  router.post('/orbit-sets', orbitStaff, singleFileUpload('file', ORBIT_FILE_MAX_BYTES), async (req, res) => {
    const input = parse(orbitUploadSchema, req.body)
    res.status(201).json(await orbits.upload(currentAuth(req).user.id, input, req.file))
  })

  router.get('/orbit-sets/:id', orbitStaff, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    res.json(await orbits.get(id))
  })

  router.delete('/orbit-sets/:id', orbitStaff, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    await orbits.remove(id)
    res.status(204).end()
  })

  router.get('/orbits/active', orbitStaff, async (_req, res) => {
    res.json(await orbits.active())
  })

  router.put('/orbits/active', orbitStaff, async (req, res) => {
    const list = parse(activeOrbitsPutSchema, req.body)
    res.json(await orbits.setActive(list))
  })

  router.get('/orbit-data', requireAuth, async (req, res) => {
    const data = await orbits.orbitData()
    const etag = `"${data.version}"`
    res.set('Cache-Control', 'private, no-cache').set('ETag', etag)
    if (req.get('if-none-match') === etag) {
      res.status(304).end()
      return
    }
    res.json(data)
  })

  return router
}
