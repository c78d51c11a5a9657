// Find a window: ranked proposals from the stored forecast (all Clear first, then fewest
// Tight hours, then earliest), no Closed hour inside, the machine's bookings and night hours
// left out, the duration estimated when not given, and one click to book the window.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { HOUR_MS, isNightHour } from '../../shared/planning/index.ts'
import type { WindowSearchResult } from '../../shared/schemas/passes.ts'
import { clearListeners } from '../../server/events.ts'
import { hoursFromNow, makeField, makeMachine, planningWorld, type PlanningWorld, removeMadeRecords, storeForecast } from '../support/passes.ts'
import { startTestServer, type TestServer } from '../support/server.ts'

let server: TestServer
let w: PlanningWorld
let field: { id: number; name: string; areaHa: number }
const h0 = hoursFromNow(0)
const iso = (h: number) => new Date(h0 + h * HOUR_MS).toISOString()
//               0   4    9   13  16  20 23 25
const pattern = 'XXXXCCCCCXXXXCCCXXXXTTCXXTCC' + 'X'.repeat(20)

beforeAll(async () => {
  server = await startTestServer()
  w = await planningWorld(server)
  field = await makeField(server, w, w.northFarmId, { areaHa: 40 })
  await storeForecast(server, field.id, h0, { [w.workTypes.planting.id]: pattern, [w.workTypes.spraying.id]: 'C'.repeat(48) })
})
afterAll(async () => {
  clearListeners()
  if (server) await removeMadeRecords(server)
  await server?.close()
})

const search = (query: string) => w.crew.get(`/api/fields/${field.id}/windows?${query}`)

describe('find a window', () => {
  it('ranks all-Clear windows first, then fewest Tight hours, then earliest; never a Closed hour', async () => {
    const res = await search(`workTypeId=${w.workTypes.planting.id}&durationMin=180&allowNight=1&from=${iso(0)}&to=${iso(48)}`)
    expect(res.status).toBe(200)
    const r = res.body as WindowSearchResult
    expect(r).toMatchObject({ fieldId: field.id, durationMin: 180, durationEstimated: false, allowNight: true, forecastHours: 48, machineId: null })
    expect(r.windows.map((x) => [x.start, x.clearHours, x.tightHours, x.score])).toEqual([
      [iso(4), 3, 0, 1],
      [iso(13), 3, 0, 1],
      [iso(25), 2, 1, 0.667],
      [iso(20), 1, 2, 0.333],
    ])
    expect(r.windows[0].end).toBe(iso(7))
    expect(r.windows[0].localStart).toMatch(/^\d{4}-\d\d-\d\d \d\d:\d\d$/)
  })

  it("leaves out the machine's bookings", async () => {
    const m = await makeMachine(server)
    const booked = await w.crew.post('/api/passes', { fieldId: field.id, workTypeId: w.workTypes.spraying.id, machineId: m.id, start: iso(5), durationMin: 180 })
    expect(booked.status).toBe(201)
    const res = await search(`workTypeId=${w.workTypes.planting.id}&durationMin=180&allowNight=1&machineId=${m.id}&from=${iso(0)}&to=${iso(48)}`)
    // Hours 4-8 are Clear, but the machine is busy 5-8: the first free Clear stretch is 13-15.
    expect((res.body as WindowSearchResult).windows[0].start).toBe(iso(13))
  })

  it('estimates the duration when none is given (machine rate first)', async () => {
    const res = await search(`workTypeId=${w.workTypes.spraying.id}&allowNight=1&from=${iso(0)}&to=${iso(48)}`)
    // 40 ha at the demo spraying rate of 25 ha/h = 1 h 36 min -> 1 h 45 min.
    expect(res.body).toMatchObject({ durationMin: 105, durationEstimated: true })
    const m = await makeMachine(server, 10)
    const withMachine = await search(`workTypeId=${w.workTypes.spraying.id}&machineId=${m.id}&allowNight=1&from=${iso(0)}&to=${iso(48)}`)
    expect(withMachine.body.durationMin).toBe(240)
  })

  it('keeps to daylight unless night hours are allowed', async () => {
    const all = (await search(`workTypeId=${w.workTypes.spraying.id}&durationMin=180&allowNight=1&from=${iso(0)}&to=${iso(48)}&limit=20`)).body as WindowSearchResult
    const day = (await search(`workTypeId=${w.workTypes.spraying.id}&durationMin=180&from=${iso(0)}&to=${iso(48)}&limit=20`)).body as WindowSearchResult
    expect(day.allowNight).toBe(false)
    expect(all.windows.length).toBeGreaterThan(day.windows.length)
    // 48 hours at about 42 N always hold a daylit stretch of 3 hours.
    expect(day.windows.length).toBeGreaterThan(0)
    const f = await server.repos.fields.findById(field.id)
    for (const win of day.windows) {
      for (let t = Date.parse(win.start); t < Date.parse(win.end); t += HOUR_MS) {
        expect(isNightHour(t, { latDeg: f!.centroidLat, lonDeg: f!.centroidLon })).toBe(false)
      }
    }
    expect(all.windows.some((win) => isNightHour(Date.parse(win.start), { latDeg: f!.centroidLat, lonDeg: f!.centroidLon }))).toBe(true)
  })

  it('books a window in one click, after which the machine is busy there', async () => {
    const m = await makeMachine(server)
    const q = `workTypeId=${w.workTypes.planting.id}&durationMin=180&allowNight=1&machineId=${m.id}&from=${iso(0)}&to=${iso(48)}`
    const before = (await search(q)).body as WindowSearchResult
    const pick = before.windows[0]
    const booked = await w.crew.post('/api/passes', { fieldId: field.id, workTypeId: w.workTypes.planting.id, machineId: m.id, start: pick.start, durationMin: before.durationMin })
    expect(booked.status).toBe(201)
    expect(booked.body).toMatchObject({ start: pick.start, end: pick.end, atRisk: false })
    const after = (await search(q)).body as WindowSearchResult
    expect(after.windows.map((x) => x.start)).not.toContain(pick.start)
    expect(after.windows[0].start).toBe(before.windows[1].start)
  })

  it('answers an empty list before any forecast is stored', async () => {
    const bare = await makeField(server, w, w.northFarmId)
    const res = await w.crew.get(`/api/fields/${bare.id}/windows?workTypeId=${w.workTypes.planting.id}`)
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ forecastHours: 0, windows: [] })
  })

  it('refuses bad input naming it, and clients', async () => {
    const cases: Array<[string, string]> = [
      ['durationMin=60', 'workTypeId'],
      [`workTypeId=${w.workTypes.planting.id}&durationMin=5`, 'durationMin'],
      [`workTypeId=${w.workTypes.planting.id}&allowNight=maybe`, 'allowNight'],
      [`workTypeId=${w.workTypes.planting.id}&from=yesterday`, 'from'],
      ['workTypeId=999999', 'workTypeId'],
      [`workTypeId=${w.workTypes.planting.id}&machineId=999999`, 'machineId'],
      [`workTypeId=${w.workTypes.planting.id}&from=${iso(10)}&to=${iso(5)}`, 'to'],
      [`workTypeId=${w.workTypes.planting.id}&from=${iso(0)}&to=${iso(24 * 20)}`, 'to'],
    ]
    for (const [query, name] of cases) {
      const res = await search(query)
      expect(res.status, query).toBe(400)
      expect(Object.keys(res.body.error.fields ?? {}), query).toContain(name)
    }
    expect((await w.crew.get(`/api/fields/999999/windows?workTypeId=${w.workTypes.planting.id}`)).status).toBe(404)
    expect((await w.north.get(`/api/fields/${field.id}/windows?workTypeId=${w.workTypes.planting.id}`)).status).toBe(403)
  })
})
