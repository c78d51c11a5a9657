// Health, meta, security headers, error bodies, body limits and the client fallback.
import { mkdtempSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { createApp } from '../../server/app.ts'
import { openDatabase } from '../../server/db/index.ts'
import { Client, signIn, startTestServer, demo, type TestServer } from '../support/server.ts'

let server: TestServer

beforeAll(async () => {
  server = await startTestServer()
})
afterAll(async () => {
  await server?.close()
})

describe('health and meta', () => {
  it('reports the database as reachable', async () => {
    const res = await request(server.app).get('/api/health')
    expect(res.status).toBe(200)
    expect(res.body).toEqual({ status: 'ok', database: 'ok' })
  })

  it('answers 503 with database "down" when the database cannot be reached', async () => {
    // A pool pointing at a port where nothing listens.
    const url = new URL(server.config.databaseUrl)
    url.port = '1'
    const broken = openDatabase(url.toString(), { connectionLimit: 1 })
    try {
      const app = createApp({ config: server.config, db: broken.db, mailer: server.mailer })
      const res = await request(app).get('/api/health')
      expect(res.status).toBe(503)
      expect(res.body).toEqual({ status: 'degraded', database: 'down' })
    } finally {
      await broken.close()
    }
  })

  it('gives public facts without signing in', async () => {
    const res = await request(server.app).get('/api/meta')
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ fakeMailbox: true, demo: true, version: expect.any(String) })
    expect(res.body.businessName).toBeTruthy()
  })

  it('reports no demo sign-ins in production', async () => {
    const app = server.appWith({ nodeEnv: 'production' })
    expect((await request(app).get('/api/meta')).body.demo).toBe(false)
  })
})

describe('security headers', () => {
  it('sends a content security policy that allows the client build and workers', async () => {
    const res = await request(server.app).get('/api/health')
    const csp = res.headers['content-security-policy'] as string
    expect(csp).toContain("script-src 'self'")
    expect(csp).toContain("style-src 'self' 'unsafe-inline'")
    expect(csp).toContain("img-src 'self' data: blob:")
    expect(csp).toContain("worker-src 'self' blob:")
    expect(csp).not.toContain('upgrade-insecure-requests')
    expect(res.headers['x-content-type-options']).toBe('nosniff')
    expect(res.headers['x-powered-by']).toBeUndefined()
    expect(res.headers['cache-control']).toBe('no-store')
  })

  it('asks for HTTPS only when PUBLIC_URL is https', async () => {
    const app = server.appWith({ publicUrl: 'https://plans.example.test', cookieSecure: true })
    const res = await request(app).get('/api/health')
    expect(res.headers['strict-transport-security']).toContain('max-age=')
    expect(res.headers['content-security-policy']).toContain('upgrade-insecure-requests')
  })
})

describe('errors', () => {
  it('answers unknown API paths with a JSON 404', async () => {
    const res = await request(server.app).get('/api/no-such-thing')
    expect(res.status).toBe(404)
    expect(res.body.error).toMatchObject({ code: 'not_found' })
    expect(res.headers['content-type']).toContain('application/json')
  })

  it('answers malformed JSON with 400', async () => {
    const res = await new Client(server.app)
      .post('/api/auth/sign-in')
      .set('Content-Type', 'application/json')
      .send('{"email": ')
    expect(res.status).toBe(400)
    expect(res.body.error.code).toBe('invalid_json')
  })

  it('refuses bodies over 1 MB with 413', async () => {
    const admin = await signIn(server.app, demo.admin)
    const res = await admin.post('/api/farms', { name: 'Big', timeZone: 'UTC', notes: 'x'.repeat(1_100_000) })
    expect(res.status).toBe(413)
    expect(res.body.error.code).toBe('payload_too_large')
  })

  it('never sends a stack trace outside development', async () => {
    // A database that cannot be reached makes sign-in fail with a 503 and a sentence (the
    // 500 of any other unexpected error hides its stack too: tests/unit/server/http.test.ts).
    const url = new URL(server.config.databaseUrl)
    url.port = '1'
    const broken = openDatabase(url.toString(), { connectionLimit: 1 })
    try {
      const app = createApp({ config: server.config, db: broken.db, mailer: server.mailer })
      const res = await new Client(app).post('/api/auth/sign-in', { email: demo.admin, password: 'whatever-it-is' })
      expect(res.status).toBe(503)
      expect(res.body.error.code).toBe('database_unavailable')
      expect(res.body.error.message).toMatch(/database is not reachable/)
      expect(JSON.stringify(res.body)).not.toMatch(/at .*\.ts/)
    } finally {
      await broken.close()
    }
  })
})

describe('the web client', () => {
  it('serves index.html for client routes and a build hint when dist/ is missing', async () => {
    const dist = mkdtempSync(join(tmpdir(), 'skyfurrow-dist-'))
    const missing = server.appWith({}, { distDir: join(dist, 'nothing-here') })
    const hint = await request(missing).get('/admin/farms')
    expect(hint.status).toBe(503)
    expect(hint.text).toContain('npm run build')

    writeFileSync(join(dist, 'index.html'), '<!doctype html><title>client</title>')
    const built = server.appWith({}, { distDir: dist })
    const page = await request(built).get('/admin/farms')
    expect(page.status).toBe(200)
    expect(page.text).toContain('<title>client</title>')
    // API paths and missing files never fall back to the client.
    expect((await request(built).get('/api/unknown')).status).toBe(404)
    expect((await request(built).get('/assets/index-gone.js')).status).toBe(404)
    writeFileSync(join(dist, 'robots.txt'), 'User-agent: *')
    expect((await request(built).get('/robots.txt')).text).toBe('User-agent: *')
  })
})
