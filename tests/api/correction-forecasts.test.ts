// Correction quality in the stored week of a demo farm, computed by the real job runner
// (worker threads) with the app's local fake Kp feed read into the store: the demo field
// beyond its base's radio range (Beet Ground) has its RTK hours Closed for that reason; the
// hours of the feed's storm day that a G3-or-worse block touches carry the storm flag the
// Outlook marks, and the RTK work types follow their storm setting there; the farm's weekly
// plan names the storm (G level and hours), and says so when the feed is stale.
import { DateTime } from 'luxon'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { FarmForecastResponse } from '../../shared/schemas/forecast.ts'
import type { PlanPreview } from '../../shared/schemas/plans.ts'
import type { WorkType } from '../../shared/schemas/planning.ts'
import type { ParsedKpBlock } from '../../server/services/spaceWeather.ts'
import { clearListeners } from '../../server/events.ts'
import type { JobsHandle } from '../../server/jobs/index.ts'
import { planSpaceWeather } from '../../server/services/planSpaceWeather.ts'
import { mondayOf } from '../../server/services/plansCompose.ts'
import { startFileJobs } from '../support/fileJobs.ts'
import { ageKpFeed, keepKpFeed, readLocalFakeFeed } from '../support/kpFeed.ts'
import { demo, signIn, startTestServer, type Client, type TestServer } from '../support/server.ts'

const HOUR_MS = 3_600_000
let server: TestServer
let jobs: JobsHandle
let restoreFeed: (() => Promise<void>) | undefined
let office: Client
let south: Client
let farm: { id: number; timeZone: string }
let feed: ParsedKpBlock[]
let forecast: FarmForecastResponse
let workTypes: WorkType[]

/**
 * G level of a Kp value on the NOAA G-scale (NOAA SWPC, "NOAA Space Weather Scales",
 * geomagnetic storms, Kp column: G1 Kp 5, G2 Kp 6, G3 Kp 7, G4 Kp 8 including 9-, G5 Kp 9),
 * a value in thirds read as its nearest whole Kp.
 */
const noaaG = (kp: number) => (kp < 4.5 ? 0 : kp < 5.5 ? 1 : kp < 6.5 ? 2 : kp < 7.5 ? 3 : kp < 9 ? 4 : 5)
const workTypeId = (name: string) => String(workTypes.find((w) => w.name === name)!.id)

beforeAll(async () => {
  server = await startTestServer()
  restoreFeed = await keepKpFeed(server)
  // Read before the runner starts, so the change queues no re-forecast of every field.
  feed = await readLocalFakeFeed(server)
  jobs = await startFileJobs(server, 2)
  const crew = await signIn(server.app, demo.contractor)
  office = await signIn(server.app, demo.office)
  south = await signIn(server.app, demo.clientSouth)
  const farms = (await crew.get('/api/farms?pageSize=50')).body.items as Array<{ id: number; name: string; timeZone: string }>
  const meadowlark = farms.find((f) => f.name === 'Meadowlark Bottoms')!
  farm = { id: meadowlark.id, timeZone: meadowlark.timeZone }
  workTypes = (await crew.get('/api/work-types')).body as WorkType[]
  const fields = (await crew.get(`/api/farms/${farm.id}/fields`)).body as Array<{ id: number; name: string }>
  expect(fields.map((f) => f.name)).toEqual(expect.arrayContaining(['Beet Ground', 'River Lot']))
  for (const f of fields) expect((await crew.post(`/api/fields/${f.id}/recompute`)).status).toBe(202)
  await jobs.runner!.idle()
  forecast = (await south.get(`/api/farms/${farm.id}/forecast`)).body as FarmForecastResponse
  for (const f of forecast.fields) expect(f.hours.length).toBeGreaterThanOrEqual(167)
}, 600_000)

afterAll(async () => {
  await jobs?.stop()
  clearListeners()
  await restoreFeed?.()
  await server?.close()
})

const fieldHours = (name: string) => forecast.fields.find((f) => f.fieldName === name)!.hours

describe('the demo field beyond its base radio range', () => {
  it('Beet Ground: every RTK hour of the stored week is Closed, out of range; the SBAS work type is not', () => {
    const hours = fieldHours('Beet Ground')
    // The RTK work types of the demo (seed/planning.ts): the field's base cannot reach its far corner.
    for (const name of ['Planting', 'Strip-till', 'Tile drainage', 'Land levelling']) {
      for (const h of hours) expect(h.workTypes[workTypeId(name)]).toMatchObject({ state: 'closed', reason: 'out-of-range' })
    }
    // Spraying works on SBAS, which needs no base.
    for (const h of hours) expect(h.workTypes[workTypeId('Spraying')].reason).not.toBe('out-of-range')
    // Its neighbour reaches the base: its Planting hours are not Closed for the link.
    for (const h of fieldHours('River Lot')) expect(h.workTypes[workTypeId('Planting')].reason).not.toBe('out-of-range')
  })
})

describe('the fake feed’s storm day in the stored week', () => {
  /** Whole UTC hours touched by a block of G3 or worse. */
  const stormHours = () => {
    const out = new Set<number>()
    for (const b of feed.filter((x) => noaaG(x.kp) >= 3)) {
      for (let t = b.blockStart.getTime(); t < b.blockEnd.getTime(); t += HOUR_MS) out.add(t)
    }
    return out
  }

  it('flags exactly the hours of the G3-or-worse blocks, as the Outlook reads them', () => {
    const storm = stormHours()
    // The fake feed's storm day holds one G3 afternoon (Kp 7 and 7.33: six hours).
    expect(storm.size).toBe(6)
    const covered = (t: number) => feed.some((b) => b.blockStart.getTime() <= t && t < b.blockEnd.getTime())
    for (const f of forecast.fields) {
      const flagged = f.hours.filter((h) => (h.spaceWeather?.g ?? 0) >= 3).map((h) => Date.parse(h.time))
      expect(new Set(flagged)).toEqual(storm)
      for (const h of f.hours) {
        const t = Date.parse(h.time)
        if (covered(t)) {
          const kp = Math.max(...feed.filter((b) => b.blockStart.getTime() < t + HOUR_MS && b.blockEnd.getTime() > t).map((b) => b.kp))
          expect(h.spaceWeather).toEqual({ kpMax: kp, g: noaaG(kp) })
        } else {
          expect(h.spaceWeather).toBeNull() // past the feed's three days: no forecast, not quiet
        }
      }
    }
  })

  it('in the storm hours, Planting (set to at most Tight) is never Clear and Tile drainage (set to Closed) is Closed', () => {
    const storm = stormHours()
    const hours = fieldHours('River Lot').filter((h) => storm.has(Date.parse(h.time)))
    expect(hours).toHaveLength(6)
    for (const h of hours) {
      expect(h.workTypes[workTypeId('Planting')].state).not.toBe('clear')
      expect(h.workTypes[workTypeId('Tile drainage')]).toMatchObject({ state: 'closed' })
    }
  })

  it('the weekly plan e-mail names the storm day, its G level and its hours in the farm’s time', async () => {
    const g3 = feed.filter((b) => noaaG(b.kp) >= 3)
    const startMs = g3[0].blockStart.getTime()
    const endMs = g3[g3.length - 1].blockEnd.getTime()
    const weekStart = mondayOf(startMs, farm.timeZone)
    const plan = (await office.post('/api/plans/preview', { farmId: farm.id, weekStart, note: '', units: 'metric' })).body as PlanPreview
    const s = DateTime.fromMillis(startMs, { zone: farm.timeZone }).setLocale('en-US')
    const e = DateTime.fromMillis(endMs, { zone: farm.timeZone })
    const kpMax = Math.max(...g3.map((b) => b.kp))
    // e.g. "Sat 5 Dec 05:00-11:00: geomagnetic storm up to G3 (Kp 7.33)" (America/Denver).
    const line = `${s.toFormat('ccc d LLL HH:mm')}-${e.toFormat(e.hasSame(s, 'day') ? 'HH:mm' : 'ccc HH:mm')}: geomagnetic storm up to G${noaaG(kpMax)} (Kp ${kpMax})`
    expect(plan.text).toContain(`STORM ${line}`)
    expect(plan.html).toContain(line)
    expect(plan.text).not.toMatch(/forecast is stale/)
  })

  it('an hour keeps the worst flag when the farm’s fields were computed at different times', async () => {
    // Beet Ground's stored storm hours, and the same hours as a field computed before the
    // storm was forecast would hold them (no storm: Kp 2 in every hour).
    const beet = forecast.fields.find((f) => f.fieldName === 'Beet Ground')!
    const rows = (await server.repos.forecasts.hours([beet.fieldId], new Date(forecast.from), new Date(forecast.to))).filter((r) => stormHours().has(r.hourStart.getTime()))
    expect(rows).toHaveLength(6)
    const quiet = rows.map((r) => ({ ...r, fieldId: -1, extraJson: JSON.stringify({ spaceWeather: { kpMax: 2, g: 0 } }) }))
    for (const order of [[...quiet, ...rows], [...rows, ...quiet]]) {
      const sw = await planSpaceWeather(server.repos, order, farm.timeZone, Date.now(), Date.parse(forecast.to))
      expect(sw.storms).toHaveLength(1)
      const kpMax = Math.max(...feed.filter((b) => noaaG(b.kp) >= 3).map((b) => b.kp))
      expect(sw.storms[0].endsWith(`: geomagnetic storm up to G${noaaG(kpMax)} (Kp ${kpMax})`)).toBe(true)
    }
  })

  it('a stale feed is named as stale in the plan, with the time of its last read', async () => {
    const weekStart = mondayOf(Date.now(), farm.timeZone)
    const putBack = await keepKpFeed(server)
    try {
      // Last read 40 hours ago: past the 36 hours after which the feed is stale.
      const lastOk = await ageKpFeed(server, 40 * HOUR_MS)
      const plan = (await office.post('/api/plans/preview', { farmId: farm.id, weekStart, note: '', units: 'metric' })).body as PlanPreview
      const read = DateTime.fromJSDate(lastOk, { zone: farm.timeZone }).setLocale('en-US').toFormat('ccc d LLL HH:mm')
      expect(plan.text).toContain(`The space-weather (Kp) forecast is stale (last read ${read}); storm days may be missing.`)
    } finally {
      await putBack()
    }
  })
})
