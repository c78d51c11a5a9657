// Test data for the planning API tests (passes, windows, at risk, calendar): fields,
// machines and stored forecast hours written through the real repositories on the test
// database, as the field editor and the forecast jobs would write them.
import { inArray } from 'drizzle-orm'
import { ceilHour, HOUR_MS } from '../../shared/planning/index.ts'
import type { NewForecastHour } from '../../server/db/repositories/forecasts.ts'
import { createRepositories } from '../../server/db/repositories/index.ts'
import { jobs } from '../../server/db/schema-planning.ts'
import type { Client, TestServer } from './server.ts'
import { demo, signIn, unique } from './server.ts'

export interface PlanningWorld {
  admin: Client
  office: Client
  crew: Client
  north: Client
  south: Client
  /** a farm of client.north that client.south does not share */
  northFarmId: number
  /** a farm of client.south */
  southFarmId: number
  workTypes: Record<'planting' | 'stripTill' | 'spraying' | 'tile', { id: number; name: string; rateHaPerH: number; requireN1: boolean }>
  serviceLevelId: number
}

export async function planningWorld(server: TestServer): Promise<PlanningWorld> {
  const [admin, office, crew, north, south] = await Promise.all(
    [demo.admin, demo.office, demo.contractor, demo.clientNorth, demo.clientSouth].map((e) => signIn(server.app, e)),
  )
  const northFarms: number[] = (await north.get('/api/auth/me')).body.farmIds
  const southFarms: number[] = (await south.get('/api/auth/me')).body.farmIds
  const northFarmId = northFarms.find((id) => !southFarms.includes(id))!
  const southFarmId = southFarms.find((id) => !northFarms.includes(id))!
  const byName = async (name: string) => {
    const wt = await server.repos.workTypes.findByName(name)
    if (!wt) throw new Error(`the demo work type ${name} is missing`)
    return { id: wt.id, name: wt.name, rateHaPerH: wt.rateHaPerH, requireN1: wt.requireN1 }
  }
  const rtk = await server.repos.serviceLevels.findByName('RTK')
  if (!rtk) throw new Error('the demo service level RTK is missing')
  return {
    admin,
    office,
    crew,
    north,
    south,
    northFarmId,
    southFarmId,
    workTypes: {
      planting: await byName('Planting'),
      stripTill: await byName('Strip-till'),
      spraying: await byName('Spraying'),
      tile: await byName('Tile drainage'),
    },
    serviceLevelId: rtk.id,
  }
}

/** Fields, machines and job rows this test file made through the helpers below. */
const made = { fields: new Set<number>(), machines: new Set<number>(), jobs: new Set<number>() }

/**
 * Removes what the helpers of this module made in this test file (fields with their
 * passes and stored hours by the database's cascade, machines, the helpers' job rows),
 * so that no later file meets them. Call in afterAll, before the server closes.
 */
export async function removeMadeRecords(server: Pick<TestServer, 'repos' | 'database'>): Promise<void> {
  for (const id of made.fields) await server.repos.fields.delete(id)
  for (const id of made.machines) await server.repos.machines.delete(id)
  if (made.jobs.size) await server.database.db.delete(jobs).where(inArray(jobs.id, [...made.jobs]))
  made.fields.clear()
  made.machines.clear()
  made.jobs.clear()
}

/** A rectangular field of about `areaHa` near (latDeg, lonDeg), written through the fields repository. */
export async function makeField(
  server: Pick<TestServer, 'repos'>,
  world: Pick<PlanningWorld, 'serviceLevelId'>,
  farmId: number,
  options: { areaHa?: number; latDeg?: number; lonDeg?: number; name?: string } = {},
): Promise<{ id: number; name: string; areaHa: number }> {
  const areaHa = options.areaHa ?? 40
  const lat = options.latDeg ?? 42.05
  const lon = options.lonDeg ?? -93.62
  // A square of side sqrt(area): metres to degrees with the local scale of the sphere.
  const sideM = Math.sqrt(areaHa * 10_000)
  const dLat = sideM / 111_320
  const dLon = sideM / (111_320 * Math.cos((lat * Math.PI) / 180))
  const ring = [
    [lon, lat],
    [lon + dLon, lat],
    [lon + dLon, lat + dLat],
    [lon, lat + dLat],
    [lon, lat],
  ]
  const name = options.name ?? unique('Test field ')
  const id = await server.repos.fields.insert({
    farmId,
    name,
    crop: '',
    notes: '',
    serviceLevelId: world.serviceLevelId,
    antennaHeightM: 3.5,
    boundary: JSON.stringify({ type: 'Polygon', coordinates: [ring] }),
    areaHa,
    centroidLat: lat + dLat / 2,
    centroidLon: lon + dLon / 2,
  })
  made.fields.add(id)
  return { id, name, areaHa }
}

/** A machine of the test's own, so bookings never meet the demo passes. */
export async function makeMachine(server: TestServer, rateHaPerH: number | null = null): Promise<{ id: number; name: string }> {
  const name = unique('Test tractor ')
  const id = await server.repos.machines.insert({ name, crew: 'Test crew', antennaHeightM: 3.5, rateHaPerH, active: true, notes: '' })
  made.machines.add(id)
  return { id, name }
}

/**
 * Stores forecast hours for a field as a forecast job does (forecasts repository, one
 * transaction), under a finished job row of its own: the job id is a real one, so a later
 * forecast job of the field (a higher id) replaces these hours as the product's rule says.
 * `states` maps a work type id to one letter per hour from `startMs`: C clear, T tight,
 * X closed. Returns the job id used.
 */
export async function storeForecast(
  server: Pick<TestServer, 'database'>,
  fieldId: number,
  startMs: number,
  states: Record<number, string>,
): Promise<number> {
  const [inserted] = await server.database.db.insert(jobs).values({
    kind: 'forecast',
    fieldId,
    payloadJson: JSON.stringify({ reason: 'test' }),
    status: 'done',
    progress: 1,
    attempts: 1,
    finishedAt: new Date(),
    resultJson: JSON.stringify({ summary: 'Hours stored by a test.' }),
  })
  const jobId = inserted.insertId
  made.jobs.add(jobId)
  const hours = Math.max(...Object.values(states).map((s) => s.length))
  const rows: NewForecastHour[] = []
  for (let i = 0; i < hours; i++) {
    const work: Record<string, { share: number; shareN1: number; state: string }> = {}
    for (const [id, letters] of Object.entries(states)) {
      const c = letters[i] ?? 'C'
      const state = c === 'C' ? 'clear' : c === 'T' ? 'tight' : 'closed'
      work[id] = { share: c === 'X' ? 0.3 : 1, shareN1: c === 'C' ? 1 : 0.5, state }
    }
    rows.push({
      fieldId,
      hourStart: new Date(startMs + i * HOUR_MS),
      satsMin: 14,
      satsMedian: 17,
      hdopMedian: 0.7,
      hdopMax: 0.9,
      vdopMedian: 1.1,
      vdopMax: 1.4,
      pdopMax: 1.6,
      n1HdopMax: 1.0,
      h95MedianM: 0.017,
      h95MaxM: 0.022,
      v95MedianM: 0.026,
      v95MaxM: 0.033,
      noFixShare: 0,
      workJson: JSON.stringify(work),
      extraJson: null,
      orbitSummary: 'GPS: nominal (24)',
      inputsVersion: `test-${jobId}`,
      jobId,
      computedAt: new Date(),
    })
  }
  const result = await server.database.db.transaction(async (tx) => {
    return createRepositories(tx).forecasts.replaceField(fieldId, jobId, new Date(startMs), new Date(startMs + hours * HOUR_MS), rows)
  })
  if (result !== 'stored') throw new Error(`storing the forecast of field ${fieldId} answered ${result}`)
  return jobId
}

/** The whole hour `hours` hours after the next full hour. */
export const hoursFromNow = (hours: number) => ceilHour(Date.now()) + hours * HOUR_MS
