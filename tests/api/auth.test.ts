// Sign-in, sessions (cookie, expiry, sliding renewal), sign-out, sign-out everywhere,
// profile, password change, the Origin check, the sign-in rate limit and production rules.
import { eq } from 'drizzle-orm'
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { authTokens, sessions, users } from '../../server/db/schema.ts'
import {
  Client,
  createUserWithPassword,
  demo,
  sessionCookieOf,
  signIn,
  startTestServer,
  TEST_PUBLIC_URL,
  type TestServer,
} from '../support/server.ts'

let server: TestServer

beforeAll(async () => {
  server = await startTestServer()
})
afterAll(async () => {
  await server?.close()
})

const sessionIdOf = (client: Client) => client.cookie!.split('=')[1]

describe('sign-in', () => {
  it('returns the session user and sets an HTTP-only SameSite=Lax cookie', async () => {
    const res = await new Client(server.app).post('/api/auth/sign-in', { email: demo.clientNorth, password: 'skyfurrow-demo' })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ email: demo.clientNorth, role: 'client', units: expect.any(String) })
    expect(res.body.farmIds.length).toBeGreaterThan(0)
    expect(res.body).not.toHaveProperty('passwordHash')
    const cookie = ([] as string[]).concat(res.headers['set-cookie'] as unknown as string[]).find((c) =>
      c.startsWith('skyfurrow_session='),
    )!
    expect(cookie).toMatch(/HttpOnly/i)
    expect(cookie).toMatch(/SameSite=Lax/i)
    expect(cookie).toMatch(/Path=\//)
    expect(cookie).not.toMatch(/Secure/i)
  })

  it('marks the cookie Secure when configured', async () => {
    const app = server.appWith({ cookieSecure: true })
    const res = await new Client(app).post('/api/auth/sign-in', { email: demo.office, password: 'skyfurrow-demo' })
    expect(res.status).toBe(200)
    expect(String(res.headers['set-cookie'])).toMatch(/Secure/)
  })

  it('accepts the e-mail in any case and with spaces around it', async () => {
    const res = await new Client(server.app).post('/api/auth/sign-in', {
      email: '  Office@Demo.Skyfurrow.TEST ',
      password: 'skyfurrow-demo',
    })
    expect(res.status).toBe(200)
    expect(res.body.email).toBe(demo.office)
  })

  it('refuses a wrong password or an unknown address with the same 401', async () => {
    const wrong = await new Client(server.app).post('/api/auth/sign-in', { email: demo.office, password: 'not-the-password' })
    const unknown = await new Client(server.app).post('/api/auth/sign-in', {
      email: 'nobody@example.test',
      password: 'not-the-password',
    })
    for (const res of [wrong, unknown]) {
      expect(res.status).toBe(401)
      expect(res.body.error.code).toBe('invalid_credentials')
      expect(sessionCookieOf(res)).toBeUndefined()
    }
    expect(wrong.body.error.message).toBe(unknown.body.error.message)
  })

  it('names the fields of a malformed sign-in', async () => {
    const res = await new Client(server.app).post('/api/auth/sign-in', { email: 'not-an-address', password: '' })
    expect(res.status).toBe(400)
    expect(res.body.error.code).toBe('invalid_input')
    expect(res.body.error.fields.email).toBe('Enter a valid e-mail address')
    expect(res.body.error.fields.password).toBe('Enter your password')
  })

  it('refuses demo accounts in production but not other accounts', async () => {
    const app = server.appWith({ nodeEnv: 'production' })
    const res = await new Client(app).post('/api/auth/sign-in', { email: demo.admin, password: 'skyfurrow-demo' })
    expect(res.status).toBe(403)
    expect(res.body.error.code).toBe('demo_disabled')
    const user = await createUserWithPassword(server, { role: 'office' })
    const ok = await new Client(app).post('/api/auth/sign-in', { email: user.email, password: user.password })
    expect(ok.status).toBe(200)
  })

  it('refuses deactivated users and users without a password', async () => {
    const user = await createUserWithPassword(server, { role: 'contractor' })
    await server.repos.users.update(user.id, { active: false })
    const res = await new Client(server.app).post('/api/auth/sign-in', { email: user.email, password: user.password })
    expect(res.status).toBe(401)
    await server.repos.users.update(user.id, { active: true, passwordHash: null })
    const res2 = await new Client(server.app).post('/api/auth/sign-in', { email: user.email, password: user.password })
    expect(res2.status).toBe(401)
  })

  it('records the time of the last sign-in', async () => {
    const user = await createUserWithPassword(server, { role: 'office' })
    const before = Date.now()
    await signIn(server.app, user.email, user.password)
    const row = await server.repos.users.findById(user.id)
    expect(row!.lastSignInAt!.getTime()).toBeGreaterThanOrEqual(before - 1000)
  })
})

describe('sessions', () => {
  it('GET /api/auth/me answers 401 without a session and the user with one', async () => {
    expect((await request(server.app).get('/api/auth/me')).status).toBe(401)
    const crew = await signIn(server.app, demo.contractor)
    const me = await crew.get('/api/auth/me')
    expect(me.status).toBe(200)
    expect(me.body).toMatchObject({ email: demo.contractor, role: 'contractor', farmIds: [] })
  })

  it('treats an unknown session cookie as signed out and clears it', async () => {
    const res = await new Client(server.app, 'skyfurrow_session=thisisnotasession').get('/api/auth/me')
    expect(res.status).toBe(401)
    expect(String(res.headers['set-cookie'])).toMatch(/skyfurrow_session=;/)
  })

  it('ends an expired session', async () => {
    const user = await createUserWithPassword(server, { role: 'office' })
    const client = await signIn(server.app, user.email, user.password)
    await server.database.db
      .update(sessions)
      .set({ expiresAt: new Date(Date.now() - 1000) })
      .where(eq(sessions.id, sessionIdOf(client)))
    expect((await client.get('/api/auth/me')).status).toBe(401)
    expect(await server.repos.sessions.countOf(user.id)).toBe(0)
  })

  it('renews a session that is past half its life and sets the cookie again', async () => {
    const user = await createUserWithPassword(server, { role: 'office' })
    const client = await signIn(server.app, user.email, user.password)
    const soon = new Date(Date.now() + 2 * 86_400_000)
    await server.database.db.update(sessions).set({ expiresAt: soon }).where(eq(sessions.id, sessionIdOf(client)))
    const res = await client.get('/api/auth/me')
    expect(res.status).toBe(200)
    expect(sessionCookieOf(res)).toBe(client.cookie)
    expect(String(res.headers['set-cookie'])).toMatch(/Max-Age=1209600/)
    const [row] = await server.database.db.select().from(sessions).where(eq(sessions.id, sessionIdOf(client)))
    expect(row.expiresAt.getTime()).toBeGreaterThan(Date.now() + 13 * 86_400_000)
    // A fresh session is not renewed on every request.
    expect(sessionCookieOf(await client.get('/api/auth/me'))).toBeUndefined()
  })

  it('removes expired sessions and stale link tokens after a sign-in', async () => {
    const user = await createUserWithPassword(server, { role: 'office' })
    const past = new Date(Date.now() - 60_000)
    await server.database.db.insert(sessions).values({ id: `expired${user.id}x`.padEnd(40, 'x'), userId: user.id, expiresAt: past })
    await server.database.db
      .insert(authTokens)
      .values({ userId: user.id, purpose: 'reset', tokenHash: `${user.id}`.padStart(64, 'e'), expiresAt: past })
    // A new app instance cleans up on its first sign-in (then at most once an hour).
    await signIn(server.appWith({}), user.email, user.password)
    const tokensOf = () => server.database.db.select().from(authTokens).where(eq(authTokens.userId, user.id))
    for (let i = 0; i < 100; i++) {
      if ((await server.repos.sessions.countOf(user.id)) === 1 && (await tokensOf()).length === 0) break
      await new Promise((r) => setTimeout(r, 20))
    }
    expect(await server.repos.sessions.countOf(user.id)).toBe(1)
    expect(await tokensOf()).toEqual([])
  })

  it('signs out: the session ends and the cookie is cleared', async () => {
    const user = await createUserWithPassword(server, { role: 'office' })
    const one = await signIn(server.app, user.email, user.password)
    const two = await signIn(server.app, user.email, user.password)
    const res = await one.post('/api/auth/sign-out')
    expect(res.status).toBe(204)
    expect(String(res.headers['set-cookie'])).toMatch(/skyfurrow_session=;/)
    expect((await one.get('/api/auth/me')).status).toBe(401)
    expect((await two.get('/api/auth/me')).status).toBe(200)
  })

  it('signs out everywhere: every session of the user ends', async () => {
    const user = await createUserWithPassword(server, { role: 'contractor' })
    const other = await createUserWithPassword(server, { role: 'contractor' })
    const one = await signIn(server.app, user.email, user.password)
    const two = await signIn(server.app, user.email, user.password)
    const bystander = await signIn(server.app, other.email, other.password)
    expect((await one.post('/api/auth/sign-out-everywhere')).status).toBe(204)
    expect((await one.get('/api/auth/me')).status).toBe(401)
    expect((await two.get('/api/auth/me')).status).toBe(401)
    expect((await bystander.get('/api/auth/me')).status).toBe(200)
  })

  it('ends the sessions of a user who is deactivated meanwhile', async () => {
    const user = await createUserWithPassword(server, { role: 'office' })
    const client = await signIn(server.app, user.email, user.password)
    await server.database.db.update(users).set({ active: false }).where(eq(users.id, user.id))
    expect((await client.get('/api/auth/me')).status).toBe(401)
    expect(await server.repos.sessions.countOf(user.id)).toBe(0)
  })
})

describe('profile and password', () => {
  it('updates name and units', async () => {
    const user = await createUserWithPassword(server, { role: 'office' })
    const client = await signIn(server.app, user.email, user.password)
    const res = await client.patch('/api/auth/me', { name: '  Renamed Person ', units: 'imperial' })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ name: 'Renamed Person', units: 'imperial', email: user.email })
    const bad = await client.patch('/api/auth/me', { name: '', units: 'furlongs' })
    expect(bad.status).toBe(400)
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['name', 'units'])
  })

  it('does not let the profile change role or e-mail', async () => {
    const user = await createUserWithPassword(server, { role: 'contractor' })
    const client = await signIn(server.app, user.email, user.password)
    const res = await client.patch('/api/auth/me', { role: 'admin', email: 'x@example.test' })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ role: 'contractor', email: user.email })
  })

  it('changes the password after checking the current one; other sessions end', async () => {
    const user = await createUserWithPassword(server, { role: 'office' })
    const current = await signIn(server.app, user.email, user.password)
    const other = await signIn(server.app, user.email, user.password)

    const wrong = await current.post('/api/auth/change-password', { currentPassword: 'nope-nope-nope', newPassword: 'brand-new-password' })
    expect(wrong.status).toBe(400)
    expect(wrong.body.error.fields.currentPassword).toBeTruthy()

    const short = await current.post('/api/auth/change-password', { currentPassword: user.password, newPassword: 'short' })
    expect(short.status).toBe(400)
    expect(short.body.error.fields.newPassword).toBe('Use at least 12 characters')
    // OWASP ASVS 4.0.3 V2.1.1: at least 12 characters (11 are refused).
    const eleven = await current.post('/api/auth/change-password', { currentPassword: user.password, newPassword: 'abcdefghijk' })
    expect(eleven.body.error.fields.newPassword).toBe('Use at least 12 characters')

    const ok = await current.post('/api/auth/change-password', { currentPassword: user.password, newPassword: 'brand-new-password' })
    expect(ok.status).toBe(204)
    expect((await current.get('/api/auth/me')).status).toBe(200)
    expect((await other.get('/api/auth/me')).status).toBe(401)
    expect((await new Client(server.app).post('/api/auth/sign-in', { email: user.email, password: user.password })).status).toBe(401)
    await signIn(server.app, user.email, 'brand-new-password')
  })
})

describe('Origin check', () => {
  it('refuses state-changing requests from another site', async () => {
    const res = await request(server.app)
      .post('/api/auth/sign-in')
      .set('Origin', 'http://evil.example')
      .send({ email: demo.admin, password: 'skyfurrow-demo' })
    expect(res.status).toBe(403)
    expect(res.body.error.code).toBe('bad_origin')
  })

  it('refuses state-changing requests that name no origin at all', async () => {
    const res = await request(server.app).post('/api/auth/sign-in').send({ email: demo.admin, password: 'skyfurrow-demo' })
    expect(res.status).toBe(403)
    expect(res.body.error.code).toBe('bad_origin')
  })

  it('accepts PUBLIC_URL, the request host, or a Referer on the same site', async () => {
    const body = { email: demo.office, password: 'skyfurrow-demo' }
    const fromPublic = await request(server.app).post('/api/auth/sign-in').set('Origin', TEST_PUBLIC_URL).send(body)
    expect(fromPublic.status).toBe(200)
    const fromHost = await request(server.app)
      .post('/api/auth/sign-in')
      .set('Host', 'farmoffice.local:5173')
      .set('Origin', 'http://farmoffice.local:5173')
      .send(body)
    expect(fromHost.status).toBe(200)
    const byReferer = await request(server.app)
      .post('/api/auth/sign-in')
      .set('Referer', `${TEST_PUBLIC_URL}/sign-in?next=%2F`)
      .send(body)
    expect(byReferer.status).toBe(200)
  })

  it('also guards signed-in changes (a stolen cookie from another site gets nowhere)', async () => {
    const admin = await signIn(server.app, demo.admin)
    const res = await request(server.app)
      .post('/api/farms')
      .set('Cookie', admin.cookie!)
      .set('Origin', 'https://elsewhere.example')
      .send({ name: 'Sneaky', timeZone: 'UTC' })
    expect(res.status).toBe(403)
  })

  it('lets reads through without an Origin', async () => {
    expect((await request(server.app).get('/api/meta')).status).toBe(200)
  })
})

describe('sign-in rate limit', () => {
  it('answers 429 JSON after too many failures for one address, and only for that address', async () => {
    const app = server.appWith({}, { rateLimits: { signInPerEmail: 3 } })
    const attempt = (email: string, password = 'wrong-password') =>
      new Client(app).post('/api/auth/sign-in', { email, password })
    for (let i = 0; i < 3; i++) expect((await attempt(demo.office)).status).toBe(401)
    const limited = await attempt(demo.office)
    expect(limited.status).toBe(429)
    expect(limited.body.error.code).toBe('rate_limited')
    // Even the right password waits now.
    expect((await attempt(demo.office, 'skyfurrow-demo')).status).toBe(429)
    // Another address from the same IP is not affected.
    expect((await attempt(demo.contractor, 'skyfurrow-demo')).status).toBe(200)
  })

  it('also limits failures per IP address over many addresses', async () => {
    const app = server.appWith({}, { rateLimits: { signInPerIp: 4 } })
    for (let i = 0; i < 4; i++) {
      const res = await new Client(app).post('/api/auth/sign-in', { email: `guess${i}@example.test`, password: 'guessed-password' })
      expect(res.status).toBe(401)
    }
    const res = await new Client(app).post('/api/auth/sign-in', { email: 'guess9@example.test', password: 'guessed-password' })
    expect(res.status).toBe(429)
    expect(res.body.error.message).toMatch(/from this network/)
  })

  it('does not count successful sign-ins', async () => {
    const app = server.appWith({}, { rateLimits: { signInPerEmail: 2 } })
    for (let i = 0; i < 4; i++) await signIn(app, demo.contractor)
  })
})
