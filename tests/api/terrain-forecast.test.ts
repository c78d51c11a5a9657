// An elevation model changes the stored forecast: on a farm of its own, a field at the foot
// of a valley wall to the east is forecast without a model, then the model is uploaded; the
// upload queues the field's recompute (reason 'terrain'), the real job runner (worker
// threads) runs it, and the stored hours lose satellites in some hours and gain none, their
// DOP rising or staying. Removing a satellite never lowers DOP: its row a leaves
// A^T A - a a^T <= A^T A, and the inverse of positive definite matrices reverses that order
// (R. A. Horn, C. R. Johnson, "Matrix Analysis", Cambridge 1985, corollary 7.7.4; from
// memory), so every diagonal entry of (A^T A)^-1, and each DOP, is no smaller. The hour
// detail shows the wall as the terrain horizon (closed form of shared/precision/terrain.ts)
// and names the terrain as the reason a satellite is not used. Everything made here is
// removed afterwards.
import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { EARTH_MEAN_RADIUS_M, fromPlane, localPlane, TERRAIN_REFRACTION_K, toPlane } from '../../shared/precision/index.ts'
import type { FieldForecastResponse, ForecastHour } from '../../shared/schemas/forecast.ts'
import type { Job } from '../../shared/schemas/jobs.ts'
import type { HourDetail } from '../../shared/schemas/passes.ts'
import { jobs as jobsTable } from '../../server/db/schema-planning.ts'
import { clearListeners } from '../../server/events.ts'
import type { JobsHandle } from '../../server/jobs/index.ts'
import { startFileJobs, until } from '../support/fileJobs.ts'
import { demo, signIn, startTestServer, unique, type Client, type TestServer } from '../support/server.ts'
import { utmTiff } from '../support/tiff.ts'

// An invented farm in an alpine valley; the field is 200 m x 200 m around CENTRE.
const CENTRE = { latDeg: 46.62, lonDeg: 9.78 }
const GROUND_M = 600
const WALL_M = 900
/** The wall rises from the valley floor 300 m east of the centre (UTM easting), */
const WALL_FROM_M = 300
/** and a lower step 1200 m west of it. */
const SLOPE_FROM_M = -1200
const SLOPE_M = 800
const ANTENNA_M = 3
const CELL_M = 25

let server: TestServer
let jobs: JobsHandle
let admin: Client
let crew: Client
let farmId: number
let fieldId: number
let wallCellM: number
let slopeCellM: number

/** The field's forecast job of `reason` once it is done (failed fails the test). */
async function doneJob(reason: string): Promise<Job> {
  return until(async () => {
    const list = (await admin.get(`/api/jobs?fieldId=${fieldId}&limit=20`)).body.items as Job[]
    const job = list.find((j) => j.kind === 'forecast' && j.reason === reason)
    if (job?.status === 'failed') throw new Error(`the ${reason} job failed: ${job.error}`)
    return job?.status === 'done' ? job : null
  }, `the field's ${reason} job`, 120_000)
}

const forecast = async () => (await crew.get(`/api/fields/${fieldId}/forecast`)).body as FieldForecastResponse

beforeAll(async () => {
  server = await startTestServer()
  jobs = await startFileJobs(server, 1)
  admin = await signIn(server.app, demo.admin)
  crew = await signIn(server.app, demo.contractor)
  const farm = await admin.post('/api/farms', { name: unique('Steinbock Meadow '), timeZone: 'Europe/Zurich' })
  expect(farm.status).toBe(201)
  farmId = farm.body.id
  const rtk = await server.repos.serviceLevels.findByName('RTK')
  const plane = localPlane(CENTRE.latDeg, CENTRE.lonDeg)
  const corner = (x: number, y: number) => {
    const p = fromPlane(plane, x, y)
    return [p.lonDeg, p.latDeg]
  }
  const field = await crew.post(`/api/farms/${farmId}/fields`, {
    name: 'Valley floor',
    serviceLevelId: rtk!.id,
    antennaHeightM: ANTENNA_M,
    boundary: { type: 'Polygon', coordinates: [[corner(-100, -100), corner(100, -100), corner(100, 100), corner(-100, 100), corner(-100, -100)]] },
  })
  expect(field.status).toBe(201)
  fieldId = field.body.id
}, 180_000)

afterAll(async () => {
  await jobs?.stop()
  clearListeners()
  // The farm's fields, their stored hours and the elevation model go with the farm; its job rows by hand.
  if (farmId) {
    await admin.delete(`/api/farms/${farmId}`)
    await server.database.db.delete(jobsTable).where(eq(jobsTable.farmId, farmId))
  }
  await server?.close()
})

describe('an elevation model upload changes the forecast', () => {
  let before: FieldForecastResponse
  let after: FieldForecastResponse

  it('computes the field without a model, then queues and runs its recompute when a model covering it is uploaded', async () => {
    await doneJob('field')
    before = await forecast()
    expect(before.hours.length).toBeGreaterThanOrEqual(167)

    const model = utmTiff(CENTRE.lonDeg, CENTRE.latDeg, (e) => (e >= WALL_FROM_M ? WALL_M : e <= SLOPE_FROM_M ? SLOPE_M : GROUND_M), {
      width: 200,
      height: 160,
      cellM: CELL_M,
    })
    // UTM easting (from the centre's) of the wall's first cell centre and of the step's last.
    const cellE = Array.from({ length: model.width }, (_, i) => model.left + (i + 0.5) * model.cell - model.E0)
    wallCellM = Math.min(...cellE.filter((e) => e >= WALL_FROM_M))
    slopeCellM = Math.max(...cellE.filter((e) => e <= SLOPE_FROM_M))
    const res = await crew.call('post', `/api/farms/${farmId}/terrain`).attach('file', Buffer.from(model.bytes), 'valley.tif')
    expect(res.status).toBe(201)
    expect(res.body.fieldsCovered).toEqual([{ id: fieldId, name: 'Valley floor' }])
    // The upload queued the field's recompute, with the terrain as its reason.
    const job = await doneJob('terrain')
    expect(job.result).toMatch(/hours stored/)
    after = await forecast()
    expect(after.inputsVersion).not.toBe(before.inputsVersion)
  }, 240_000)

  it('stores fewer satellites in some hours and never more; DOP only rises', () => {
    const old = new Map(before.hours.map((h) => [h.time, h]))
    const pairs = after.hours.filter((h) => old.has(h.time)).map((h): [ForecastHour, ForecastHour] => [old.get(h.time)!, h])
    // Both runs cover the farm's same week (unless its midnight passed in between).
    expect(pairs.length).toBeGreaterThanOrEqual(143)
    const worse = (a: number | null, b: number | null) => (b === null ? a !== null : a !== null && b > a)
    for (const [was, now] of pairs) {
      expect(now.satsMin!).toBeLessThanOrEqual(was.satsMin!)
      expect(now.satsMedian!).toBeLessThanOrEqual(was.satsMedian!)
      expect(now.noFixShare).toBeGreaterThanOrEqual(was.noFixShare)
      // The median counts a sample without a fix as the worst, so it can only rise (or be lost).
      if (was.hdopMedian !== null && now.hdopMedian !== null) expect(now.hdopMedian).toBeGreaterThanOrEqual(was.hdopMedian)
      if (was.vdopMedian !== null && now.vdopMedian !== null) expect(now.vdopMedian).toBeGreaterThanOrEqual(was.vdopMedian)
    }
    expect(pairs.filter(([was, now]) => now.satsMin! < was.satsMin!).length).toBeGreaterThan(0)
    expect(pairs.filter(([was, now]) => now.satsMedian! < was.satsMedian!).length).toBeGreaterThan(0)
    expect(pairs.filter(([was, now]) => worse(was.hdopMedian, now.hdopMedian)).length).toBeGreaterThan(0)
  })

  it('the hour detail shows the wall as the terrain horizon and names the terrain behind hidden satellites', async () => {
    // The hour that lost the most satellites (median over the field).
    const old = new Map(before.hours.map((h) => [h.time, h]))
    const lost = (h: ForecastHour) => old.get(h.time)!.satsMedian! - h.satsMedian!
    const hardest = after.hours.filter((h) => old.has(h.time)).reduce((a, b) => (lost(b) > lost(a) ? b : a))
    const res = await crew.get(`/api/fields/${fieldId}/hour-detail?hour=${encodeURIComponent(hardest.time)}`)
    expect(res.status).toBe(200)
    const detail = res.body as HourDetail
    expect(detail.stored).toMatchObject({ satsMin: hardest.satsMin, satsMedian: hardest.satsMedian })
    const sky = detail.computed.sky
    expect(sky.terrainHorizonDeg).toHaveLength(360)
    // Due east of the worst point the wall top is seen at atan((H - h0 - (1 - k) d^2/2R) / d)
    // (shared/precision/terrain.ts), d the distance to the wall's first full-height cell.
    // The model ramps up over the cell before it; resampling to the engine's grid and the
    // steps along the ray may place the full height up to two cells further.
    const plane = localPlane(CENTRE.latDeg, CENTRE.lonDeg)
    const [x] = toPlane(plane, detail.computed.worstPoint.lonDeg, detail.computed.worstPoint.latDeg)
    const angleDeg = (riseM: number, dM: number) => (Math.atan((riseM - ANTENNA_M - ((1 - TERRAIN_REFRACTION_K) * dM * dM) / (2 * EARTH_MEAN_RADIUS_M)) / dM) * 180) / Math.PI
    const east = wallCellM - x
    expect(sky.terrainHorizonDeg![90]).toBeGreaterThan(angleDeg(WALL_M - GROUND_M, east + 2 * CELL_M))
    expect(sky.terrainHorizonDeg![90]).toBeLessThan(angleDeg(WALL_M - GROUND_M, east - CELL_M))
    // The lower step to the west: 200 m up, about 1.2 km away.
    const west = x - slopeCellM
    expect(sky.terrainHorizonDeg![270]).toBeGreaterThan(angleDeg(SLOPE_M - GROUND_M, west + 2 * CELL_M))
    expect(sky.terrainHorizonDeg![270]).toBeLessThan(angleDeg(SLOPE_M - GROUND_M, west - CELL_M))
    expect(Math.max(...detail.computed.points.map((p) => p.horizonMaxDeg))).toBeGreaterThan(30)
    // A satellite above the elevation mask and below the terrain is marked as behind it.
    const behind = sky.satellites.filter((s) => s.elevationDeg >= sky.maskDeg && s.elevationDeg < sky.terrainHorizonDeg![Math.min(359, Math.floor(s.azimuthDeg))])
    expect(behind.length).toBeGreaterThan(0)
    for (const s of behind) expect(s.status).toBe('behind-terrain')
  })
})
