// Builds the Express app: security headers, the JSON API under /api, the built client from
// dist/ with the single-page fallback, and the one error middleware. index.ts listens;
// API tests run supertest against createApp().
import { existsSync } from 'node:fs'
import { join } from 'node:path'
import { fileURLToPath } from 'node:url'
import express, { Router, type Express } from 'express'
import helmet from 'helmet'
import { createLucia } from './auth/lucia.ts'
import { loadSession } from './auth/middleware.ts'
import type { Config } from './config.ts'
import type { Database } from './db/index.ts'
import { createStore } from './db/repositories/index.ts'
import { apiNotFound, errorMiddleware } from './http/errors.ts'
import { originCheck } from './http/origin.ts'
import { createLogger, type Logger } from './logger.ts'
import type { Mailer } from './mail/transport.ts'
import { auditRoutes } from './routes/audit.ts'
import { authRoutes, defaultAuthRateLimits, type AuthRateLimits } from './routes/auth.ts'
import { farmRoutes } from './routes/farms.ts'
import { fieldRoutes } from './routes/fields.ts'
import { importRoutes } from './routes/imports.ts'
import { obstructionRoutes } from './routes/obstructions.ts'
import { orbitRoutes } from './routes/orbits.ts'
import { outageRoutes } from './routes/outages.ts'
import { orbitFeedRoutes } from './routes/orbitFeed.ts'
import { correctionRoutes } from './routes/corrections.ts'
import { passRoutes } from './routes/passes.ts'
import { planRoutes } from './routes/plans.ts'
import { windowRoutes } from './routes/windows.ts'
import { hourDetailRoutes } from './routes/hourDetail.ts'
import { calendarRoutes } from './routes/calendar.ts'
import { crewRoutes } from './routes/crew.ts'
import { taskDataRoutes } from './routes/taskData.ts'
import { forecastRoutes } from './routes/forecasts.ts'
import { jobRoutes } from './routes/jobs.ts'
import { machineRoutes } from './routes/machines.ts'
import { mailboxRoutes } from './routes/mailbox.ts'
import { serviceLevelRoutes } from './routes/serviceLevels.ts'
import { systemRoutes } from './routes/system.ts'
import { userRoutes } from './routes/users.ts'
import { workTypeRoutes } from './routes/workTypes.ts'
import { terrainRoutes } from './routes/terrain.ts'
import { createServices, type Services } from './services/index.ts'

export const defaultDistDir = fileURLToPath(new URL('../dist', import.meta.url))

export interface AppDeps {
  config: Config
  db: Database
  mailer: Mailer
  logger?: Logger
  rateLimits?: Partial<AuthRateLimits>
  /** Where the built client is (default dist/ at the repository root). */
  distDir?: string
}

export interface SkyfurrowApp extends Express {
  locals: Express['locals'] & { services: Services }
}

const missingBuildPage = `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>Skyfurrow</title></head>
<body style="font-family:sans-serif;max-width:40em;margin:3em auto;line-height:1.5">
<h1>Skyfurrow</h1>
<p>The API is running, but the web client has not been built yet.</p>
<p>Run <code>npm run build</code> (or start everything with <code>npm start</code>) and reload this page.</p>
</body></html>`

export function createApp(deps: AppDeps): SkyfurrowApp {
  const { config, db, mailer } = deps
  const logger = deps.logger ?? createLogger(config.logLevel)
  const store = createStore(db)
  const lucia = createLucia(db, { secure: config.cookieSecure })
  const services = createServices({ config, store, lucia, mailer, logger })
  const https = config.publicUrl.startsWith('https:')

  const app = express() as SkyfurrowApp
  app.locals.services = services
  // Re-check booked passes whenever a field's forecast is replaced.
  services.atRisk.listen()
  app.set('query parser', 'simple')
  app.use(
    helmet({
      contentSecurityPolicy: {
        useDefaults: false,
        directives: {
          defaultSrc: ["'self'"],
          scriptSrc: ["'self'"],
          // ant-design-vue writes its styles into <style> elements at run time.
          styleSrc: ["'self'", "'unsafe-inline'"],
          imgSrc: ["'self'", 'data:', 'blob:'],
          fontSrc: ["'self'", 'data:'],
          connectSrc: ["'self'"],
          workerSrc: ["'self'", 'blob:'],
          // The crew view's web manifest (the service worker is covered by worker-src).
          manifestSrc: ["'self'"],
          objectSrc: ["'none'"],
          baseUri: ["'self'"],
          formAction: ["'self'"],
          frameAncestors: ["'none'"],
          // The Mailbox page shows received HTML mail in a sandboxed srcdoc frame.
          frameSrc: ["'self'"],
          ...(https ? { upgradeInsecureRequests: [] } : {}),
        },
      },
      strictTransportSecurity: https ? { maxAge: 15_552_000 } : false,
    }),
  )
  if (config.logLevel === 'debug') {
    app.use((req, res, next) => {
      const started = Date.now()
      res.on('finish', () => logger.debug(`${req.method} ${req.originalUrl} ${res.statusCode} ${Date.now() - started} ms`))
      next()
    })
  }

  const api = Router()
  // JSON bodies up to 1 MB. A later upload route that needs more mounts before this line
  // with its own parser and limit.
  api.use(express.json({ limit: '1mb' }))
  api.use(originCheck(config.publicUrl))
  api.use(loadSession(lucia, store.repos))
  api.use((_req, res, next) => {
    res.set('Cache-Control', 'no-store')
    next()
  })
  api.use(systemRoutes(services))
  // The most frequent read first: Express tries the routers in this order.
  api.use(forecastRoutes(services))
  api.use('/auth', authRoutes(services, { ...defaultAuthRateLimits, ...deps.rateLimits }))
  api.use('/farms', farmRoutes(services))
  api.use('/users', userRoutes(services))
  api.use('/audit', auditRoutes(services))
  api.use('/mailbox', mailboxRoutes(services))
  api.use(fieldRoutes(services))
  api.use(obstructionRoutes(services))
  api.use(orbitRoutes(services))
  api.use(importRoutes(services))
  api.use(terrainRoutes(services, { maxFileBytes: config.terrainFileMaxBytes }))
  api.use('/outages', outageRoutes(services))
  api.use('/orbit-feed', orbitFeedRoutes(services))
  api.use('/service-levels', serviceLevelRoutes(services))
  api.use('/work-types', workTypeRoutes(services))
  api.use('/machines', machineRoutes(services))
  api.use('/jobs', jobRoutes(services))
  api.use(passRoutes(services))
  api.use(windowRoutes(services))
  api.use(hourDetailRoutes(services))
  api.use(calendarRoutes(services))
  api.use(planRoutes(services))
  api.use('/crew', crewRoutes(services))
  api.use(taskDataRoutes(services))
  api.use(correctionRoutes(services))
  api.use(apiNotFound)
  app.use('/api', api)

  const distDir = deps.distDir ?? defaultDistDir
  app.use(
    express.static(distDir, {
      index: false,
      setHeaders: (res, path) => {
        if (path.includes(`${join(distDir, 'assets')}`)) res.set('Cache-Control', 'public, max-age=31536000, immutable')
      },
    }),
  )
  // Every other GET is a client-side route: answer with the client's index.html. A missing
  // file (a path ending in an extension, e.g. an old /assets/*.js) is a plain 404 instead.
  app.get('/{*splat}', (req, res) => {
    if (/\.[A-Za-z0-9]+$/.test(req.path)) {
      res.status(404).type('text').send('Not found')
      return
    }
    const index = join(distDir, 'index.html')
    if (!existsSync(index)) {
      res.status(503).type('html').send(missingBuildPage)
      return
    }
    res.set('Cache-Control', 'no-cache').sendFile(index)
  })

  app.use(errorMiddleware(logger, config.nodeEnv === 'development'))
  return app
}
