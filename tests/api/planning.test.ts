// Service levels, work types and machines: who may read and change them, validation that
// names the field, 409 on duplicates and on deleting something in use, and the demo seed.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { seedPlanning } from '../../seed/planning.ts'
import { clearListeners, on } from '../../server/events.ts'
import { Client, DEMO_PASSWORD, demo, startTestServer, type TestServer } from '../support/server.ts'

let server: TestServer
const clients: Record<string, Client> = {}

async function signIn(email: string): Promise<Client> {
  const client = new Client(server.app)
  const res = await client.post('/api/auth/sign-in', { email, password: DEMO_PASSWORD })
  expect(res.status).toBe(200)
  client.cookie = (res.headers['set-cookie'] as unknown as string[]).map((c) => c.split(';')[0]).join('; ')
  return client
}

beforeAll(async () => {
  server = await startTestServer()
  for (const [role, email] of Object.entries(demo)) clients[role] = await signIn(email)
})

afterAll(async () => {
  clearListeners()
  await server?.close()
})

describe('demo reference data', () => {
  it('has the three service levels with their sigma and the five work types', async () => {
    const levels = await clients.clientNorth.get('/api/service-levels')
    expect(levels.status).toBe(200)
    const byName = Object.fromEntries((levels.body as { name: string; sigmaUereM: number }[]).map((l) => [l.name, l.sigmaUereM]))
    expect(byName).toMatchObject({ Standalone: 3, SBAS: 0.8, RTK: 0.012 })
    const types = await clients.contractor.get('/api/work-types')
    expect(types.status).toBe(200)
    const names = (types.body as { name: string }[]).map((t) => t.name)
    expect(names).toEqual(['Planting', 'Strip-till', 'Spraying', 'Tile drainage', 'Land levelling'])
    const levelling = (types.body as { name: string; maxV95M: number | null; requireN1: boolean }[]).find((t) => t.name === 'Land levelling')!
    expect(levelling.maxV95M).toBeCloseTo(0.035)
    expect(levelling.requireN1).toBe(true)
    const machines = await clients.office.get('/api/machines')
    expect(machines.status).toBe(200)
    expect(machines.body.length).toBeGreaterThanOrEqual(3)
    for (const m of machines.body as { antennaHeightM: number; crew: string }[]) {
      expect(m.antennaHeightM).toBeGreaterThanOrEqual(3)
      expect(m.antennaHeightM).toBeLessThanOrEqual(4)
      expect(m.crew).not.toBe('')
    }
  })

  it('seeding again adds nothing', async () => {
    expect(await seedPlanning(server.database.db)).toEqual({ serviceLevels: 0, workTypes: 0, machines: 0 })
  })
})

describe('service levels', () => {
  it('only admins change them', async () => {
    for (const role of ['office', 'contractor', 'clientNorth']) {
      const res = await clients[role].post('/api/service-levels', { name: 'PPP', sigmaUereM: 0.05 })
      expect(res.status).toBe(403)
    }
    expect((await new Client(server.app).get('/api/service-levels')).status).toBe(401)
  })

  it('creates, refuses bad input naming the field, refuses a duplicate name, updates and deletes', async () => {
    const bad = await clients.admin.post('/api/service-levels', { name: '', sigmaUereM: -1 })
    expect(bad.status).toBe(400)
    expect(Object.keys(bad.body.error.fields)).toEqual(expect.arrayContaining(['name', 'sigmaUereM']))

    const created = await clients.admin.post('/api/service-levels', { name: 'PPP convergence', sigmaUereM: 0.05 })
    expect(created.status).toBe(201)
    expect(created.body).toMatchObject({ name: 'PPP convergence', sigmaUereM: 0.05, note: '' })

    const dup = await clients.admin.post('/api/service-levels', { name: 'PPP convergence', sigmaUereM: 0.1 })
    expect(dup.status).toBe(409)
    expect(dup.body.error.fields.name).toMatch(/already exists/)

    const events: unknown[] = []
    const off = on('planning.changed', (p) => void events.push(p))
    const patched = await clients.admin.patch(`/api/service-levels/${created.body.id}`, { sigmaUereM: 0.04 })
    expect(patched.status).toBe(200)
    expect(patched.body.sigmaUereM).toBe(0.04)
    expect(events).toEqual([{ serviceLevelIds: [created.body.id] }])
    off()

    const removed = await clients.admin.delete(`/api/service-levels/${created.body.id}`)
    expect(removed.status).toBe(204)
    expect((await clients.admin.get(`/api/service-levels/${created.body.id}`)).status).toBe(404)
  })

  it('refuses to delete a level that work types use, naming them', async () => {
    const levels = (await clients.admin.get('/api/service-levels')).body as { id: number; name: string }[]
    const rtk = levels.find((l) => l.name === 'RTK')!
    const res = await clients.admin.delete(`/api/service-levels/${rtk.id}`)
    expect(res.status).toBe(409)
    expect(res.body.error.message).toMatch(/Planting/)
    expect(res.body.error.message).toMatch(/Land levelling/)
  })
})

describe('work types', () => {
  it('validates thresholds and the service level', async () => {
    const bad = await clients.admin.post('/api/work-types', {
      name: 'Seeding cover crop',
      serviceLevelId: 999999,
      maxH95M: 0.3,
      maxV95M: null,
      minSats: 3,
      maxPdop: 6,
      requiredShare: 1.5,
      requireN1: false,
      rateHaPerH: 10,
    })
    expect(bad.status).toBe(400)
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['minSats', 'requiredShare'])

    const noLevel = await clients.admin.post('/api/work-types', {
      name: 'Seeding cover crop',
      serviceLevelId: 999999,
      maxH95M: 0.3,
      maxV95M: null,
      minSats: 5,
      maxPdop: 6,
      requiredShare: 0.8,
      requireN1: false,
      rateHaPerH: 10,
    })
    expect(noLevel.status).toBe(400)
    expect(noLevel.body.error.fields.serviceLevelId).toMatch(/999999/)
  })

  it('creates, updates (emitting a re-forecast for all fields) and deletes', async () => {
    const levels = (await clients.admin.get('/api/service-levels')).body as { id: number; name: string }[]
    const sbas = levels.find((l) => l.name === 'SBAS')!
    const created = await clients.admin.post('/api/work-types', {
      name: 'Cover crop seeding',
      serviceLevelId: sbas.id,
      maxH95M: 0.5,
      minSats: 5,
      maxPdop: 6,
      requiredShare: 0.8,
      requireN1: false,
      rateHaPerH: 12,
    })
    expect(created.status).toBe(201)
    expect(created.body).toMatchObject({ maxV95M: null, active: true, sortOrder: 0 })
    const events: unknown[] = []
    const off = on('planning.changed', (p) => void events.push(p))
    const renamed = await clients.admin.patch(`/api/work-types/${created.body.id}`, { name: 'Cover crop drilling' })
    expect(renamed.status).toBe(200)
    expect(events).toEqual([]) // a name does not change forecasts
    const tighter = await clients.admin.patch(`/api/work-types/${created.body.id}`, { maxPdop: 4 })
    expect(tighter.body.maxPdop).toBe(4)
    expect(events).toEqual([{ serviceLevelIds: 'all' }])
    off()
    expect((await clients.office.patch(`/api/work-types/${created.body.id}`, { maxPdop: 5 })).status).toBe(403)
    expect((await clients.admin.delete(`/api/work-types/${created.body.id}`)).status).toBe(204)
    expect((await clients.admin.delete(`/api/work-types/${created.body.id}`)).status).toBe(404)
  })
})

describe('machines', () => {
  it('creates with defaults, validates the antenna height, updates and deletes', async () => {
    const bad = await clients.admin.post('/api/machines', { name: 'Drone', antennaHeightM: 40 })
    expect(bad.status).toBe(400)
    expect(bad.body.error.fields.antennaHeightM).toMatch(/at most 10 m/)
    const created = await clients.admin.post('/api/machines', { name: 'Tractor 31 · grain cart', antennaHeightM: 3.3 })
    expect(created.status).toBe(201)
    expect(created.body).toMatchObject({ crew: '', rateHaPerH: null, active: true, notes: '' })
    const patched = await clients.admin.patch(`/api/machines/${created.body.id}`, { crew: 'Jo Aldana', rateHaPerH: 8 })
    expect(patched.body).toMatchObject({ crew: 'Jo Aldana', rateHaPerH: 8, antennaHeightM: 3.3 })
    const cleared = await clients.admin.patch(`/api/machines/${created.body.id}`, { rateHaPerH: null })
    expect(cleared.body.rateHaPerH).toBeNull()
    expect((await clients.contractor.delete(`/api/machines/${created.body.id}`)).status).toBe(403)
    expect((await clients.admin.delete(`/api/machines/${created.body.id}`)).status).toBe(204)
  })
})
