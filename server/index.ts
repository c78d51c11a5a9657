// `tsx server/index.ts`: starts Skyfurrow. Listens on HOST:PORT, serves the API and the built
// client, runs the local fake SMTP server when SMTP_URL is empty and the forecast jobs, and
// on SIGINT/SIGTERM closes the HTTP server, puts running jobs back in the queue, closes the
// fake SMTP server and the database pool, then exits 0.
import { createServer } from 'node:http'
import type { AddressInfo } from 'node:net'
import { createApp } from './app.ts'
import { loadConfig, withListeningPort } from './config.ts'
import { openDatabase } from './db/index.ts'
import { createRepositories, createStore } from './db/repositories/index.ts'
import { setListenerErrorHandler } from './events.ts'
import { startJobs } from './jobs/index.ts'
import { planJobHandlers, startPlanScheduler } from './jobs/planJobs.ts'
import { createLogger } from './logger.ts'
import { startFakeSmtp, type FakeSmtp } from './mail/fake-smtp.ts'
import { createMailer } from './mail/transport.ts'

let config = (() => {
  try {
    return loadConfig()
  } catch (error) {
    console.error(error instanceof Error ? error.message : error)
    process.exit(1)
  }
})()
const logger = createLogger(config.logLevel)
const database = openDatabase(config.databaseUrl)

let fakeSmtp: FakeSmtp | undefined
if (!config.smtpUrl) {
  fakeSmtp = await startFakeSmtp({
    port: config.fakeSmtpPort,
    mailbox: createRepositories(database.db).mailbox,
    logger,
  })
  logger.info(`local mailbox (fake SMTP) on ${fakeSmtp.host}:${fakeSmtp.port}`)
}
const mailer = createMailer({ from: config.mailFrom, smtpUrl: config.smtpUrl, fake: fakeSmtp })

const server = createServer()
server.keepAliveTimeout = 5_000
await new Promise<void>((resolve, reject) => {
  server.once('error', reject)
  server.listen(config.port, config.host, () => {
    server.off('error', reject)
    resolve()
  })
})
config = withListeningPort(config, (server.address() as AddressInfo).port)
server.on('request', createApp({ config, db: database.db, mailer, logger }))

// Forecast jobs: triggers on changes, the runner (worker threads), start-up recovery and sweep.
// Jobs have connections of their own, so that a busy page load never holds a job's
// queries back in the queue for a connection, nor a job's writes the pages.
setListenerErrorHandler((name, error) => logger.error(`listener of ${name} failed`, error))
const jobsDatabase = openDatabase(config.databaseUrl, { connectionLimit: config.jobConcurrency + 3 })
const store = createStore(jobsDatabase.db)
const jobsStarting = startJobs({ store, config, logger, handlers: planJobHandlers({ mailer }) })
// The automatic weekly plans: due schedules become jobs (only where jobs run).
const stopPlanScheduler = config.jobsEnabled ? startPlanScheduler({ store, logger }) : () => {}

let stopping = false
async function shutdown(signal: string): Promise<void> {
  if (stopping) return
  stopping = true
  logger.info(`${signal} received, shutting down`)
  const force = setTimeout(() => {
    logger.warn('shutdown took too long; closing open connections')
    server.closeAllConnections()
  }, 5_000)
  force.unref()
  await new Promise<void>((resolve) => {
    server.close(() => resolve())
    server.closeIdleConnections()
  })
  // A signal during start-up waits for the jobs to have started, then stops them.
  const jobs = await jobsStarting.catch(() => undefined)
  stopPlanScheduler()
  await jobs?.stop()
  mailer.close()
  if (fakeSmtp) await fakeSmtp.close()
  await jobsDatabase.close()
  await database.close()
  clearTimeout(force)
  logger.info('stopped')
  process.exit(0)
}
process.on('SIGINT', () => void shutdown('SIGINT'))
process.on('SIGTERM', () => void shutdown('SIGTERM'))

// Ready: the signal handlers are in place and the jobs run. Scripts wait for this line.
await jobsStarting
const shownHost = config.host.includes(':') ? `[${config.host}]` : config.host
console.log(`Skyfurrow listening on http://${shownHost}:${config.port}`)
