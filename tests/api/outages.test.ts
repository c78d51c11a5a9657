// Satellite outages: entered, listed, edited and removed by office staff and admins;
// validated (end after start); every change emits 'outages.changed' with the affected
// satellites and span; current outages reach GET /api/orbit-data and the jobs loader.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { clearListeners, on } from '../../server/events.ts'
import { loadActiveSatellites } from '../../server/services/orbitData.ts'
import { Client, demo, signIn, startTestServer, type TestServer } from '../support/server.ts'

let server: TestServer
let office: Client
let admin: Client
let crew: Client
let north: Client
const changes: { satIds: string[]; fromMs: number; toMs: number }[] = []
const inHours = (h: number) => new Date(Date.now() + h * 3600_000).toISOString()

beforeAll(async () => {
  server = await startTestServer()
  office = await signIn(server.app, demo.office)
  admin = await signIn(server.app, demo.admin)
  crew = await signIn(server.app, demo.contractor)
  north = await signIn(server.app, demo.clientNorth)
  on('outages.changed', (p) => void changes.push(p))
})
afterAll(async () => {
  clearListeners()
  await server?.close()
})

describe('outages', () => {
  it('an outage is stored, listed, sent with the orbit data and announced', async () => {
    const from = inHours(2)
    const to = inHours(8)
    const res = await office.post('/api/outages', { satId: 'GA1', from, to, note: 'planned manoeuvre' })
    expect(res.status).toBe(201)
    expect(res.body).toMatchObject({ satId: 'GA1', from, to, note: 'planned manoeuvre' })
    expect(changes).toContainEqual({ satIds: ['GA1'], fromMs: Date.parse(from), toMs: Date.parse(to) })
    const list = await office.get('/api/outages')
    expect(list.body.map((o: { id: number }) => o.id)).toContain(res.body.id)
    const data = (await north.get('/api/orbit-data')).body
    expect(data.outages).toContainEqual({ satId: 'GA1', fromMs: Date.parse(from), toMs: Date.parse(to) })
    const loaded = await loadActiveSatellites(server.database.db)
    expect(loaded.outages).toContainEqual({ satId: 'GA1', fromMs: Date.parse(from), toMs: Date.parse(to) })
    expect(loaded.version).toBe(data.version)
  })

  it('editing announces the union of the old and new spans and satellites', async () => {
    const o = (await office.post('/api/outages', { satId: 'EB3', from: inHours(10), to: inHours(12) })).body
    changes.length = 0
    const res = await admin.patch(`/api/outages/${o.id}`, { satId: 'EB4', to: inHours(20) })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ satId: 'EB4', from: o.from, note: '' })
    expect(changes).toHaveLength(1)
    expect(changes[0].satIds.sort()).toEqual(['EB3', 'EB4'])
    expect(changes[0].fromMs).toBe(Date.parse(o.from))
    expect(changes[0].toMs).toBe(Date.parse(res.body.to))
    const bad = await office.patch(`/api/outages/${o.id}`, { to: inHours(1) })
    expect(bad.status).toBe(400)
    expect(bad.body.error.fields.to).toMatch(/after the start/)
    expect((await office.delete(`/api/outages/${o.id}`)).status).toBe(204)
    expect((await office.delete(`/api/outages/${o.id}`)).status).toBe(404)
    expect((await office.patch(`/api/outages/${o.id}`, { note: 'x' })).status).toBe(404)
  })

  it('refuses an end before the start, bad times and a missing satellite', async () => {
    const backwards = await office.post('/api/outages', { satId: 'G05', from: inHours(5), to: inHours(4) })
    expect(backwards.status).toBe(400)
    expect(backwards.body.error.fields.to).toMatch(/after the start/)
    expect((await office.post('/api/outages', { satId: 'G05', from: 'tomorrow', to: inHours(4) })).body.error.fields).toHaveProperty('from')
    expect((await office.post('/api/outages', { from: inHours(1), to: inHours(4) })).body.error.fields).toHaveProperty('satId')
    const long = await office.post('/api/outages', { satId: 'G05', from: inHours(1), to: inHours(24 * 500) })
    expect(long.status).toBe(400)
  })

  it('the list can leave out outages that ended before a given time', async () => {
    const past = (await office.post('/api/outages', { satId: 'R07', from: inHours(-50), to: inHours(-48) })).body
    const all = (await office.get('/api/outages')).body.map((o: { id: number }) => o.id)
    expect(all).toContain(past.id)
    const current = (await office.get(`/api/outages?from=${encodeURIComponent(inHours(0))}`)).body.map((o: { id: number }) => o.id)
    expect(current).not.toContain(past.id)
    // An outage that ended two days ago does not reach the orbit data any more.
    const data = (await crew.get('/api/orbit-data')).body
    expect(data.outages.some((o: { satId: string }) => o.satId === 'R07')).toBe(false)
  })

  it('only office staff and admins manage outages', async () => {
    for (const c of [crew, north]) {
      expect((await c.get('/api/outages')).status).toBe(403)
      expect((await c.post('/api/outages', { satId: 'G01', from: inHours(1), to: inHours(2) })).status).toBe(403)
    }
    expect((await new Client(server.app).get('/api/outages')).status).toBe(401)
  })
})
