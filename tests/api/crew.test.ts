// The cab view's API: a crew member's week on the machines they run, pass status with who
// and when (planned, confirmed, started, done, cancelled), notes from the field, and the
// version check that refuses a change made from an outdated copy (a change queued offline
// while the office moved the pass) with 409 instead of overwriting it; each hour says
// whether it is a night hour at the field.
import SunCalc from 'suncalc'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { HOUR_MS } from '../../shared/planning/index.ts'
import type { SessionUser } from '../../shared/schemas/auth.ts'
import type { CrewWeek } from '../../shared/schemas/crew.ts'
import type { Pass } from '../../shared/schemas/passes.ts'
import { composePlan, mondayOf } from '../../server/services/plansCompose.ts'
import { hoursFromNow, makeField, makeMachine, planningWorld, type PlanningWorld, removeMadeRecords, storeForecast } from '../support/passes.ts'
import { createUserWithPassword, signIn, startTestServer, type Client, type TestServer } from '../support/server.ts'

let server: TestServer
let w: PlanningWorld
let operator: { id: number; client: Client }
let machine: { id: number; name: string }
let field: { id: number; name: string; areaHa: number }
const made: number[] = []

beforeAll(async () => {
  server = await startTestServer()
  w = await planningWorld(server)
  const user = await createUserWithPassword(server, { role: 'contractor' })
  operator = { id: user.id, client: await signIn(server.app, user.email, user.password) }
  machine = await makeMachine(server)
  const set = await w.admin.patch(`/api/machines/${machine.id}`, { operatorUserId: user.id })
  expect(set.status).toBe(200)
  expect(set.body.operatorUserId).toBe(user.id)
  field = await makeField(server, w, w.northFarmId, { areaHa: 10 })
  // Planting: 3 Clear hours, 1 Tight, then Closed; spraying Clear all week.
  await storeForecast(server, field.id, hoursFromNow(0), { [w.workTypes.planting.id]: 'CCCTXXXX' + 'C'.repeat(40) })
})
afterAll(async () => {
  for (const id of made) await server.repos.passes.update(id, { status: 'cancelled' })
  if (server) await removeMadeRecords(server)
  await server?.close()
})

async function book(startH: number, durationMin = 120): Promise<Pass> {
  const res = await w.office.post('/api/passes', {
    fieldId: field.id,
    workTypeId: w.workTypes.planting.id,
    machineId: machine.id,
    start: new Date(hoursFromNow(startH)).toISOString(),
    durationMin,
  })
  expect(res.status).toBe(201)
  made.push(res.body.id)
  return res.body as Pass
}

describe('the crew week', () => {
  it('lists the passes of the machines the user runs, with the field shape and its hours', async () => {
    const pass = await book(1)
    const res = await operator.client.get('/api/crew/week')
    expect(res.status).toBe(200)
    const week = res.body as CrewWeek
    expect(week.machines.map((m) => m.id)).toEqual([machine.id])
    const listed = week.passes.find((p) => p.id === pass.id)!
    expect(listed.fieldName).toBe(field.name)
    expect(listed.boundary.type).toBe('Polygon')
    // The stored planting hours of the field, in order, as written.
    expect(listed.hours.slice(0, 5).map((h) => h.state)).toEqual(['clear', 'clear', 'clear', 'tight', 'closed'])
    expect(listed.hours[0].startMs).toBe(hoursFromNow(0))
    // Every hour carries its night flag; 48 hours at 42 N hold both days and nights.
    expect(listed.hours.every((h) => typeof h.night === 'boolean')).toBe(true)
    expect(new Set(listed.hours.map((h) => h.night))).toEqual(new Set([true, false]))
    expect(Date.parse(week.generatedAt)).toBeGreaterThan(Date.now() - 60_000)

    // The demo contractor runs other machines: this pass is not in their week.
    const other = (await w.crew.get('/api/crew/week')).body as CrewWeek
    expect(other.passes.map((p) => p.id)).not.toContain(pass.id)
    // A farm client runs no machine.
    expect((await w.north.get('/api/crew/week')).status).toBe(403)
  })

  it('refuses a farm client as a machine operator, naming the user', async () => {
    const client = await server.repos.users.findByEmail('client.north@demo.skyfurrow.test')
    const res = await w.admin.patch(`/api/machines/${machine.id}`, { operatorUserId: client!.id })
    expect(res.status).toBe(400)
    expect(res.body.error.message).toContain(`${client!.name} is a farm client`)
    expect(res.body.error.fields.operatorUserId).toBeTruthy()
  })
})

describe('pass status', () => {
  it('records who set the status and when, and bumps the version', async () => {
    const pass = await book(10)
    expect(pass.status).toBe('planned')
    expect(pass.version).toBe(1)
    const before = Date.now()
    const started = await operator.client.post(`/api/passes/${pass.id}/status`, { status: 'started', version: pass.version })
    expect(started.status).toBe(200)
    expect(started.body).toMatchObject({ status: 'started', statusChangedBy: operator.id, statusChangedByName: 'Test contractor', version: 2 })
    expect(Date.parse(started.body.statusChangedAt)).toBeGreaterThanOrEqual(before - 1000)
    // A started pass still holds its machine: another booking over it is refused.
    const clash = await w.office.post('/api/passes', {
      fieldId: field.id,
      workTypeId: w.workTypes.planting.id,
      machineId: machine.id,
      start: new Date(hoursFromNow(10)).toISOString(),
      durationMin: 60,
    })
    expect(clash.status).toBe(409)

    const done = await operator.client.post(`/api/passes/${pass.id}/status`, { status: 'done', version: 2, note: 'Finished the headlands too.' })
    expect(done.status).toBe(200)
    expect(done.body).toMatchObject({ status: 'done', version: 3 })
    expect(done.body.notes).toMatch(/\[.+, Test contractor\] Finished the headlands too\.$/)

    // The office sees it done on Passes, with who.
    const listed = (await w.office.get(`/api/passes?fieldId=${field.id}&status=done`)).body as Pass[]
    expect(listed.find((p) => p.id === pass.id)).toMatchObject({ status: 'done', statusChangedByName: 'Test contractor' })

    // Sending the same status again (an outbox resend) changes nothing.
    const again = await operator.client.post(`/api/passes/${pass.id}/status`, { status: 'done' })
    expect(again.body.version).toBe(3)
  })

  it('refuses a change made from an outdated copy with 409 that says what happened', async () => {
    const pass = await book(20)
    // The office moves the pass while the cab copy still has version 1.
    const moved = await w.office.patch(`/api/passes/${pass.id}`, { start: new Date(hoursFromNow(21)).toISOString() })
    expect(moved.body.version).toBe(2)
    const stale = await operator.client.post(`/api/passes/${pass.id}/status`, { status: 'done', version: 1 })
    expect(stale.status).toBe(409)
    expect(stale.body.error.code).toBe('pass_changed')
    expect(stale.body.error.message).toContain(`Planting on ${field.name}`)
    expect(stale.body.error.message).toContain('Your change was not applied')
    // Nothing was written.
    expect((await w.office.get(`/api/passes/${pass.id}`)).body).toMatchObject({ status: 'planned', version: 2 })
    // Sent again without a version (the crew chose "send it anyway"), it applies.
    const forced = await operator.client.post(`/api/passes/${pass.id}/status`, { status: 'done' })
    expect(forced.status).toBe(200)
    expect(forced.body.status).toBe('done')
  })

  it('keeps cancelling as before and refuses starting a cancelled pass', async () => {
    const pass = await book(30)
    const cancelled = await w.office.post(`/api/passes/${pass.id}/cancel`)
    expect(cancelled.body).toMatchObject({ status: 'cancelled', statusChangedByName: 'Priya Castellanos' })
    const start = await operator.client.post(`/api/passes/${pass.id}/status`, { status: 'started' })
    expect(start.status).toBe(409)
    expect(start.body.error.message).toBe('A cancelled pass cannot be marked started; plan it again first.')
    const bad = await operator.client.post(`/api/passes/${pass.id}/status`, { status: 'finished' })
    expect(bad.status).toBe(400)
    expect(bad.body.error.fields.status).toContain('Use one of')
  })

  it('adds notes from the field with their author, and checks the version', async () => {
    const pass = await book(36)
    const noted = await operator.client.post(`/api/passes/${pass.id}/notes`, { text: 'Wet corner at the south-east gate.', version: 1 })
    expect(noted.status).toBe(200)
    expect(noted.body.notes).toContain('Test contractor] Wet corner at the south-east gate.')
    expect(noted.body.version).toBe(2)
    expect((await operator.client.post(`/api/passes/${pass.id}/notes`, { text: 'Again', version: 1 })).status).toBe(409)
    expect((await operator.client.post(`/api/passes/${pass.id}/notes`, { text: '  ' })).status).toBe(400)
    expect((await w.north.post(`/api/passes/${pass.id}/notes`, { text: 'client' })).status).toBe(403)
  })

  it('reports done passes in the weekly plan e-mail', async () => {
    const pass = await book(40)
    await operator.client.post(`/api/passes/${pass.id}/status`, { status: 'done' })
    const row = (await server.repos.passes.findById(pass.id))!
    const plan = await composePlan(server.repos, w.northFarmId, mondayOf(row.startAt.getTime(), row.timeZone), '')
    const line = plan.text.split('\n').findIndex((l) => l.includes(field.name))
    expect(line).toBeGreaterThanOrEqual(0)
    expect(plan.text).toMatch(/; Done \w{3} \d{2}:\d{2}/)
    expect(plan.html).toContain('Done ')
  })
})

describe('night hours in the crew week', () => {
  it('flags each hour by the sun at the field centroid, for a known place and date', async () => {
    // An invented field in northern Illinois; Sat 5 Dec 2026, 00:00 CST (06:00 UTC) on, two days.
    const place = await makeField(server, w, w.northFarmId, { areaHa: 10, latDeg: 42.0, lonDeg: -87.9 })
    const row = (await server.repos.fields.findById(place.id))!
    const from = Date.UTC(2026, 11, 5, 6)
    await storeForecast(server, place.id, from, { [w.workTypes.planting.id]: 'C'.repeat(48) })
    const passId = await server.repos.passes.insert({
      fieldId: place.id,
      workTypeId: w.workTypes.planting.id,
      machineId: machine.id,
      startAt: new Date(Date.UTC(2026, 11, 5, 15)),
      durationMin: 120,
      status: 'planned',
      atRisk: false,
      atRiskReason: null,
      suggestedStartAt: null,
      notes: '',
      createdBy: null,
    })
    // The week as the server builds it at 08:00 CST that Saturday.
    const me = (await operator.client.get('/api/auth/me')).body as SessionUser
    const week = await server.app.locals.services.crew.week(me, Date.UTC(2026, 11, 5, 14))
    const listed = week.passes.find((p) => p.id === passId)!
    expect(listed.hours.map((h) => h.startMs)).toEqual(Array.from({ length: 48 }, (_, i) => from + i * HOUR_MS))

    // Reference: suncalc's getTimes at the centroid (sunrise and sunset = the sun's centre at
    // -0.833 deg, the usual refraction of 0.567 deg plus the semi-diameter of 0.266 deg;
    // suncalc 1.9.0 README and its `times` table, after Astronomy Answers,
    // https://aa.quae.nl/en/reken/zonpositie.html). A night hour's middle lies before that
    // day's sunrise or after its sunset; here both lie 8 min or more from any hour's middle.
    const night = (startMs: number) => {
      const mid = startMs + HOUR_MS / 2
      const { sunrise, sunset } = SunCalc.getTimes(new Date(mid), row.centroidLat, row.centroidLon)
      return mid < sunrise.getTime() || mid > sunset.getTime()
    }
    expect(listed.hours.map((h) => h.night)).toEqual(listed.hours.map((h) => night(h.startMs)))
    // Saturday's day hours: 07:00-16:00 CST (sunrise 07:05, sunset 16:21 CST), nine of them.
    const day = listed.hours.slice(0, 24).filter((h) => !h.night)
    expect(day.map((h) => h.startMs)).toEqual(Array.from({ length: 9 }, (_, i) => Date.UTC(2026, 11, 5, 13 + i)))
  })
})
