// The start-up sweep goes farm by farm (memory flat in the number of fields) and queues
// exactly the fields whose stored week is missing or not of the current inputs: a field
// stored with its current inputs version over the whole window is left alone, a queued
// job already covers its field (a second sweep queues nothing new). The two farms keep
// different zones (Chicago, Berlin), so each is checked against its own local week; the
// hourly new-day check queues a field whose farm's day has turned since it was stored.
import { eq, inArray } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { nominalConstellation } from '../../shared/precision/index.ts'
import { forecastWindow } from '../../shared/schemas/forecast.ts'
import { openDatabase, type DatabaseHandle } from '../../server/db/index.ts'
import { runMigrations } from '../../server/db/migrate.ts'
import { createRepositories, createStore, type Store } from '../../server/db/repositories/index.ts'
import { farms } from '../../server/db/schema.ts'
import { jobs } from '../../server/db/schema-planning.ts'
import { engineSettings, forecastInputsOf } from '../../server/forecast/fieldInputs.ts'
import { engineTask } from '../../server/forecast/inputs.ts'
import { toStoredHour } from '../../server/forecast/storedHour.ts'
import { runEngineTask } from '../../server/jobs/engineWorker.ts'
import { EnginePool } from '../../server/jobs/enginePool.ts'
import { newDayHandler } from '../../server/jobs/handlers.ts'
import { stalenessSweep } from '../../server/jobs/index.ts'
import { createLogger } from '../../server/logger.ts'
import { forecastKey } from '../../server/queue/enqueue.ts'
import { seedDemo } from '../../seed/index.ts'
import { rectangle } from '../support/forecastFields.ts'
import { testConfig } from '../support/server.ts'

let handle: DatabaseHandle
let store: Store
const farmIds: number[] = []
const fieldIds: number[] = []
/** Jobs above this id were queued by this file's sweeps (files run one at a time). */
let lastJobBefore = 0

const zones = ['America/Chicago', 'Europe/Berlin']
const keysOf = (ids: number[]) => ids.map(forecastKey)
async function queuedOf(ids: number[]) {
  return handle.db.select().from(jobs).where(inArray(jobs.dedupeKey, keysOf(ids)))
}

beforeAll(async () => {
  handle = openDatabase(process.env.DATABASE_URL!, { connectionLimit: 3 })
  await runMigrations(handle.db)
  await seedDemo(handle.db)
  store = createStore(handle.db)
  const repos = createRepositories(handle.db)
  const level = (await repos.serviceLevels.list())[0]
  for (let f = 0; f < 2; f++) {
    const farmId = await repos.farms.insert({ name: `Sweep test farm ${f + 1} (invented)`, timeZone: zones[f], address: '', notes: '' })
    farmIds.push(farmId)
    for (let i = 0; i < 2; i++) {
      const lon = -94.1 + f * 0.05 + i * 0.007
      fieldIds.push(
        await repos.fields.insert({
          farmId,
          name: `Sweep plot ${i + 1}`,
          crop: 'corn',
          notes: '',
          serviceLevelId: level.id,
          antennaHeightM: 3,
          boundary: JSON.stringify(rectangle(lon, 41.9)),
          areaHa: 12,
          centroidLat: 41.9,
          centroidLon: lon,
        }),
      )
    }
  }
})

afterAll(async () => {
  if (handle) {
    // The sweeps queued the other fields of the test database too: those jobs go as well.
    await handle.pool.query("DELETE FROM jobs WHERE id > ? AND kind = 'forecast' AND status = 'queued'", [lastJobBefore])
    if (fieldIds.length) await handle.db.delete(jobs).where(inArray(jobs.dedupeKey, keysOf(fieldIds)))
    for (const id of farmIds) await handle.db.delete(farms).where(eq(farms.id, id))
    await handle.close()
  }
})

/** Stores a field's week as a job of its inputs at `atMs` would (a coarse engine run). */
async function storeWeek(fieldId: number, atMs: number, config: ReturnType<typeof testConfig>) {
  const inputs = (await forecastInputsOf(store, fieldId, engineSettings(config), atMs))!
  const week = runEngineTask(
    engineTask({
      field: inputs.field,
      obstructions: [],
      satellites: nominalConstellation('gps'),
      outages: [],
      workTypes: [],
      windowStartMs: inputs.window.startMs,
      windowHours: inputs.window.hours,
      settings: { stepMin: 60, sampleCount: 4, maskDeg: 10 },
    }),
    () => {},
    null,
  )
  const rows = week.hours.map((h) => toStoredHour(fieldId, h, { jobId: 1, inputsVersion: inputs.version, orbitSummary: '', computedAt: new Date() }))
  await store.transaction((repos) => repos.forecasts.replaceField(fieldId, 1, new Date(inputs.window.startMs), new Date(inputs.window.endMs), rows))
  return inputs.window
}

describe('start-up sweep', () => {
  it('queues the fields without a current week, once, and leaves a current one alone', async () => {
    const config = testConfig()
    const now = Date.now()
    // Store the first field's week as a job of its current inputs would.
    await storeWeek(fieldIds[0], now, config)

    const [[last]] = (await handle.pool.query('SELECT COALESCE(MAX(id), 0) AS id FROM jobs')) as unknown as [[{ id: number }]]
    lastJobBefore = Number(last.id)
    const first = await stalenessSweep(store, config, now)
    expect(first.checked).toBeGreaterThanOrEqual(fieldIds.length)
    const queued = await queuedOf(fieldIds)
    expect(queued.map((j) => j.fieldId).sort()).toEqual(fieldIds.slice(1).sort())
    expect(queued.every((j) => j.status === 'queued')).toBe(true)

    const second = await stalenessSweep(store, config, now)
    expect(second.checked).toBe(first.checked)
    expect(await queuedOf(fieldIds)).toHaveLength(queued.length)
  })
})

describe('new-day check', () => {
  it("queues the fields whose farm's local day turned since their week was stored, and leaves current ones alone", async () => {
    const config = testConfig()
    const now = Date.now()
    // Field 0 (Chicago) holds its current week; field 2 (Berlin) the week of 24 hours ago,
    // which started at an earlier Berlin midnight.
    const current = await storeWeek(fieldIds[0], now, config)
    const yesterday = await storeWeek(fieldIds[2], now - 86_400_000, config)
    expect(yesterday.startMs).toBeLessThan(forecastWindow(now, 'Europe/Berlin').startMs)
    expect(current.startMs).toBe(forecastWindow(now, 'America/Chicago').startMs)
    await handle.db.delete(jobs).where(inArray(jobs.dedupeKey, keysOf(fieldIds)))
    const { job } = await store.transaction((repos) => repos.jobs.enqueue({ kind: 'new-day', payload: { reason: 'new-day' } }, 'supersede'))
    // The check itself computes nothing: its pool is never used.
    const pool = new EnginePool(1)
    const outcome = await newDayHandler({
      job,
      payload: {},
      store,
      config,
      logger: createLogger('error'),
      pool,
      progress: () => {},
      signal: new AbortController().signal,
    })
    await pool.close()
    expect(outcome.summary).toMatch(/field forecasts queued/)
    const queued = await queuedOf(fieldIds)
    expect(queued.map((j) => j.fieldId).sort()).toEqual([fieldIds[1], fieldIds[2], fieldIds[3]].sort())
    for (const j of queued) expect((JSON.parse(j.payloadJson) as { reason: string }).reason).toBe('new-day')
    await handle.db.delete(jobs).where(eq(jobs.id, job.id))
  })
})
