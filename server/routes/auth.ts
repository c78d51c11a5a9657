// /api/auth: sign-in and out, the signed-in user, password change, reset and invitation links.
import { Router } from 'express'
import { rateLimit, ipKeyGenerator, type Options } from 'express-rate-limit'
import {
  changePasswordSchema,
  requestResetSchema,
  resetPasswordSchema,
  signInSchema,
  updateProfileSchema,
} from '../../shared/schemas/auth.ts'
import { currentAuth, requireAuth } from '../auth/middleware.ts'
import { HttpError } from '../http/errors.ts'
import { parse } from '../http/validate.ts'
import type { Services } from '../services/index.ts'

export interface AuthRateLimits {
  /** Failed sign-ins allowed per IP address and e-mail in `windowMs`. */
  signInPerEmail: number
  /** Failed sign-ins allowed per IP address over all e-mail addresses in `windowMs`. */
  signInPerIp: number
  /** Reset requests allowed per IP address in `windowMs`. */
  resetPerIp: number
  windowMs: number
}

export const defaultAuthRateLimits: AuthRateLimits = {
  signInPerEmail: 10,
  signInPerIp: 100,
  resetPerIp: 20,
  windowMs: 15 * 60_000,
}

function limiter(options: Partial<Options> & { message: string }) {
  const { message, ...rest } = options
  return rateLimit({
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    handler: (_req, _res, next) => next(new HttpError(429, 'rate_limited', message)),
    ...rest,
  })
}

const emailOf = (body: unknown) =>
  String((body as { email?: unknown } | undefined)?.email ?? '')
    .trim()
    .toLowerCase()
    .slice(0, 254)

export function authRoutes(services: Services, limits: AuthRateLimits = defaultAuthRateLimits): Router {
  const router = Router()
  const minutes = Math.round(limits.windowMs / 60_000)
  const signInLimiter = limiter({
    windowMs: limits.windowMs,
    limit: limits.signInPerEmail,
    skipSuccessfulRequests: true,
    keyGenerator: (req) => `${ipKeyGenerator(req.ip ?? '')}|${emailOf(req.body)}`,
    message: `Too many sign-in attempts for this address. Wait ${minutes} minutes and try again.`,
  })
  const signInIpLimiter = limiter({
    windowMs: limits.windowMs,
    limit: limits.signInPerIp,
    skipSuccessfulRequests: true,
    keyGenerator: (req) => ipKeyGenerator(req.ip ?? ''),
    message: `Too many failed sign-ins from this network. Wait ${minutes} minutes and try again.`,
  })
  const resetLimiter = limiter({
    windowMs: limits.windowMs,
    limit: limits.resetPerIp,
    keyGenerator: (req) => ipKeyGenerator(req.ip ?? ''),
    message: `Too many requests. Wait ${minutes} minutes and try again.`,
  })
  const auth = services.auth

  router.post('/sign-in', signInIpLimiter, signInLimiter, async (req, res) => {
    const input = parse(signInSchema, req.body)
    const { user, cookie } = await auth.signIn(input)
    res.append('Set-Cookie', cookie).json(user)
  })

  router.post('/sign-out', requireAuth, async (req, res) => {
    res.append('Set-Cookie', await auth.signOut(currentAuth(req).session)).status(204).end()
  })

  router.post('/sign-out-everywhere', requireAuth, async (req, res) => {
    res.append('Set-Cookie', await auth.signOutEverywhere(currentAuth(req).user.id)).status(204).end()
  })

  router.get('/me', requireAuth, (req, res) => {
    res.json(currentAuth(req).user)
  })

  router.patch('/me', requireAuth, async (req, res) => {
    const input = parse(updateProfileSchema, req.body)
    res.json(await auth.updateProfile(currentAuth(req).user, input))
  })

  router.post('/change-password', requireAuth, async (req, res) => {
    const input = parse(changePasswordSchema, req.body)
    const { user, session } = currentAuth(req)
    await auth.changePassword(user, session, input)
    res.status(204).end()
  })

  router.post('/request-reset', resetLimiter, (req, res) => {
    const input = parse(requestResetSchema, req.body)
    auth.requestReset(input.email)
    res.status(202).json({ message: 'If this address belongs to an active account, a reset link is on its way.' })
  })

  router.post('/reset', resetLimiter, async (req, res) => {
    const input = parse(resetPasswordSchema, req.body)
    await auth.resetPassword(input)
    res.status(204).end()
  })

  return router
}
