// Passes: booking with an estimated duration, reading by role and farm, validation that
// names the field, changes, cancel and done, and a machine that can never be booked twice,
// also not by two requests at the same moment.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { HOUR_MS } from '../../shared/planning/index.ts'
import type { Pass } from '../../shared/schemas/passes.ts'
import { clearListeners } from '../../server/events.ts'
import { hoursFromNow, makeField, makeMachine, planningWorld, type PlanningWorld, removeMadeRecords } from '../support/passes.ts'
import { startTestServer, type TestServer } from '../support/server.ts'

let server: TestServer
let w: PlanningWorld
let northField: { id: number; name: string; areaHa: number }
let southField: { id: number; name: string; areaHa: number }
let machine: { id: number; name: string }
let slowMachine: { id: number; name: string }
// Far enough ahead that no stored forecast covers it: these passes are never at risk.
const base = hoursFromNow(24 * 30)
const at = (h: number) => new Date(base + h * HOUR_MS).toISOString()

beforeAll(async () => {
  server = await startTestServer()
  w = await planningWorld(server)
  northField = await makeField(server, w, w.northFarmId, { areaHa: 40 })
  southField = await makeField(server, w, w.southFarmId, { areaHa: 12 })
  machine = await makeMachine(server)
  slowMachine = await makeMachine(server, 4.5)
})
afterAll(async () => {
  clearListeners()
  if (server) await removeMadeRecords(server)
  await server?.close()
})

describe('booking a pass', () => {
  it('estimates the duration from the area and the work rate, the machine rate first', async () => {
    const res = await w.crew.post('/api/passes', { fieldId: northField.id, workTypeId: w.workTypes.planting.id, machineId: machine.id, start: at(0) })
    expect(res.status).toBe(201)
    const p = res.body as Pass
    // 40 ha at the demo planting rate of 6 ha/h = 6 h 40 min -> 6 h 45 min.
    expect(p.durationMin).toBe(405)
    expect(p).toMatchObject({
      fieldId: northField.id,
      fieldName: northField.name,
      farmId: w.northFarmId,
      workTypeName: 'Planting',
      requiresClear: true,
      machineId: machine.id,
      machineName: machine.name,
      status: 'planned',
      atRisk: false,
      start: at(0),
      end: new Date(base + 405 * 60_000).toISOString(),
    })
    expect(p.timeZone).toMatch(/\//)

    const slow = await w.office.post('/api/passes', { fieldId: northField.id, workTypeId: w.workTypes.planting.id, machineId: slowMachine.id, start: at(0), status: 'confirmed' })
    expect(slow.status).toBe(201)
    // 40 ha at the machine's 4.5 ha/h = 8 h 53 min -> 9 h.
    expect(slow.body.durationMin).toBe(540)
    expect(slow.body.status).toBe('confirmed')

    const typed = await w.admin.post('/api/passes', { fieldId: southField.id, workTypeId: w.workTypes.spraying.id, start: at(2), durationMin: 50, notes: 'Edge rows first' })
    expect(typed.status).toBe(201)
    expect(typed.body).toMatchObject({ durationMin: 50, machineId: null, notes: 'Edge rows first' })
  })

  it('refuses bad input with a 400 naming the field', async () => {
    const cases: Array<[Record<string, unknown>, string]> = [
      [{ workTypeId: w.workTypes.planting.id, start: at(0) }, 'fieldId'],
      [{ fieldId: northField.id, workTypeId: w.workTypes.planting.id, start: 'next tuesday' }, 'start'],
      [{ fieldId: northField.id, workTypeId: w.workTypes.planting.id, start: at(0), durationMin: 5 }, 'durationMin'],
      [{ fieldId: northField.id, workTypeId: w.workTypes.planting.id, start: at(0), status: 'done' }, 'status'],
      [{ fieldId: 999_999, workTypeId: w.workTypes.planting.id, start: at(0) }, 'fieldId'],
      [{ fieldId: northField.id, workTypeId: 999_999, start: at(0) }, 'workTypeId'],
      [{ fieldId: northField.id, workTypeId: w.workTypes.planting.id, machineId: 999_999, start: at(0) }, 'machineId'],
    ]
    for (const [body, field] of cases) {
      const res = await w.crew.post('/api/passes', body)
      expect(res.status, JSON.stringify(body)).toBe(400)
      expect(Object.keys(res.body.error.fields ?? {}), JSON.stringify(res.body)).toContain(field)
    }
    const patch = await w.crew.patch('/api/passes/1', { status: 'finished' })
    expect([400, 404]).toContain(patch.status)
  })

  it('lets clients read their own farms only, and change nothing', async () => {
    const mine = await w.crew.post('/api/passes', { fieldId: northField.id, workTypeId: w.workTypes.spraying.id, start: at(20), durationMin: 60 })
    const theirs = await w.crew.post('/api/passes', { fieldId: southField.id, workTypeId: w.workTypes.spraying.id, start: at(20), durationMin: 60 })
    expect((await w.north.get(`/api/passes/${mine.body.id}`)).status).toBe(200)
    expect((await w.north.get(`/api/passes/${theirs.body.id}`)).status).toBe(404)
    const list = await w.north.get(`/api/passes?from=${at(-1)}&to=${at(200)}`)
    expect(list.status).toBe(200)
    const farms = new Set((list.body as Pass[]).map((p) => p.farmId))
    expect([...farms]).toEqual([w.northFarmId])
    expect((await w.north.get(`/api/passes?farmId=${w.southFarmId}`)).status).toBe(404)
    expect((await w.north.post('/api/passes', { fieldId: northField.id, workTypeId: w.workTypes.spraying.id, start: at(30) })).status).toBe(403)
    expect((await w.north.patch(`/api/passes/${mine.body.id}`, { notes: 'x' })).status).toBe(403)
    expect((await w.north.post(`/api/passes/${mine.body.id}/cancel`)).status).toBe(403)
  })

  it('filters by farm, field, span and status', async () => {
    const res = await w.admin.get(`/api/passes?fieldId=${northField.id}&from=${at(0)}&to=${at(1)}&status=planned,confirmed`)
    expect(res.status).toBe(200)
    const list = res.body as Pass[]
    expect(list.length).toBeGreaterThanOrEqual(2)
    for (const p of list) {
      expect(p.fieldId).toBe(northField.id)
      expect(['planned', 'confirmed']).toContain(p.status)
      expect(Date.parse(p.start)).toBeLessThan(base + HOUR_MS)
      expect(Date.parse(p.end)).toBeGreaterThan(base)
    }
    const sorted = [...list].sort((a, b) => Date.parse(a.start) - Date.parse(b.start))
    expect(list.map((p) => p.id)).toEqual(sorted.map((p) => p.id))
    const bad = await w.admin.get('/api/passes?status=maybe')
    expect(bad.status).toBe(400)
    expect(Object.keys(bad.body.error.fields).join()).toMatch(/^status/)
    const backwards = await w.admin.get(`/api/passes?from=${at(5)}&to=${at(1)}`)
    expect(backwards.status).toBe(400)
    expect(backwards.body.error.fields).toHaveProperty('to')
  })
})

describe('one machine, one pass at a time', () => {
  it('refuses an overlapping booking with 409 naming the other pass', async () => {
    const m = await makeMachine(server)
    const first = await w.crew.post('/api/passes', { fieldId: northField.id, workTypeId: w.workTypes.stripTill.id, machineId: m.id, start: at(48), durationMin: 180 })
    expect(first.status).toBe(201)
    const clash = await w.crew.post('/api/passes', { fieldId: southField.id, workTypeId: w.workTypes.spraying.id, machineId: m.id, start: at(50), durationMin: 60 })
    expect(clash.status).toBe(409)
    const msg: string = clash.body.error.message
    expect(msg).toContain(m.name)
    expect(msg).toContain(northField.name)
    expect(msg).toContain('Strip-till')
    expect(msg).toContain(`pass ${first.body.id}`)
    // the local start time of the other pass, in its farm's zone
    const local = new Intl.DateTimeFormat('en-GB', { timeZone: first.body.timeZone, hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }).format(new Date(at(48)))
    expect(msg).toContain(local)
    expect(clash.body.error.fields).toHaveProperty('machineId')

    // Back to back is fine: [start, end) spans.
    const after = await w.crew.post('/api/passes', { fieldId: southField.id, workTypeId: w.workTypes.spraying.id, machineId: m.id, start: at(51), durationMin: 60 })
    expect(after.status).toBe(201)
    // Moving the second pass onto the first is refused too.
    const move = await w.crew.patch(`/api/passes/${after.body.id}`, { start: at(49) })
    expect(move.status).toBe(409)
    // A cancelled pass frees the machine; planning it again checks again.
    expect((await w.crew.post(`/api/passes/${first.body.id}/cancel`)).body.status).toBe('cancelled')
    expect((await w.crew.patch(`/api/passes/${after.body.id}`, { start: at(49) })).status).toBe(200)
    const revive = await w.crew.patch(`/api/passes/${first.body.id}`, { status: 'planned' })
    expect(revive.status).toBe(409)
    expect(revive.body.error.message).toContain(`pass ${after.body.id}`)
  })

  it('lets exactly one of two simultaneous bookings of a machine through', async () => {
    for (let round = 0; round < 4; round++) {
      const m = await makeMachine(server)
      const body = (fieldId: number, h: number) => ({ fieldId, workTypeId: w.workTypes.spraying.id, machineId: m.id, start: at(100 + h), durationMin: 120 })
      const [a, b] = await Promise.all([w.crew.post('/api/passes', body(northField.id, 0)), w.office.post('/api/passes', body(southField.id, 1))])
      expect([a.status, b.status].sort()).toEqual([201, 409])
      const stored = await w.admin.get(`/api/passes?machineId=${m.id}&status=planned`)
      expect(stored.body).toHaveLength(1)
    }
  })
})

describe('changing a pass', () => {
  it('changes what is sent, re-estimates on request, marks done, never cancelled to done', async () => {
    const m = await makeMachine(server, 8)
    const res = await w.crew.post('/api/passes', { fieldId: northField.id, workTypeId: w.workTypes.planting.id, start: at(300) })
    const id = res.body.id
    expect(res.body.durationMin).toBe(405)
    const patched = await w.crew.patch(`/api/passes/${id}`, { machineId: m.id, durationMin: null, notes: 'Switched tractors' })
    expect(patched.status).toBe(200)
    // 40 ha at 8 ha/h = 5 h
    expect(patched.body).toMatchObject({ machineId: m.id, durationMin: 300, notes: 'Switched tractors', start: at(300) })
    const typed = await w.crew.patch(`/api/passes/${id}`, { durationMin: 330 })
    expect(typed.body.durationMin).toBe(330)
    expect((await w.crew.post(`/api/passes/${id}/done`)).body.status).toBe('done')
    expect((await w.crew.get(`/api/passes/${id}`)).body.status).toBe('done')
    const other = await w.crew.post('/api/passes', { fieldId: northField.id, workTypeId: w.workTypes.planting.id, start: at(320) })
    await w.crew.post(`/api/passes/${other.body.id}/cancel`)
    const done = await w.crew.post(`/api/passes/${other.body.id}/done`)
    expect(done.status).toBe(409)
    expect((await w.crew.get('/api/passes/999999')).status).toBe(404)
    expect((await w.crew.patch('/api/passes/999999', { notes: 'x' })).status).toBe(404)
  })
})

describe('demo passes', () => {
  it('are in the coming days on the demo fields, and seeding again adds none', async () => {
    const { seedPasses } = await import('../../seed/passes.ts')
    await seedPasses(server.database.db)
    expect(await seedPasses(server.database.db)).toEqual({ passes: 0, skipped: [] })
    const now = Date.now()
    const upcoming = (await w.admin.get(`/api/passes?from=${new Date(now).toISOString()}&to=${new Date(now + 8 * 86_400_000).toISOString()}`)).body as Pass[]
    const demo = upcoming.filter((p) => p.createdBy === null && !p.fieldName.startsWith('Test field') && !p.fieldName.startsWith('Matrix field'))
    expect(demo.length).toBeGreaterThan(0)
    for (const p of demo) {
      expect(Date.parse(p.start)).toBeGreaterThan(now)
      expect(['planned', 'confirmed']).toContain(p.status)
    }
  })
})
