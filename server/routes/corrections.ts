// RTK base stations, correction networks, a field's correction source and the space-weather
// (Kp) feed. Every signed-in role reads the sources (clients only those their farms use);
// admins and office staff manage them; farm editors choose a field's source. The local fake
// Kp feed is open to all: it holds only invented demo values.
import { Router } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.ts'
import {
  baseStationInputSchema,
  baseStationPatchSchema,
  fieldCorrectionInputSchema,
  networkInputSchema,
  networkPatchSchema,
} from '../../shared/schemas/corrections.ts'
import { farmEditorRoles } from '../auth/access.ts'
import { currentAuth, requireAuth, requireRole } from '../auth/middleware.ts'
import { parse } from '../http/validate.ts'
import type { Services } from '../services/index.ts'
import { fakeKpFeed } from '../services/spaceWeather.ts'

export function correctionRoutes(services: Services): Router {
  const router = Router()
  const corrections = services.corrections
  const staff = requireRole('admin', 'office')

  router.get('/corrections', requireAuth, async (req, res) => {
    res.json(await corrections.list(currentAuth(req).user))
  })

  router.post('/base-stations', staff, async (req, res) => {
    res.status(201).json(await corrections.createBase(parse(baseStationInputSchema, req.body)))
  })
  router.patch('/base-stations/:id', staff, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    res.json(await corrections.updateBase(id, parse(baseStationPatchSchema, req.body)))
  })
  router.delete('/base-stations/:id', staff, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    await corrections.removeBase(id)
    res.status(204).end()
  })

  router.post('/correction-networks', staff, async (req, res) => {
    res.status(201).json(await corrections.createNetwork(parse(networkInputSchema, req.body)))
  })
  router.patch('/correction-networks/:id', staff, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    res.json(await corrections.updateNetwork(id, parse(networkPatchSchema, req.body)))
  })
  router.delete('/correction-networks/:id', staff, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    await corrections.removeNetwork(id)
    res.status(204).end()
  })

  router.get('/fields/:id/correction', requireAuth, async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    res.json(await corrections.fieldCorrection(currentAuth(req).user, id))
  })
  router.put('/fields/:id/correction', requireRole(...farmEditorRoles), async (req, res) => {
    const { id } = parse(idParamsSchema, req.params, 'address')
    res.json(await corrections.setFieldCorrection(currentAuth(req).user, id, parse(fieldCorrectionInputSchema, req.body)))
  })

  router.get('/space-weather/kp-forecast.json', (_req, res) => {
    res.set('Cache-Control', 'public, max-age=600').json(fakeKpFeed(Date.now()))
  })
  router.get('/space-weather', requireAuth, async (_req, res) => {
    res.json(await services.spaceWeather.status())
  })
  router.post('/space-weather/run', staff, async (_req, res) => {
    res.json(await services.spaceWeather.run())
  })

  return router
}
