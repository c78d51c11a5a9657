// Boundary uploads: POST /api/farms/:id/fields/import/preview (or .../import?preview=1)
// reads a file and lists its polygons; POST /api/farms/:id/fields/import creates the chosen
// ones as fields (multipart: `file`, plus `options` as JSON text). Field editors only.
import { Router } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.ts'
import { fieldImportOptionsSchema } from '../../shared/schemas/fields.ts'
import { farmEditorRoles } from '../auth/access.ts'
import { currentAuth, requireRole } from '../auth/middleware.ts'
import { badRequest } from '../http/errors.ts'
import { parse } from '../http/validate.ts'
import { MB, singleFileUpload } from '../imports/upload.ts'
import type { Services } from '../services/index.ts'

export const BOUNDARY_FILE_MAX_BYTES = 10 * MB

function optionsOf(body: unknown): unknown {
  const raw = (body as { options?: unknown } | undefined)?.options
  if (typeof raw !== 'string' || raw.trim() === '') {
    throw badRequest('Send the import choices as JSON text in the form field "options".', { options: 'Required.' })
  }
  try {
    return JSON.parse(raw)
  } catch {
    throw badRequest('The form field "options" is not valid JSON.', { options: 'Not valid JSON.' })
  }
}

export function importRoutes(services: Services): Router {
  const router = Router()
  const imports = services.imports
  const upload = singleFileUpload('file', BOUNDARY_FILE_MAX_BYTES)

  router.post('/farms/:id/fields/import/preview', requireRole(...farmEditorRoles), upload, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    res.json(await imports.preview(currentAuth(req).user, id, req.file))
  })

  router.post('/farms/:id/fields/import', requireRole(...farmEditorRoles), upload, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    if (req.query.preview === '1' || req.query.preview === 'true') {
      res.json(await imports.preview(currentAuth(req).user, id, req.file))
      return
    }
    const options = parse(fieldImportOptionsSchema, optionsOf(req.body), 'import choices')
    res.status(201).json(await imports.importFields(currentAuth(req).user, id, req.file, options))
  })

  return router
}
