// An hour's detail: the stored figures of the hour, the engine's values at every sample
// point over the hour, and the sky view at the worst point, computed with the active orbit
// data and the farm's obstructions.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { dopFromDirections } from '../../shared/precision/index.ts'
import { HOUR_MS } from '../../shared/planning/index.ts'
import type { HourDetail } from '../../shared/schemas/passes.ts'
import { clearListeners } from '../../server/events.ts'
import { hoursFromNow, makeField, planningWorld, type PlanningWorld, removeMadeRecords, storeForecast } from '../support/passes.ts'
import { startTestServer, unique, type TestServer } from '../support/server.ts'

let server: TestServer
let w: PlanningWorld
let shaded: { id: number }
let open: { id: number }
const hour = hoursFromNow(3)
const lat = 41.9
const lon = -94.1

beforeAll(async () => {
  server = await startTestServer()
  w = await planningWorld(server)
  // A farm of its own, so its tall tree line touches no other test.
  const farmId = await server.repos.farms.insert({ name: unique('Hour detail farm '), timeZone: 'America/Chicago', address: '', notes: '' })
  shaded = await makeField(server, w, farmId, { areaHa: 16, latDeg: lat, lonDeg: lon })
  // A 25 m evergreen shelterbelt along the field's south edge (400 m square).
  await server.repos.obstructions.insert({
    farmId,
    kind: 'evergreen',
    heightM: 25,
    geometry: JSON.stringify({ type: 'LineString', coordinates: [[lon - 0.001, lat - 0.0002], [lon + 0.006, lat - 0.0002]] }),
    leaflessFrom: null,
    leaflessTo: null,
    note: 'invented test shelterbelt',
  })
  open = await makeField(server, w, w.northFarmId, { areaHa: 10 })
  await storeForecast(server, open.id, hour, { [w.workTypes.planting.id]: 'T' })
})
afterAll(async () => {
  clearListeners()
  if (server) await removeMadeRecords(server)
  await server?.close()
})

describe('hour detail', () => {
  it('maps the field at its sample points and shows the sky at the worst one', async () => {
    const res = await w.crew.get(`/api/fields/${shaded.id}/hour-detail?hour=${new Date(hour + 20 * 60_000).toISOString()}`)
    expect(res.status).toBe(200)
    const d = res.body as HourDetail
    expect(d.hourStart).toBe(new Date(hour).toISOString()) // any time inside the hour names the hour
    expect(d.stored).toBeNull()
    expect(d.timeZone).toBe('America/Chicago')
    const { points, worstPoint, sky } = d.computed
    expect(points.length).toBeGreaterThan(20)
    for (const p of points) {
      expect(p.latDeg).toBeGreaterThanOrEqual(lat - 1e-6)
      expect(p.latDeg).toBeLessThanOrEqual(lat + 0.004)
      expect(p.lonDeg).toBeGreaterThanOrEqual(lon - 1e-6)
      expect(p.workTypes.map((x) => x.workTypeId)).toContain(w.workTypes.planting.id)
    }
    // The worst point has the highest HDOP of all (or no fix).
    const hdop = (p: { hdopMax: number | null }) => p.hdopMax ?? Infinity
    expect(Math.max(...points.map(hdop))).toBe(hdop(points[worstPoint.index]))
    expect([worstPoint.latDeg, worstPoint.lonDeg]).toEqual([points[worstPoint.index].latDeg, points[worstPoint.index].lonDeg])
    // Points next to the shelterbelt lose more sky than points across the field.
    const nearest = points.reduce((a, b) => (a.latDeg < b.latDeg ? a : b))
    const farthest = points.reduce((a, b) => (a.latDeg > b.latDeg ? a : b))
    expect(nearest.horizonMaxDeg).toBeGreaterThan(farthest.horizonMaxDeg)
    expect(nearest.horizonMaxDeg).toBeGreaterThan(10)
    // The sky view: 360 mask bins, satellites with status, and DOP equal to the DOP of the
    // satellites it reports as used.
    expect(sky.horizonMaskDeg).toHaveLength(360)
    expect(Math.max(...sky.horizonMaskDeg)).toBeGreaterThan(0)
    const used = sky.satellites.filter((s) => s.status === 'used')
    expect(used.map((s) => s.id).sort()).toEqual([...sky.used].sort())
    expect(used.length).toBeGreaterThanOrEqual(4)
    const check = dopFromDirections(used.map((s) => ({ azimuthDeg: s.azimuthDeg, elevationDeg: s.elevationDeg, system: s.system })))
    expect(sky.dop!.hdop).toBeCloseTo(check!.hdop, 3)
    expect(sky.satellites.some((s) => s.status === 'behind-obstruction' || s.status === 'below-mask')).toBe(true)
    expect(d.computed.orbitSummary).not.toBe('')
  })

  it('includes the stored figures of the hour', async () => {
    const res = await w.north.get(`/api/fields/${open.id}/hour-detail?hour=${new Date(hour).toISOString()}`)
    expect(res.status).toBe(200)
    const stored = (res.body as HourDetail).stored!
    expect(stored).toMatchObject({ hourStart: new Date(hour).toISOString(), hdopMax: 0.9, satsMin: 14 })
    expect(stored.workTypes).toContainEqual({ workTypeId: w.workTypes.planting.id, workTypeName: 'Planting', share: 1, shareN1: 0.5, state: 'tight' })
  })

  it('is for the farm’s own clients and names bad input', async () => {
    expect((await w.south.get(`/api/fields/${open.id}/hour-detail?hour=${new Date(hour).toISOString()}`)).status).toBe(404)
    const missing = await w.crew.get(`/api/fields/${open.id}/hour-detail`)
    expect(missing.status).toBe(400)
    expect(missing.body.error.fields).toHaveProperty('hour')
    const far = await w.crew.get(`/api/fields/${open.id}/hour-detail?hour=${new Date(hour + 400 * 24 * HOUR_MS).toISOString()}`)
    expect(far.status).toBe(400)
    expect(far.body.error.fields).toHaveProperty('hour')
    expect((await w.crew.get(`/api/fields/999999/hour-detail?hour=${new Date(hour).toISOString()}`)).status).toBe(404)
  })
})
