// The HTTP building blocks without a database: validation messages, the error middleware,
// the Origin check and the role guards, on a tiny Express app.
import express from 'express'
import request from 'supertest'
import { describe, expect, it } from 'vitest'
import { z } from 'zod'
import { requireRole } from '../../../server/auth/middleware.ts'
import { errorMiddleware, HttpError } from '../../../server/http/errors.ts'
import { originCheck } from '../../../server/http/origin.ts'
import { fieldMessages, parse } from '../../../server/http/validate.ts'
import type { Logger } from '../../../server/logger.ts'
import { farmInputSchema } from '../../../shared/schemas/farms.ts'

const quiet = () => {}
const silent: Logger = { error: quiet, warn: quiet, info: quiet, debug: quiet }

describe('parse', () => {
  it('returns the parsed value', () => {
    expect(parse(farmInputSchema, { name: ' Home ', timeZone: 'Europe/Berlin' })).toEqual({
      name: 'Home',
      timeZone: 'Europe/Berlin',
      address: '',
      notes: '',
      clientIds: [],
    })
  })

  it('throws a 400 naming each field once, with dotted paths for nested values', () => {
    try {
      parse(farmInputSchema, { name: '', timeZone: 'Atlantis/Capital', clientIds: [1, -2] })
      expect.unreachable()
    } catch (error) {
      expect(error).toBeInstanceOf(HttpError)
      const e = error as HttpError
      expect(e.status).toBe(400)
      expect(e.fields).toEqual({
        name: 'Enter the farm name',
        timeZone: 'Choose an IANA time zone such as America/Chicago',
        'clientIds.1': expect.any(String),
      })
      expect(e.message).toBe('Check the request: name, timeZone, clientIds.1.')
    }
  })

  it('describes a body that is not an object at all', () => {
    const schema = z.object({ a: z.string() })
    expect(fieldMessages(schema.safeParse('text').error!)).toHaveProperty('_')
    expect(() => parse(schema, [1, 2])).toThrow(/not valid/)
  })
})

function appWith(setup: (app: express.Express) => void) {
  const app = express()
  app.use(express.json())
  setup(app)
  app.use(errorMiddleware(silent, false))
  return app
}

describe('error middleware', () => {
  it('writes HttpError as JSON with code, message and fields', async () => {
    const app = appWith((a) =>
      a.get('/x', () => {
        throw new HttpError(409, 'conflict', 'Taken.', { name: 'Taken.' })
      }),
    )
    const res = await request(app).get('/x')
    expect(res.status).toBe(409)
    expect(res.body).toEqual({ error: { code: 'conflict', message: 'Taken.', fields: { name: 'Taken.' } } })
  })

  it('hides unexpected errors (and their stacks) behind a 500', async () => {
    const app = appWith((a) =>
      a.get('/x', async () => {
        throw new Error('secret internals at /srv/app.ts:12')
      }),
    )
    const res = await request(app).get('/x')
    expect(res.status).toBe(500)
    expect(res.body.error.code).toBe('internal')
    expect(JSON.stringify(res.body)).not.toContain('secret')
  })

  it('adds the stack for 500s in development only', async () => {
    const app = express()
    app.get('/x', () => {
      throw new Error('boom')
    })
    app.use(errorMiddleware(silent, true))
    const res = await request(app).get('/x')
    expect(res.body.error.stack).toContain('boom')
  })
})

describe('originCheck', () => {
  const app = appWith((a) => {
    a.use(originCheck('https://plans.example.test'))
    a.all('/x', (_req, res) => {
      res.status(204).end()
    })
  })

  it('lets safe methods through without an origin', async () => {
    expect((await request(app).get('/x')).status).toBe(204)
    expect((await request(app).head('/x')).status).toBe(204)
  })

  it('accepts the public origin and the request host', async () => {
    expect((await request(app).post('/x').set('Origin', 'https://plans.example.test')).status).toBe(204)
    expect((await request(app).delete('/x').set('Host', 'office.lan:3000').set('Origin', 'http://office.lan:3000')).status).toBe(204)
    expect((await request(app).patch('/x').set('Referer', 'https://plans.example.test/admin/farms')).status).toBe(204)
  })

  it('refuses other origins, "null", and requests naming none', async () => {
    for (const origin of ['https://plans.example.test.evil.example', 'http://plans.example.test', 'null']) {
      const res = await request(app).post('/x').set('Origin', origin)
      expect(res.status, origin).toBe(403)
      expect(res.body.error.code).toBe('bad_origin')
    }
    expect((await request(app).put('/x')).status).toBe(403)
  })
})

describe('requireRole', () => {
  const app = appWith((a) => {
    a.use((req, _res, next) => {
      const role = req.get('x-role')
      if (role) req.auth = { session: {} as never, user: { id: 1, email: 'a@b.c', name: 'A', role: role as 'admin', units: 'metric', farmIds: [] } }
      next()
    })
    a.get('/admin', requireRole('admin'), (_req, res) => {
      res.json({ ok: true })
    })
  })

  it('answers 401 when signed out, 403 for other roles, and passes the allowed role', async () => {
    expect((await request(app).get('/admin')).status).toBe(401)
    expect((await request(app).get('/admin').set('x-role', 'office')).status).toBe(403)
    expect((await request(app).get('/admin').set('x-role', 'admin')).status).toBe(200)
  })
})
