// An hour's detail: the stored figures of the hour, the engine's values at every sample
// point over the hour, and the sky view at the worst point, computed with the active orbit
// data and the farm's obstructions; its error budget (geometry, baseline, space weather)
// with each part's figure, and a stale Kp feed said as stale.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { dopFromDirections } from '../../shared/precision/index.ts'
import { HOUR_MS } from '../../shared/planning/index.ts'
import type { CorrectionSources } from '../../shared/schemas/corrections.ts'
import type { HourDetail } from '../../shared/schemas/passes.ts'
import type { ServiceLevel } from '../../shared/schemas/planning.ts'
import { clearListeners } from '../../server/events.ts'
import { ageKpFeed, keepKpFeed, readLocalFakeFeed } from '../support/kpFeed.ts'
import { hoursFromNow, makeField, planningWorld, type PlanningWorld, removeMadeRecords, storeForecast } from '../support/passes.ts'
import { startTestServer, unique, type TestServer } from '../support/server.ts'

let server: TestServer
let w: PlanningWorld
let shaded: { id: number }
let open: { id: number }
const hour = hoursFromNow(3)
/** Puts back the Kp feed this file found. */
let restoreFeed: (() => Promise<void>) | undefined
const lat = 41.9
const lon = -94.1

beforeAll(async () => {
  server = await startTestServer()
  restoreFeed = await keepKpFeed(server)
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
  await restoreFeed?.()
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

  it('splits the error budget into geometry x sigma, the baseline part and the space-weather flag, each with its figure', async () => {
    const blocks = await readLocalFakeFeed(server)
    const d = (await w.north.get(`/api/fields/${open.id}/hour-detail?hour=${new Date(hour).toISOString()}`)).body as HourDetail
    const b = d.errorBudget
    const rtk = ((await w.admin.get('/api/service-levels')).body as ServiceLevel[]).find((l) => l.name === 'RTK')!
    // The demo RTK level: sigma 0.012 m (DESIGN.md demo defaults) and 1 mm per km of baseline
    // both ways ("a few mm + 1 ppm", receiver data sheets; common practice, no single source).
    expect(rtk).toMatchObject({ sigmaUereM: 0.012, ppmH: 1, ppmV: 1 })
    // The stored hour's worst DOPs (HDOP 0.9, VDOP 1.4, as storeForecast writes them) times sigma:
    // H 2 x 0.9 x 0.012 = 0.0216 m, V 1.96 x 1.4 x 0.012 = 0.032928 m (errorModel.ts; ENGINE.md step 8).
    expect(b).toMatchObject({ hdop: 0.9, vdop: 1.4, sigmaUereM: 0.012 })
    expect(b.geometryH95M).toBeCloseTo(0.0216, 9)
    expect(b.geometryV95M).toBeCloseTo(0.032928, 9)
    // The baseline b: the field's centroid to its link's base. Cross-checked on a sphere of the
    // IUGG mean radius R1 = 6371.0088 km (Moritz, "Geodetic Reference System 1980", Bulletin
    // Geodesique 54, 1980) by the haversine formula, which lies within 0.5 % of the WGS-84
    // geodesic over a few tens of km.
    const sources = (await w.admin.get('/api/corrections')).body as CorrectionSources
    expect(b.link).not.toBeNull()
    const base = sources.bases.find((x) => x.name === b.link!.name)!
    const field = (await server.repos.fields.findById(open.id))!
    const rad = Math.PI / 180
    const h = Math.sin(((base.latDeg - field.centroidLat) * rad) / 2) ** 2 +
      Math.cos(field.centroidLat * rad) * Math.cos(base.latDeg * rad) * Math.sin(((base.lonDeg - field.centroidLon) * rad) / 2) ** 2
    const sphereKm = 2 * 6371.0088 * Math.asin(Math.sqrt(h))
    expect(Math.abs(b.link!.baselineKm - sphereKm) / sphereKm).toBeLessThan(0.005)
    const km = b.link!.baselineKm
    // H95 = 2 (HDOP sigma + ppm_H b), V95 = 1.96 (VDOP sigma + ppm_V b), ppm b in mm (/1000 for m).
    expect(b.baselineH95M).toBeCloseTo((2 * 1 * km) / 1000, 9)
    expect(b.baselineV95M).toBeCloseTo((1.96 * 1 * km) / 1000, 9)
    expect(b.h95M).toBeCloseTo(2 * (0.9 * 0.012 + (1 * km) / 1000), 9)
    expect(b.v95M).toBeCloseTo(1.96 * (1.4 * 0.012 + (1 * km) / 1000), 9)
    // The same sum on the sphere's b, to the 0.5 % of b above.
    expect(b.h95M!).toBeCloseTo(2 * (0.9 * 0.012 + sphereKm / 1000), 3)
    // The space-weather flag: the highest Kp of the feed's blocks touching the hour, read on
    // the NOAA G-scale (NOAA SWPC, "NOAA Space Weather Scales", geomagnetic storms: G1 at Kp 5 ... G5 at Kp 9).
    const touching = blocks.filter((x) => x.blockStart.getTime() < hour + HOUR_MS && x.blockEnd.getTime() > hour)
    expect(touching.length).toBeGreaterThan(0)
    const kpMax = Math.max(...touching.map((x) => x.kp))
    const noaaG = kpMax < 4.5 ? 0 : kpMax < 5.5 ? 1 : kpMax < 6.5 ? 2 : kpMax < 7.5 ? 3 : kpMax < 9 ? 4 : 5
    expect(b.spaceWeather).toEqual({ kpMax, g: noaaG })
    expect(b.spaceWeatherFeed.state).toBe('current')
  })

  it('says the space-weather part is stale when the feed is old, with the time of its last read', async () => {
    await readLocalFakeFeed(server)
    const putBack = await keepKpFeed(server)
    try {
      // Last read 40 hours ago: past the 36 hours after which the feed is stale.
      const lastOk = await ageKpFeed(server, 40 * HOUR_MS)
      const d = (await w.north.get(`/api/fields/${open.id}/hour-detail?hour=${new Date(hour).toISOString()}`)).body as HourDetail
      expect(d.errorBudget.spaceWeatherFeed).toEqual({ state: 'stale', lastOkAt: lastOk.toISOString() })
      // The old forecast's figure is still carried, but the feed's state goes with it.
      expect(d.errorBudget.spaceWeather).not.toBeNull()
    } finally {
      await putBack()
    }
    const again = (await w.north.get(`/api/fields/${open.id}/hour-detail?hour=${new Date(hour).toISOString()}`)).body as HourDetail
    expect(again.errorBudget.spaceWeatherFeed.state).toBe('current')
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
