// Weekly plans: preview, send, the send log, a revision as sent, resend, the automatic send's
// settings and opt-outs (admins and office staff). The opt-out link of the e-mails is public:
// GET shows a small confirmation page (nothing changes on GET, so mail scanners that open
// links do not opt anybody out), its form POSTs the token back.
import express, { Router } from 'express'
import { z } from 'zod'
import { idParamsSchema, idSchema } from '../../shared/schemas/common.ts'
import {
  optOutTokenSchema,
  planLogQuerySchema,
  planPreviewSchema,
  planResendSchema,
  planScheduleInputSchema,
  planSendSchema,
} from '../../shared/schemas/plans.ts'
import { currentAuth, requireRole } from '../auth/middleware.ts'
import { HttpError } from '../http/errors.ts'
import { parse } from '../http/validate.ts'
import { brokenLinkPage, optedOutPage, optOutQuestionPage } from '../mail/optOutPages.ts'
import type { Services } from '../services/index.ts'

export function planRoutes(services: Services): Router {
  const router = Router()
  const { plans } = services
  const staff = requireRole('admin', 'office')

  router.get('/plans/weeks', staff, async (req, res) => {
    const { farmId } = parse(z.object({ farmId: idSchema }), req.query, 'query')
    res.json(await plans.weeks(currentAuth(req).user, farmId))
  })

  router.post('/plans/preview', staff, async (req, res) => {
    const input = parse(planPreviewSchema.extend({ extraRecipients: planSendSchema.shape.extraRecipients }), req.body)
    res.json(await plans.preview(currentAuth(req).user, input))
  })

  router.post('/plans/send', staff, async (req, res) => {
    const input = parse(planSendSchema, req.body)
    const result = await plans.send(currentAuth(req).user, input)
    res.status(result.queued.length ? 202 : 200).json(result)
  })

  router.get('/plans/sends', staff, async (req, res) => {
    const query = parse(planLogQuerySchema, req.query, 'query')
    res.json(await plans.log(currentAuth(req).user, query))
  })

  router.get('/plans/revisions/:id', staff, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    const { recipient } = parse(z.object({ recipient: z.string().trim().max(254).optional() }), req.query, 'query')
    res.json(await plans.revision(currentAuth(req).user, id, recipient))
  })

  router.post('/plans/revisions/:id/resend', staff, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    const input = parse(planResendSchema, req.body)
    const result = await plans.resend(currentAuth(req).user, id, input.recipients)
    res.status(result.queued.length ? 202 : 200).json(result)
  })

  router.get('/farms/:id/plan-schedule', staff, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    res.json(await plans.schedule(currentAuth(req).user, id))
  })

  router.put('/farms/:id/plan-schedule', staff, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    const input = parse(planScheduleInputSchema, req.body)
    res.json(await plans.setSchedule(currentAuth(req).user, id, input))
  })

  router.get('/farms/:id/plan-opt-outs', staff, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    res.json(await plans.optOuts(currentAuth(req).user, id))
  })

  router.delete('/farms/:id/plan-opt-outs/:email', staff, async (req, res) => {
    const { id, email } = parse(idParamsSchema.extend({ email: z.string().trim().toLowerCase().min(3).max(254) }), req.params, 'address')
    await plans.reinclude(currentAuth(req).user, id, email)
    res.status(204).end()
  })

  // ---- public: the opt-out link of the e-mails ----
  router.get('/plans/opt-out', async (req, res) => {
    res.set('Cache-Control', 'no-store').type('html')
    try {
      const { token } = parse(optOutTokenSchema, req.query, 'link')
      const info = await plans.optOutInfo(token)
      res.send(info.optedOut ? optedOutPage(info, true) : optOutQuestionPage(info, token))
    } catch (error) {
      const status = error instanceof HttpError ? error.status : 500
      if (status >= 500) throw error
      res.status(status).send(brokenLinkPage((error as Error).message))
    }
  })

  // The confirmation page's form posts application/x-www-form-urlencoded.
  router.post('/plans/opt-out', express.urlencoded({ extended: false, limit: '4kb' }), async (req, res) => {
    const wantsHtml = !req.is('application/json')
    try {
      const { token } = parse(optOutTokenSchema, req.body, 'link')
      const info = await plans.optOut(token)
      if (!wantsHtml) {
        res.json(info)
        return
      }
      res.type('html').send(optedOutPage(info, false))
    } catch (error) {
      const status = error instanceof HttpError ? error.status : 500
      if (status >= 500 || !wantsHtml) throw error
      res.status(status).type('html').send(brokenLinkPage((error as Error).message))
    }
  })

  return router
}
