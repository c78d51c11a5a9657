// The start-up sweep goes farm by farm (memory flat in the number of fields) and queues
// exactly the fields whose stored week is missing or not of the current inputs: a field
// stored with its current inputs version over the whole window is left alone, a queued
// job already covers its field (a second sweep queues nothing new).
import { eq, inArray } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { nominalConstellation } from '../../shared/precision/index.ts'
import { openDatabase, type DatabaseHandle } from '../../server/db/index.ts'
import { runMigrations } from '../../server/db/migrate.ts'
import { createRepositories, createStore, type Store } from '../../server/db/repositories/index.ts'
import { farms } from '../../server/db/schema.ts'
import { jobs } from '../../server/db/schema-planning.ts'
import { engineSettings, forecastInputsOf } from '../../server/forecast/fieldInputs.ts'
import { engineTask } from '../../server/forecast/inputs.ts'
import { toStoredHour } from '../../server/forecast/storedHour.ts'
import { runEngineTask } from '../../server/jobs/engineWorker.ts'
import { stalenessSweep } from '../../server/jobs/index.ts'
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
    const farmId = await repos.farms.insert({ name: `Sweep test farm ${f + 1} (invented)`, timeZone: 'America/Chicago', address: '', notes: '' })
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

describe('start-up sweep', () => {
  it('queues the fields without a current week, once, and leaves a current one alone', async () => {
    const config = testConfig()
    const now = Date.now()
    // Store the first field's week as a job of its current inputs would.
    const inputs = (await forecastInputsOf(store, fieldIds[0], engineSettings(config), now))!
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
    const rows = week.hours.map((h) => toStoredHour(fieldIds[0], h, { jobId: 1, inputsVersion: inputs.version, orbitSummary: '', computedAt: new Date() }))
    await store.transaction((repos) => repos.forecasts.replaceField(fieldIds[0], 1, new Date(inputs.window.startMs), new Date(inputs.window.endMs), rows))

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
