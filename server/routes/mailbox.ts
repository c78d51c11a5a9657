// /api/mailbox: what the local fake SMTP server received (admin and office).
import { Router } from 'express'
import { z } from 'zod'
import { idParamsSchema } from '../../shared/schemas/common.ts'
import { mailboxListQuerySchema } from '../../shared/schemas/mailbox.ts'
import { requireRole } from '../auth/middleware.ts'
import { parse } from '../http/validate.ts'
import type { Services } from '../services/index.ts'

const attachmentParams = idParamsSchema.extend({ index: z.coerce.number().int().min(0).max(1000) })

export function mailboxRoutes(services: Services): Router {
  const router = Router()
  const mailbox = services.mailbox
  router.use(requireRole('admin', 'office'))

  router.get('/', async (req, res) => {
    const query = parse(mailboxListQuerySchema, req.query, 'query')
    res.json(await mailbox.list(query))
  })

  router.get('/:id', async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    res.json(await mailbox.get(id))
  })

  router.get('/:id/attachments/:index', async (req, res) => {
    const { id, index } = parse(attachmentParams, req.params, 'address')
    const file = await mailbox.attachment(id, index)
    // Always a download: an HTML or SVG attachment must not run inside the app's origin.
    res.attachment(file.filename).type(file.contentType).set('Content-Length', String(file.content.length)).send(file.content)
  })

  return router
}
