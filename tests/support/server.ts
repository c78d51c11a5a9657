// API-test support: the real app (createApp) on the test database named by DATABASE_URL,
// with its own local fake SMTP server, signed-in supertest helpers and mailbox look-ups.
//
// Works on its own too: migrations are applied on start (a no-op when up to date) and the
// demo scenario is seeded when the database has no users. `npm test` provides a fresh,
// migrated and seeded database; by hand:
//   export DATABASE_URL=$(node server/setup/db.mjs skyfurrow_test_server --fresh | tail -1)
//   npx vitest run tests/api
import request from 'supertest'
import type { Test } from 'supertest'
import { createApp, type AppDeps, type SkyfurrowApp } from '../../server/app.ts'
import { loadConfig, type Config } from '../../server/config.ts'
import { openDatabase, type DatabaseHandle } from '../../server/db/index.ts'
import { runMigrations } from '../../server/db/migrate.ts'
import { createRepositories, type Repositories } from '../../server/db/repositories/index.ts'
import { createLogger } from '../../server/logger.ts'
import { startFakeSmtp, type FakeSmtp } from '../../server/mail/fake-smtp.ts'
import { createMailer, type Mailer } from '../../server/mail/transport.ts'
import { seedDemo } from '../../seed/index.ts'
import { DEMO_PASSWORD } from '../../seed/scenario.ts'

export { DEMO_PASSWORD }

export const demo = {
  admin: 'admin@demo.skyfurrow.test',
  office: 'office@demo.skyfurrow.test',
  contractor: 'crew@demo.skyfurrow.test',
  clientNorth: 'client.north@demo.skyfurrow.test',
  clientSouth: 'client.south@demo.skyfurrow.test',
} as const

/** The origin API tests send on state-changing requests (PUBLIC_URL of the test config). */
export const TEST_PUBLIC_URL = 'http://skyfurrow.test:8080'

export interface TestServer {
  app: SkyfurrowApp
  config: Config
  database: DatabaseHandle
  repos: Repositories
  mailer: Mailer
  smtp: FakeSmtp
  /** Another app over the same database and mailer, with other settings. */
  appWith(overrides: Partial<Config>, deps?: Partial<AppDeps>): SkyfurrowApp
  close(): Promise<void>
}

export function testConfig(overrides: Partial<Config> = {}): Config {
  if (!process.env.DATABASE_URL) {
    throw new Error(
      'API tests need DATABASE_URL, e.g. DATABASE_URL=$(node server/setup/db.mjs skyfurrow_test_server --fresh | tail -1)',
    )
  }
  const base = loadConfig({ ...process.env, NODE_ENV: 'test', PORT: '0', PUBLIC_URL: TEST_PUBLIC_URL, SMTP_URL: '' })
  return { ...base, logLevel: 'error', ...overrides }
}

let prepared: Promise<void> | undefined

export async function startTestServer(overrides: Partial<Config> = {}, deps: Partial<AppDeps> = {}): Promise<TestServer> {
  const config = testConfig(overrides)
  const database = openDatabase(config.databaseUrl, { connectionLimit: 5 })
  prepared ??= (async () => {
    await runMigrations(database.db)
    await seedDemo(database.db)
  })()
  await prepared
  const logger = createLogger(config.logLevel)
  const repos = createRepositories(database.db)
  const smtp = await startFakeSmtp({ port: 0, mailbox: repos.mailbox, logger })
  const mailer = createMailer({ from: config.mailFrom, fake: smtp })
  const appWith = (o: Partial<Config>, d: Partial<AppDeps> = {}) =>
    createApp({ config: { ...config, ...o }, db: database.db, mailer, logger, ...deps, ...d })
  return {
    app: appWith({}),
    config,
    database,
    repos,
    mailer,
    smtp,
    appWith,
    close: async () => {
      mailer.close()
      await smtp.close()
      await database.close()
    },
  }
}

type Method = 'get' | 'post' | 'patch' | 'put' | 'delete'

/** A supertest client that sends the allowed Origin and, once signed in, the session cookie. */
export class Client {
  cookie: string | undefined

  constructor(
    readonly app: SkyfurrowApp,
    cookie?: string,
  ) {
    this.cookie = cookie
  }

  call(method: Method, path: string, body?: unknown): Test {
    let t = request(this.app)[method](path).set('Origin', TEST_PUBLIC_URL)
    if (this.cookie) t = t.set('Cookie', this.cookie)
    if (body !== undefined) t = t.send(body as object)
    return t
  }
  get = (path: string) => this.call('get', path)
  post = (path: string, body?: unknown) => this.call('post', path, body)
  patch = (path: string, body?: unknown) => this.call('patch', path, body)
  delete = (path: string) => this.call('delete', path)
}

/** The "name=value" part of the session cookie a response sets, if any. */
export function sessionCookieOf(res: { headers: Record<string, unknown> }): string | undefined {
  const raw = res.headers['set-cookie']
  const list = Array.isArray(raw) ? (raw as string[]) : typeof raw === 'string' ? [raw] : []
  const cookie = list.find((c) => c.startsWith('skyfurrow_session='))
  return cookie?.split(';')[0]
}

/** Signs in and returns a Client carrying the session cookie (fails the test otherwise). */
export async function signIn(app: SkyfurrowApp, email: string, password = DEMO_PASSWORD): Promise<Client> {
  const res = await new Client(app).post('/api/auth/sign-in', { email, password })
  if (res.status !== 200) throw new Error(`sign-in of ${email} failed: ${res.status} ${JSON.stringify(res.body)}`)
  const cookie = sessionCookieOf(res)
  if (!cookie) throw new Error(`sign-in of ${email} set no session cookie`)
  return new Client(app, cookie)
}

/** A short unique suffix for names and e-mail addresses created by a test. */
export function unique(prefix = 't'): string {
  return `${prefix}${Date.now().toString(36)}${Math.random().toString(36).slice(2, 7)}`
}

/** Waits until the local mailbox holds a message to `to` received after `since`; returns it. */
export async function waitForMail(repos: Repositories, to: string, since: Date, timeoutMs = 10_000) {
  const deadline = Date.now() + timeoutMs
  for (;;) {
    const { rows } = await repos.mailbox.list({ page: 1, pageSize: 20, order: 'desc', q: to })
    const hit = rows.find((r) => r.receivedAt.getTime() >= since.getTime() - 1000 && r.toAddresses.includes(to))
    if (hit) return (await repos.mailbox.findById(hit.id))!
    if (Date.now() > deadline) throw new Error(`no e-mail to ${to} arrived within ${timeoutMs} ms`)
    await new Promise((r) => setTimeout(r, 50))
  }
}

/** The token of the first Skyfurrow link (reset or invitation) in a mail's text. */
export function linkToken(text: string): { token: string; url: URL } {
  const match = /https?:\/\/\S+\/reset-password\?\S+/.exec(text)
  if (!match) throw new Error(`no reset-password link in:\n${text}`)
  const url = new URL(match[0])
  const token = url.searchParams.get('token')
  if (!token) throw new Error(`link without token: ${match[0]}`)
  return { token, url }
}

/** Creates a user with a password directly (for tests that need a disposable account). */
export async function createUserWithPassword(
  server: TestServer,
  input: { role: 'admin' | 'office' | 'contractor' | 'client'; farmIds?: number[]; password?: string },
): Promise<{ id: number; email: string; password: string }> {
  const { hashPassword } = await import('../../server/auth/password.ts')
  const email = `${unique('user')}@example.test`
  const password = input.password ?? 'a-long-test-password'
  const id = await server.repos.users.insert({
    email,
    name: `Test ${input.role}`,
    role: input.role,
    passwordHash: await hashPassword(password),
  })
  if (input.farmIds?.length) await server.repos.users.setFarmIds(id, input.farmIds)
  return { id, email, password }
}
