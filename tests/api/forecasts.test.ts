// Stored forecasts through the API with the real job runner (worker threads) on the test
// database: a recompute stores exactly the window's hours with a state per work type, a
// tree line's new height queues and stores a new version, clients read only their farms,
// and bad ranges are refused naming the parameter.
import { DateTime } from 'luxon'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { type FarmForecastResponse, type FieldForecastResponse } from '../../shared/schemas/forecast.ts'
import type { Job } from '../../shared/schemas/jobs.ts'
import { createStore } from '../../server/db/repositories/index.ts'
import { clearListeners } from '../../server/events.ts'
import type { JobsHandle } from '../../server/jobs/index.ts'
import { startFileJobs, until } from '../support/fileJobs.ts'
import { ensureForecastFields, fieldWindow } from '../support/forecastFields.ts'
import { demo, signIn, startTestServer, type Client, type TestServer } from '../support/server.ts'

let server: TestServer
let jobs: JobsHandle
const as: Record<'admin' | 'office' | 'contractor' | 'clientNorth' | 'clientSouth', Client> = {} as never
/** A field on the farm of the north client (not on the south client's farms). */
let northField: { id: number; farmId: number }
let southField: { id: number; farmId: number }

beforeAll(async () => {
  server = await startTestServer()
  await ensureForecastFields(server.database.db, 1)
  jobs = await startFileJobs(server, 2)
  for (const key of ['admin', 'office', 'contractor', 'clientNorth', 'clientSouth'] as const) as[key] = await signIn(server.app, demo[key])
  const northFarm = (await as.clientNorth.get('/api/farms')).body.items[0].id as number
  const southFarms = ((await as.clientSouth.get('/api/farms')).body.items as { id: number }[]).map((f) => f.id)
  const all = await server.repos.fields.listAll()
  const n = all.find((f) => f.farmId === northFarm)!
  const s = all.find((f) => southFarms.includes(f.farmId))!
  northField = { id: n.id, farmId: n.farmId }
  southField = { id: s.id, farmId: s.farmId }
})

afterAll(async () => {
  await jobs?.stop()
  clearListeners()
  await server?.close()
})

describe('recompute and read a field forecast', () => {
  it('queues a job (202), runs it on a worker thread and stores exactly the window', async () => {
    const res = await as.contractor.post(`/api/fields/${northField.id}/recompute`)
    expect(res.status).toBe(202)
    const job = res.body as Job
    expect(job).toMatchObject({ kind: 'forecast', status: 'queued', fieldId: northField.id, reason: 'manual', progress: 0 })
    await jobs.runner!.idle()
    const done = (await as.office.get(`/api/jobs?fieldId=${northField.id}&limit=5`)).body.items.find((j: Job) => j.id === job.id) as Job
    expect(done.status).toBe('done')
    expect(done.progress).toBe(1)
    const window = await fieldWindow(server.database.db, northField.id)
    expect(done.result).toMatch(new RegExp(`^${window.hours} hours stored`))

    const fc = (await as.clientNorth.get(`/api/fields/${northField.id}/forecast`)).body as FieldForecastResponse
    expect(fc.hours).toHaveLength(window.hours)
    expect(fc.windowStart).toBe(new Date(window.startMs).toISOString())
    expect(fc.windowEnd).toBe(new Date(window.endMs).toISOString())
    expect(fc.hours[0].time).toBe(fc.windowStart)
    expect(new Set(fc.hours.map((h) => h.time)).size).toBe(window.hours)
    // The farm's own days: from 00:00 today to 00:00 seven days on, on the farm's clock
    // (luxon's reading of the IANA zone; 167 or 169 hours over a daylight-saving change).
    const zone = (await as.clientNorth.get(`/api/farms/${northField.farmId}`)).body.timeZone as string
    const first = DateTime.fromISO(fc.windowStart!, { zone })
    const end = DateTime.fromISO(fc.windowEnd!, { zone })
    expect(first.toFormat('HH:mm')).toBe('00:00')
    expect(first.toISODate()).toBe(DateTime.now().setZone(zone).toISODate())
    expect(end.toFormat('HH:mm')).toBe('00:00')
    expect(end.diff(first, 'days').days).toBeCloseTo(7, 1)
    expect(fc.stale).toBe(false)
    expect(fc.pendingJob).toBeNull()
    expect(fc.inputsVersion).toMatch(/^[0-9a-f]{64}$/)
    expect(fc.orbitSummary).toMatch(/GPS/)
    expect(fc.workTypes.map((w) => w.name)).toEqual(['Planting', 'Strip-till', 'Spraying', 'Tile drainage', 'Land levelling'])
    for (const h of fc.hours) {
      expect(Object.keys(h.workTypes).sort()).toEqual(fc.workTypes.map((w) => String(w.id)).sort())
      for (const w of Object.values(h.workTypes)) {
        expect(['clear', 'tight', 'closed']).toContain(w.state)
        expect(w.share).toBeGreaterThanOrEqual(0)
        expect(w.shareN1).toBeLessThanOrEqual(w.share + 1e-9)
      }
      if (h.hdopMax !== null) expect(h.hdopMax).toBeGreaterThanOrEqual(h.hdopMedian ?? 0)
      expect(h.satsMin).toBeGreaterThanOrEqual(0)
    }
    // 95 % horizontal error = 2 (sigma HDOP + ppm_H b) with the RTK sigma of the field and the
    // baseline part of its RTK link (DESIGN.md "Beyond geometry"; the link's figure from its own route).
    const link = (await as.clientNorth.get(`/api/fields/${northField.id}/correction`)).body as { serviceLevel: { baselineH95M: number } }
    const h = fc.hours.find((x) => x.hdopMedian !== null)!
    expect(h.h95MedianM!).toBeCloseTo(2 * 0.012 * h.hdopMedian! + link.serviceLevel.baselineH95M, 4)
  })

  it('answers a range inside the window, and refuses bad ranges naming the parameter', async () => {
    const window = await fieldWindow(server.database.db, northField.id)
    const from = new Date(window.startMs + 24 * 3_600_000).toISOString()
    const to = new Date(window.startMs + 30 * 3_600_000).toISOString()
    const part = (await as.admin.get(`/api/fields/${northField.id}/forecast?from=${from}&to=${to}`)).body as FieldForecastResponse
    expect(part.hours.map((x) => x.time)).toHaveLength(6)
    expect(part.hours[0].time).toBe(from)
    const bad = await as.admin.get(`/api/fields/${northField.id}/forecast?from=yesterday`)
    expect(bad.status).toBe(400)
    expect(bad.body.error.fields.from).toMatch(/ISO 8601/)
    const backwards = await as.admin.get(`/api/fields/${northField.id}/forecast?from=${to}&to=${from}`)
    expect(backwards.status).toBe(400)
    expect(backwards.body.error.fields.to).toMatch(/before/)
  })

  it('answers an unchanged week with 304 to a client that has it (RFC 9110 section 13.1.2, If-None-Match)', async () => {
    const first = await as.clientNorth.get(`/api/fields/${northField.id}/forecast`)
    expect(first.status).toBe(200)
    const etag = first.headers.etag as string
    expect(etag).toMatch(/^W\/".+"$/)
    expect(first.headers['cache-control']).toBe('private, no-cache')
    const again = await as.clientNorth.get(`/api/fields/${northField.id}/forecast`).set('If-None-Match', etag)
    expect(again.status).toBe(304)
    expect(again.text ?? '').toBe('')
    // Another range is another body.
    const window = await fieldWindow(server.database.db, northField.id)
    const part = await as.clientNorth
      .get(`/api/fields/${northField.id}/forecast?from=${new Date(window.startMs).toISOString()}&to=${new Date(window.startMs + 3_600_000).toISOString()}`)
      .set('If-None-Match', etag)
    expect(part.status).toBe(200)
    expect((part.body as FieldForecastResponse).hours).toHaveLength(1)
  })

  it('lets clients read only the fields of their farms', async () => {
    expect((await as.clientSouth.get(`/api/fields/${northField.id}/forecast`)).status).toBe(404)
    expect((await as.clientSouth.get(`/api/farms/${northField.farmId}/forecast`)).status).toBe(404)
    expect((await as.clientNorth.get(`/api/fields/${southField.id}/forecast`)).status).toBe(404)
    expect((await as.admin.get('/api/fields/99999999/forecast')).status).toBe(404)
    expect((await as.clientNorth.post(`/api/fields/${northField.id}/recompute`)).status).toBe(403)
    expect((await as.contractor.post('/api/fields/99999999/recompute')).status).toBe(404)
  })

  it('gives a farm day view of all its fields', async () => {
    const window = await fieldWindow(server.database.db, northField.id)
    const from = new Date(window.startMs).toISOString()
    const to = new Date(window.startMs + 24 * 3_600_000).toISOString()
    const res = await as.clientNorth.get(`/api/farms/${northField.farmId}/forecast?from=${from}&to=${to}`)
    expect(res.status).toBe(200)
    const farm = res.body as FarmForecastResponse
    expect(farm.from).toBe(from)
    const mine = farm.fields.find((f) => f.fieldId === northField.id)!
    expect(mine.hours).toHaveLength(24)
    expect(farm.workTypes).toHaveLength(5)
  })
})

describe('changes queue recomputes', () => {
  // Generous limits: other tests may have added many fields to this farm, and each is queued.
  it('a taller tree line queues the fields of the farm, which then store a new version', { timeout: 300_000 }, async () => {
    const beforeRes = await as.admin.get(`/api/fields/${northField.id}/forecast`)
    const before = beforeRes.body as FieldForecastResponse
    const treeLine = (await server.repos.obstructions.listByFarm(northField.farmId))[0]
    // Earlier test files may have changed this farm's tree lines too: only a job queued
    // after this change counts.
    const earlier = (await as.office.get(`/api/jobs?fieldId=${northField.id}&limit=5`)).body.items as Job[]
    const newestBefore = Math.max(0, ...earlier.map((j) => j.id))
    const patched = await as.contractor.patch(`/api/obstructions/${treeLine.id}`, { heightM: treeLine.heightM + 6 })
    expect(patched.status).toBe(200)
    // The event listener enqueues after the change committed.
    const job = await until(async () => {
      const list = (await as.office.get(`/api/jobs?fieldId=${northField.id}&limit=5`)).body.items as Job[]
      return list.find((j) => j.reason === 'obstructions' && j.id > newestBefore)
    }, 'the recompute after the tree line change', 240_000)
    expect(['queued', 'running', 'done']).toContain(job.status)
    await jobs.runner!.idle()
    const after = (await as.admin.get(`/api/fields/${northField.id}/forecast`)).body as FieldForecastResponse
    expect(after.hours).toHaveLength(168)
    expect(after.inputsVersion).not.toBe(before.inputsVersion)
    expect(after.stale).toBe(false)
    // The week a client holds is no longer current: a full answer, not 304.
    const revalidated = await as.admin.get(`/api/fields/${northField.id}/forecast`).set('If-None-Match', beforeRes.headers.etag as string)
    expect(revalidated.status).toBe(200)
    expect((revalidated.body as FieldForecastResponse).inputsVersion).toBe(after.inputsVersion)
  })

  it('a recompute that finds the same inputs stores nothing new unless asked by hand', async () => {
    const { enqueueForecast } = await import('../../server/queue/enqueue.ts')
    const store = createStore(server.database.db)
    const { job } = await enqueueForecast(store, { fieldId: northField.id, farmId: northField.farmId, reason: 'nightly' })
    await jobs.runner!.idle()
    const row = await server.repos.jobs.findById(job.id)
    expect(row?.status).toBe('done')
    expect(JSON.parse(row!.resultJson!).summary).toMatch(/up to date/)
  })
})
