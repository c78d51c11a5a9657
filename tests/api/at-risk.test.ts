// At risk: when a replaced forecast closes an hour of a booked pass (or makes it only Tight
// where the work type needs Clear), the pass is flagged with the reason and a suggested
// window for the same duration and machine; a later forecast that holds clears the flag.
// Forecast hours are written through the forecasts repository, as a job stores them, and
// the 'forecast.stored' event is emitted as the job runner emits it.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { HOUR_MS, isNightHour, localLabel } from '../../shared/planning/index.ts'
import type { Pass } from '../../shared/schemas/passes.ts'
import { clearListeners, emit } from '../../server/events.ts'
import { hoursFromNow, makeField, makeMachine, planningWorld, type PlanningWorld, removeMadeRecords, storeForecast } from '../support/passes.ts'
import { startTestServer, type TestServer } from '../support/server.ts'

let server: TestServer
let w: PlanningWorld
let field: { id: number; name: string; areaHa: number }
let centroid: { latDeg: number; lonDeg: number }
const h0 = hoursFromNow(0)
const at = (h: number) => h0 + h * HOUR_MS
const iso = (h: number) => new Date(at(h)).toISOString()
const HOURS = 96

/** Replaces the field's forecast and runs the listeners as the job runner does. */
async function recompute(states: Record<number, string>) {
  const jobId = await storeForecast(server, field.id, h0, states)
  await emit('forecast.stored', { fieldId: field.id, jobId })
}

beforeAll(async () => {
  server = await startTestServer()
  w = await planningWorld(server)
  field = await makeField(server, w, w.northFarmId, { areaHa: 12 })
  const row = await server.repos.fields.findById(field.id)
  centroid = { latDeg: row!.centroidLat, lonDeg: row!.centroidLon }
  await recompute({ [w.workTypes.planting.id]: 'C'.repeat(HOURS), [w.workTypes.spraying.id]: 'C'.repeat(HOURS) })
})
afterAll(async () => {
  clearListeners()
  if (server) await removeMadeRecords(server)
  await server?.close()
})

/** Offset (h) of the first 3-hour stretch after a day that is night throughout at the field. */
function nightStretch(): number {
  for (let h = 24; h < HOURS - 3; h++) if ([0, 1, 2].every((k) => isNightHour(at(h + k), centroid))) return h
  throw new Error('no night stretch found')
}

/** Offset (h) of the first 3-hour stretch from `from` whose hours are all night (or all day) at the field. */
function stretchFrom(from: number, night: boolean): number {
  for (let h = from; h < HOURS - 3; h++) if ([0, 1, 2].every((k) => isNightHour(at(h + k), centroid) === night)) return h
  throw new Error(`no ${night ? 'night' : 'day'} stretch from hour ${from}`)
}

describe('passes at risk', () => {
  it('flags a pass whose hour closes, with the reason and a suggested window', async () => {
    const m = await makeMachine(server)
    const n = nightStretch()
    // The pass runs at night, so when no daylight window holds a night window may be
    // suggested: here the only free Clear stretch (hours 8-10) is the answer either way.
    const pass = await w.crew.post('/api/passes', { fieldId: field.id, workTypeId: w.workTypes.planting.id, machineId: m.id, start: iso(n), durationMin: 180 })
    expect(pass.status).toBe(201)
    expect(pass.body.atRisk).toBe(false)
    // Another booking of the same machine covers the first Clear stretch (hours 2-4).
    const other = await w.crew.post('/api/passes', { fieldId: field.id, workTypeId: w.workTypes.spraying.id, machineId: m.id, start: iso(2), durationMin: 180 })
    expect(other.status).toBe(201)

    // New forecast for planting: hours 2-4 Clear, 5-7 Tight (planting needs Clear), 8-10
    // Clear, the pass's middle hour Closed, everything else Closed.
    const planting = [...'X'.repeat(HOURS)]
    for (const h of [2, 3, 4, 8, 9, 10, n, n + 2]) planting[h] = 'C'
    for (const h of [5, 6, 7]) planting[h] = 'T'
    await recompute({ [w.workTypes.planting.id]: planting.join(''), [w.workTypes.spraying.id]: 'C'.repeat(HOURS) })

    const flagged = (await w.crew.get(`/api/passes/${pass.body.id}`)).body as Pass
    expect(flagged.atRisk).toBe(true)
    expect(flagged.atRiskReason).toBe(`1 hour Closed for Planting: ${localLabel(at(n + 1), flagged.timeZone)}.`)
    expect(flagged.suggestedStart).toBe(iso(8))
    // The spraying pass on hours 2-4 holds.
    expect((await w.crew.get(`/api/passes/${other.body.id}`)).body.atRisk).toBe(false)

    // Listed for the farm's own client, not for another farm's.
    const list = (await w.north.get(`/api/passes/at-risk?farmId=${w.northFarmId}`)).body as Pass[]
    expect(list.map((p) => p.id)).toContain(pass.body.id)
    expect(((await w.south.get('/api/passes/at-risk')).body as Pass[]).map((p) => p.id)).not.toContain(pass.body.id)
    expect((await w.south.get(`/api/passes/at-risk?farmId=${w.northFarmId}`)).status).toBe(404)

    // A forecast that holds again clears the flag and the suggestion.
    await recompute({ [w.workTypes.planting.id]: 'C'.repeat(HOURS), [w.workTypes.spraying.id]: 'C'.repeat(HOURS) })
    const cleared = (await w.crew.get(`/api/passes/${pass.body.id}`)).body as Pass
    expect(cleared).toMatchObject({ atRisk: false, atRiskReason: null, suggestedStart: null })
    expect(((await w.crew.get('/api/passes/at-risk')).body as Pass[]).map((p) => p.id)).not.toContain(pass.body.id)
  })

  it('flags Tight hours only where the work type needs Clear', async () => {
    const planting = await w.crew.post('/api/passes', { fieldId: field.id, workTypeId: w.workTypes.planting.id, start: iso(40), durationMin: 120 })
    const spraying = await w.crew.post('/api/passes', { fieldId: field.id, workTypeId: w.workTypes.spraying.id, start: iso(40), durationMin: 120 })
    const tight = [...'C'.repeat(HOURS)]
    tight[41] = 'T'
    await recompute({ [w.workTypes.planting.id]: tight.join(''), [w.workTypes.spraying.id]: tight.join('') })
    const p = (await w.crew.get(`/api/passes/${planting.body.id}`)).body as Pass
    expect(p.atRisk).toBe(true)
    expect(p.atRiskReason).toContain('only Tight where Planting needs Clear')
    expect((await w.crew.get(`/api/passes/${spraying.body.id}`)).body.atRisk).toBe(false)
  })

  it('flags a pass booked into a Closed hour at once, and never done or cancelled passes', async () => {
    const closed = [...'C'.repeat(HOURS)]
    closed[60] = 'X'
    await recompute({ [w.workTypes.planting.id]: closed.join(''), [w.workTypes.spraying.id]: closed.join('') })
    const res = await w.crew.post('/api/passes', { fieldId: field.id, workTypeId: w.workTypes.spraying.id, start: iso(59), durationMin: 120 })
    expect(res.status).toBe(201)
    expect(res.body.atRisk).toBe(true)
    expect(res.body.suggestedStart).not.toBeNull()
    const cancelled = await w.crew.post(`/api/passes/${res.body.id}/cancel`)
    expect(cancelled.body).toMatchObject({ status: 'cancelled', atRisk: false, atRiskReason: null })
    await recompute({ [w.workTypes.planting.id]: closed.join(''), [w.workTypes.spraying.id]: closed.join('') })
    expect((await w.crew.get(`/api/passes/${res.body.id}`)).body.atRisk).toBe(false)
  })

  it('suggests daylight by default, even for a pass booked at night, while a daylight window exists', async () => {
    const m = await makeMachine(server)
    // The sun decides day and night at the field's centroid (shared/planning/night.ts, after suncalc).
    const p = stretchFrom(24, true)
    const earlyNight = stretchFrom(p + 3, true)
    const day = stretchFrom(earlyNight + 3, false)
    const planting = [...'X'.repeat(HOURS)]
    for (const h of [p, p + 2, earlyNight, earlyNight + 1, earlyNight + 2, day, day + 1, day + 2]) planting[h] = 'C'
    await recompute({ [w.workTypes.planting.id]: planting.join(''), [w.workTypes.spraying.id]: 'C'.repeat(HOURS) })
    const res = await w.crew.post('/api/passes', { fieldId: field.id, workTypeId: w.workTypes.planting.id, machineId: m.id, start: iso(p), durationMin: 180 })
    expect(res.status).toBe(201)
    expect(res.body.atRisk).toBe(true)
    // The earlier night window holds too, but the daylight one is proposed.
    expect(res.body.suggestedStart).toBe(iso(day))
    await w.crew.post(`/api/passes/${res.body.id}/cancel`)
  })
})
