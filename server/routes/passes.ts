// /api/passes: everyone signed in lists and reads the passes of the farms they may see
// (clients: their own farms, read-only); admins, office staff and contractors book and
// change them. /api/passes.csv exports a farm's passes in farm-local time.
import { Router } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.ts'
import {
  atRiskQuerySchema,
  passCsvQuerySchema,
  passInputSchema,
  passListQuerySchema,
  passNoteSchema,
  passPatchSchema,
  passStatusChangeSchema,
} from '../../shared/schemas/passes.ts'
import { farmEditorRoles } from '../auth/access.ts'
import { currentAuth, requireAuth, requireRole } from '../auth/middleware.ts'
import { parse } from '../http/validate.ts'
import type { Services } from '../services/index.ts'

export function passRoutes(services: Services): Router {
  const router = Router()
  const { passes, atRisk, exports } = services
  const editors = requireRole(...farmEditorRoles)

  router.get('/passes', requireAuth, async (req, res) => {
    const query = parse(passListQuerySchema, req.query, 'query')
    res.json(await passes.list(currentAuth(req).user, query))
  })

  router.get('/passes.csv', requireAuth, async (req, res) => {
    const query = parse(passCsvQuerySchema, req.query, 'query')
    const file = await exports.passesCsv(currentAuth(req).user, query)
    res.type('text/csv; charset=utf-8').attachment(file.filename).send(file.content)
  })

  router.get('/passes/at-risk', requireAuth, async (req, res) => {
    const query = parse(atRiskQuerySchema, req.query, 'query')
    res.json(await atRisk.list(currentAuth(req).user, query))
  })

  router.get('/passes/:id', requireAuth, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    res.json(await passes.get(currentAuth(req).user, id))
  })

  router.post('/passes', editors, async (req, res) => {
    const input = parse(passInputSchema, req.body)
    res.status(201).json(await passes.create(currentAuth(req).user, input))
  })

  router.patch('/passes/:id', editors, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    const patch = parse(passPatchSchema, req.body)
    res.json(await passes.update(currentAuth(req).user, id, patch))
  })

  router.post('/passes/:id/cancel', editors, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    res.json(await passes.cancel(currentAuth(req).user, id))
  })

  router.post('/passes/:id/done', editors, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    res.json(await passes.done(currentAuth(req).user, id))
  })

  router.post('/passes/:id/status', editors, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    const change = parse(passStatusChangeSchema, req.body)
    res.json(await passes.setStatus(currentAuth(req).user, id, change))
  })

  router.post('/passes/:id/notes', editors, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    const note = parse(passNoteSchema, req.body)
    res.json(await passes.addNote(currentAuth(req).user, id, note))
  })

  return router
}
