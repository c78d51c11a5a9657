// Security basics shown end to end: security headers and the content security policy,
// session rotation (sign-in and privilege change), no account enumeration, cross-site
// writes refused, and the audit log of admin actions. The sign-in rate limits and the
// Origin check have their own cases in auth.test.ts; expiry of sessions too.
import { eq } from 'drizzle-orm'
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import {
  Client,
  createUserWithPassword,
  demo,
  sessionCookieOf,
  signIn,
  startTestServer,
  unique,
  type TestServer,
} from '../support/server.ts'
import { sessions } from '../../server/db/schema.ts'

let server: TestServer
let admin: Client
let adminId: number

beforeAll(async () => {
  server = await startTestServer()
  admin = await signIn(server.app, demo.admin)
  adminId = (await admin.get('/api/auth/me')).body.id
})
afterAll(async () => {
  await server?.close()
})

const directives = (csp: string) =>
  new Map(csp.split(';').map((d) => d.trim().split(/\s+/)).filter((p) => p[0]).map(([k, ...v]) => [k, v]))

describe('security headers', () => {
  it('sends helmet headers and a content security policy without inline scripts, on pages and API answers', async () => {
    for (const path of ['/', '/outlook', '/api/health']) {
      const res = await request(server.app).get(path)
      expect(res.headers['x-content-type-options'], path).toBe('nosniff')
      expect(res.headers['referrer-policy'], path).toBe('no-referrer')
      expect(res.headers['x-frame-options'], path).toBe('SAMEORIGIN')
      expect(res.headers['cross-origin-opener-policy'], path).toBe('same-origin')
      expect(res.headers['x-powered-by'], path).toBeUndefined()
      const csp = directives(String(res.headers['content-security-policy']))
      expect(csp.get('default-src')).toEqual(["'self'"])
      expect(csp.get('script-src')).toEqual(["'self'"])
      expect(csp.get('object-src')).toEqual(["'none'"])
      expect(csp.get('frame-ancestors')).toEqual(["'none'"])
      expect(csp.get('base-uri')).toEqual(["'self'"])
      // The offline crew view: a same-origin service worker and web manifest.
      expect(csp.get('worker-src')).toContain("'self'")
      expect(csp.get('manifest-src')).toEqual(["'self'"])
    }
  })

  it('adds HSTS when the public address is https', async () => {
    const app = server.appWith({ publicUrl: 'https://skyfurrow.example', cookieSecure: true })
    const res = await request(app).get('/api/health')
    expect(res.headers['strict-transport-security']).toMatch(/max-age=\d{7,}/)
    expect(directives(String(res.headers['content-security-policy'])).has('upgrade-insecure-requests')).toBe(true)
  })

  it('API answers are never cached', async () => {
    const res = await admin.get('/api/auth/me')
    expect(res.headers['cache-control']).toBe('no-store')
  })
})

describe('session rotation', () => {
  it('a sign-in always opens a new session, whatever session cookie the browser brought (no fixation)', async () => {
    const user = await createUserWithPassword(server, { role: 'office' })
    const first = await signIn(server.app, user.email, user.password)
    const res = await first.post('/api/auth/sign-in', { email: user.email, password: user.password })
    expect(res.status).toBe(200)
    const second = sessionCookieOf(res)
    expect(second).toBeDefined()
    expect(second).not.toBe(first.cookie)
    // A made-up session id planted in the browser is never adopted.
    const planted = 'skyfurrow_session=planted0000000000000000000000000000'
    const res2 = await new Client(server.app, planted).post('/api/auth/sign-in', { email: user.email, password: user.password })
    expect(sessionCookieOf(res2)).not.toBe(planted)
  })

  it('a session in daily use still ends 30 days after its sign-in (periodic re-authentication)', async () => {
    const user = await createUserWithPassword(server, { role: 'office' })
    const session = await signIn(server.app, user.email, user.password)
    const id = session.cookie!.split('=')[1]
    const day = 86_400_000
    // Used yesterday (not expired by lucia's 14 days) but signed in 29, then 31 days ago.
    await server.database.db.update(sessions).set({ createdAt: new Date(Date.now() - 29 * day), expiresAt: new Date(Date.now() + 13 * day) }).where(eq(sessions.id, id))
    expect((await session.get('/api/auth/me')).status).toBe(200)
    await server.database.db.update(sessions).set({ createdAt: new Date(Date.now() - 31 * day) }).where(eq(sessions.id, id))
    expect((await session.get('/api/auth/me')).status).toBe(401)
    expect(await server.repos.sessions.countOf(user.id)).toBe(0)
  })

  it('a change of farm access ends the client user\'s sessions', async () => {
    const farms = (await admin.get('/api/farms?pageSize=2')).body.items as Array<{ id: number }>
    const user = await createUserWithPassword(server, { role: 'client', farmIds: [farms[0].id] })
    const session = await signIn(server.app, user.email, user.password)
    expect((await admin.patch(`/api/users/${user.id}`, { farmIds: [farms[0].id, farms[1].id] })).status).toBe(200)
    expect((await session.get('/api/auth/me')).status).toBe(401)
    const again = await signIn(server.app, user.email, user.password)
    expect((await again.get('/api/auth/me')).body.farmIds.sort()).toEqual([farms[0].id, farms[1].id].sort())
  })

  it('a change that keeps the privileges (name, units) keeps the sessions', async () => {
    const user = await createUserWithPassword(server, { role: 'contractor' })
    const session = await signIn(server.app, user.email, user.password)
    expect((await admin.patch(`/api/users/${user.id}`, { name: 'Renamed Crew', units: 'imperial' })).status).toBe(200)
    expect((await session.get('/api/auth/me')).status).toBe(200)
  })
})

describe('no account enumeration', () => {
  it('sign-in answers an unknown address, a wrong password and a deactivated account alike', async () => {
    const user = await createUserWithPassword(server, { role: 'office' })
    const off = await createUserWithPassword(server, { role: 'office' })
    await admin.patch(`/api/users/${off.id}`, { active: false })
    const anon = new Client(server.app)
    const answers = await Promise.all([
      anon.post('/api/auth/sign-in', { email: `${unique('nobody')}@example.test`, password: 'whatever-long-pw' }),
      anon.post('/api/auth/sign-in', { email: user.email, password: 'not-the-password' }),
      anon.post('/api/auth/sign-in', { email: off.email, password: off.password }),
    ])
    for (const a of answers) {
      expect(a.status).toBe(401)
      expect(a.body).toEqual(answers[0].body)
    }
  })

  it('a reset request answers an existing and an unknown address alike', async () => {
    const anon = new Client(server.app)
    const known = await anon.post('/api/auth/request-reset', { email: demo.office })
    const unknown = await anon.post('/api/auth/request-reset', { email: `${unique('nobody')}@example.test` })
    expect([known.status, unknown.status]).toEqual([202, 202])
    expect(known.body).toEqual(unknown.body)
  })
})

describe('cross-site writes (CSRF)', () => {
  it('a signed-in browser tricked by another site into a form post changes nothing', async () => {
    const user = await createUserWithPassword(server, { role: 'contractor' })
    // The form another site would submit: urlencoded, the victim's cookie, the other origin.
    const res = await request(server.app)
      .patch(`/api/users/${user.id}`)
      .set('Cookie', admin.cookie!)
      .set('Origin', 'https://evil.example')
      .type('form')
      .send('role=admin')
    expect(res.status).toBe(403)
    expect(res.body.error.code).toBe('bad_origin')
    expect((await admin.get(`/api/users/${user.id}`)).body.role).toBe('contractor')
  })
})

describe('audit log of admin actions', () => {
  type Event = { action: string; actorId: number; actorName: string; targetId: number; targetType: string; changes: Record<string, { from: unknown; to: unknown }> }
  const eventsOf = async (targetType: string, targetId: number): Promise<Event[]> => {
    const res = await admin.get(`/api/audit?targetType=${targetType}&targetId=${targetId}&pageSize=50`)
    expect(res.status).toBe(200)
    return res.body.items as Event[]
  }

  it('records who changed which role, farm access and activity, newest first', async () => {
    const farmId = (await admin.get('/api/farms?pageSize=1')).body.items[0].id as number
    const user = await createUserWithPassword(server, { role: 'office' })
    await admin.patch(`/api/users/${user.id}`, { role: 'client', farmIds: [farmId] })
    await admin.patch(`/api/users/${user.id}`, { farmIds: [] })
    await admin.patch(`/api/users/${user.id}`, { active: false })
    await admin.patch(`/api/users/${user.id}`, { name: 'Only A Rename' })
    const events = await eventsOf('user', user.id)
    expect(events.map((e) => e.action)).toEqual(['user.deactivated', 'user.farm-access-changed', 'user.role-changed'])
    for (const e of events) expect([e.actorId, e.targetType]).toEqual([adminId, 'user'])
    expect(events[2].changes).toEqual({ role: { from: 'office', to: 'client' }, farmIds: { from: [], to: [farmId] } })
    expect(events[1].changes).toEqual({ farmIds: { from: [farmId], to: [] } })
    expect(events[0].changes).toEqual({ active: { from: true, to: false } })
  })

  it('records work types created, changed and deleted', async () => {
    const existing = (await admin.get('/api/work-types')).body[0] as Record<string, unknown>
    const { id: _id, ...fields } = existing
    const created = await admin.post('/api/work-types', { ...fields, name: unique('Audit pass '), active: false })
    expect(created.status).toBe(201)
    expect((await admin.patch(`/api/work-types/${created.body.id}`, { maxPdop: 3.5 })).status).toBe(200)
    expect((await admin.delete(`/api/work-types/${created.body.id}`)).status).toBe(204)
    const events = await eventsOf('work-type', created.body.id)
    expect(events.map((e) => e.action)).toEqual(['work-type.deleted', 'work-type.changed', 'work-type.created'])
    expect(events[1].changes.maxPdop.to).toBe(3.5)
  })

  it('a refused change leaves no audit row', async () => {
    // Farm links are for client users only: this change is refused as a whole (400).
    const farmId = (await admin.get('/api/farms?pageSize=1')).body.items[0].id as number
    const user = await createUserWithPassword(server, { role: 'office' })
    expect((await admin.patch(`/api/users/${user.id}`, { role: 'contractor', farmIds: [farmId] })).status).toBe(400)
    expect(await eventsOf('user', user.id)).toEqual([])
    expect((await admin.get(`/api/users/${user.id}`)).body.role).toBe('office')
  })

  it('only admins read it, and its filters are checked', async () => {
    expect((await (await signIn(server.app, demo.office)).get('/api/audit')).status).toBe(403)
    expect((await new Client(server.app).get('/api/audit')).status).toBe(401)
    const bad = await admin.get('/api/audit?action=user.exploded')
    expect(bad.status).toBe(400)
    expect(bad.body.error.message).toBeTruthy()
  })
})
