// RTK base stations, correction networks, a field's correction source and the Kp feed:
// who sees which source, bad input refused whole, the demo field beyond its base's range,
// and a garbage feed that stores nothing.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { CorrectionSources, FieldCorrection, SpaceWeatherStatus } from '../../shared/schemas/corrections.ts'
import { fakeKpFeed, fetchKpFeed, parseKpFeed } from '../../server/services/spaceWeather.ts'
import { createStore } from '../../server/db/repositories/index.ts'
import { Client, demo, signIn, startTestServer, unique, type TestServer } from '../support/server.ts'

let server: TestServer
let admin: Client
let office: Client
let crew: Client
let north: Client
let south: Client

beforeAll(async () => {
  server = await startTestServer()
  ;[admin, office, crew, north, south] = await Promise.all(
    [demo.admin, demo.office, demo.contractor, demo.clientNorth, demo.clientSouth].map((e) => signIn(server.app, e)),
  )
})
afterAll(async () => {
  await server?.close()
})

async function fieldNamed(name: string): Promise<number> {
  const farms = await server.repos.farms.list({ page: 1, pageSize: 200, order: 'asc' })
  for (const farm of farms.rows) {
    const f = (await server.repos.fields.listByFarm(farm.id)).find((x) => x.name === name)
    if (f) return f.id
  }
  throw new Error(`no demo field ${name}`)
}

describe('who sees which correction source', () => {
  it('staff see every source; each client only the sources their farms use', async () => {
    const all = (await crew.get('/api/corrections')).body as CorrectionSources
    expect(all.bases.map((b) => b.name)).toEqual(expect.arrayContaining(['Hollis yard base', 'Meadowlark grain-leg base']))
    expect(all.networks.map((n) => n.name)).toContain('Prairie Reference Network')
    // A client sees exactly the sources their farms' fields use (other test files may add
    // fields to the demo farms, so the expected set is read from the fields themselves).
    async function sourcesUsedBy(client: Client) {
      const bases = new Set<string>()
      const networks = new Set<string>()
      for (const farmId of ((await client.get('/api/auth/me')).body as { farmIds: number[] }).farmIds) {
        for (const f of (await client.get(`/api/farms/${farmId}/fields`)).body as Array<{ id: number }>) {
          const { link } = (await client.get(`/api/fields/${f.id}/correction`)).body as FieldCorrection
          if (link) (link.kind === 'base' ? bases : networks).add(link.name)
        }
      }
      return { bases: [...bases].sort(), networks: [...networks].sort() }
    }
    const names = (list: Array<{ name: string }>) => list.map((x) => x.name).sort()
    // The north client's farm (Iowa) works from the yard base.
    const mine = (await north.get('/api/corrections')).body as CorrectionSources
    expect(names(mine.bases)).toContain('Hollis yard base')
    expect({ bases: names(mine.bases), networks: names(mine.networks) }).toEqual(await sourcesUsedBy(north))
    // The south client's farms (Kansas, Nebraska) use the network and the grain-leg base.
    const theirs = (await south.get('/api/corrections')).body as CorrectionSources
    expect(names(theirs.bases)).toContain('Meadowlark grain-leg base')
    expect(names(theirs.networks)).toEqual(['Prairie Reference Network'])
    expect({ bases: names(theirs.bases), networks: names(theirs.networks) }).toEqual(await sourcesUsedBy(south))
    // Neither sees the other's base unless one of their own fields uses it.
    expect(names(mine.bases)).not.toContain('Meadowlark grain-leg base')
  })

  it('contractors and clients cannot change sources; office staff can', async () => {
    const body = { name: unique('Base '), latDeg: 42.1, lonDeg: -93.5, radioRangeKm: 10 }
    expect((await crew.post('/api/base-stations', body)).status).toBe(403)
    expect((await north.post('/api/base-stations', body)).status).toBe(403)
    const made = await office.post('/api/base-stations', body)
    expect(made.status).toBe(201)
    expect(made.body).toMatchObject({ ...body, antennaHeightM: 2, note: '' })
    expect((await office.patch(`/api/base-stations/${made.body.id}`, { radioRangeKm: 12 })).body.radioRangeKm).toBe(12)
    expect((await office.delete(`/api/base-stations/${made.body.id}`)).status).toBe(204)
  })
})

describe('bad input is refused whole', () => {
  it('a base outside -90..90 / -180..180 names the coordinate and stores nothing', async () => {
    const before = ((await admin.get('/api/corrections')).body as CorrectionSources).bases.length
    const lat = await admin.post('/api/base-stations', { name: unique('Base '), latDeg: 95, lonDeg: -93.5, radioRangeKm: 10 })
    expect(lat.status).toBe(400)
    expect(lat.body.error.fields.latDeg).toMatch(/latitude must be between -90 and 90/)
    const lon = await admin.post('/api/base-stations', { name: unique('Base '), latDeg: 42, lonDeg: -193.5, radioRangeKm: 10 })
    expect(lon.status).toBe(400)
    expect(lon.body.error.fields.lonDeg).toMatch(/longitude must be between -180 and 180/)
    expect(((await admin.get('/api/corrections')).body as CorrectionSources).bases.length).toBe(before)
  })

  it('a coverage polygon that crosses itself is refused with where it crosses', async () => {
    const before = ((await admin.get('/api/corrections')).body as CorrectionSources).networks.length
    const bow = { type: 'Polygon', coordinates: [[[-100, 38], [-98, 40], [-98, 38], [-100, 40], [-100, 38]]] }
    const res = await admin.post('/api/correction-networks', { name: unique('Net '), coverage: bow })
    expect(res.status).toBe(400)
    expect(res.body.error.message).toMatch(/coverage area crosses itself near/)
    const none = await admin.post('/api/correction-networks', { name: unique('Net ') })
    expect(none.status).toBe(400)
    expect(none.body.error.fields.coverage).toMatch(/coverage area or at least one mount point/)
    expect(((await admin.get('/api/corrections')).body as CorrectionSources).networks.length).toBe(before)
  })

  it('a field cannot choose a source that does not exist', async () => {
    const id = await fieldNamed('Home Quarter')
    const res = await crew.call('put', `/api/fields/${id}/correction`, { kind: 'base', id: 999_999 })
    expect(res.status).toBe(400)
    expect(res.body.error.message).toMatch(/base station does not exist/)
  })
})

describe("a field's link", () => {
  it('the demo field Beet Ground lies beyond its base radio range: a warning naming the distances', async () => {
    const c = (await south.get(`/api/fields/${await fieldNamed('Beet Ground')}/correction`)).body as FieldCorrection
    expect(c.choice).toEqual({ kind: 'auto' })
    expect(c.link).toMatchObject({ kind: 'base', name: 'Meadowlark grain-leg base', reachable: false })
    expect(c.link!.farthestKm).toBeGreaterThan(4.7)
    expect(c.problem).toBe('out-of-range')
    expect(c.warnings[0]).toMatch(/beyond its 4.7 km radio range: RTK hours are Closed/)
    // Its neighbour reaches the base: no warning, and the baseline part of the error is 2 x 1 ppm x b.
    const ok = (await south.get(`/api/fields/${await fieldNamed('River Lot')}/correction`)).body as FieldCorrection
    expect(ok.problem).toBeNull()
    expect(ok.serviceLevel).toMatchObject({ name: 'RTK', ppmH: 1, needsBase: true })
    expect(ok.serviceLevel.baselineH95M).toBeCloseTo((2 * 1 * ok.link!.baselineKm) / 1000, 9)
  })

  it('a client cannot read the link of another farm’s field', async () => {
    const res = await north.get(`/api/fields/${await fieldNamed('Beet Ground')}/correction`)
    expect(res.status).toBe(404)
  })

  it('choosing a base explicitly and going back to the nearest one', async () => {
    const id = await fieldNamed('Creek Bottom')
    const bases = ((await admin.get('/api/corrections')).body as CorrectionSources).bases
    const far = bases.find((b) => b.name === 'Meadowlark grain-leg base')!
    const chosen = (await crew.call('put', `/api/fields/${id}/correction`, { kind: 'base', id: far.id })).body as FieldCorrection
    expect(chosen.link).toMatchObject({ name: far.name, reachable: false })
    expect(chosen.problem).toBe('out-of-range')
    const back = (await crew.call('put', `/api/fields/${id}/correction`, { kind: 'auto' })).body as FieldCorrection
    expect(back.link).toMatchObject({ name: 'Hollis yard base', reachable: true })
    expect(back.problem).toBeNull()
  })
})

describe('the space-weather feed', () => {
  it('the local fake feed holds three days ahead with one G3 storm day', async () => {
    const res = await new Client(server.app).get('/api/space-weather/kp-forecast.json')
    expect(res.status).toBe(200)
    const blocks = parseKpFeed(JSON.stringify(res.body))
    expect(blocks.length).toBe(5 * 8)
    const stormDays = new Set(blocks.filter((b) => b.kp >= 6.67).map((b) => b.blockStart.toISOString().slice(0, 10)))
    expect(stormDays.size).toBe(1)
  })

  it('garbage from the feed is refused whole and shown as stale, never as quiet; a good feed is current', async () => {
    const store = createStore(server.database.db)
    const nowMs = Date.now()
    const good = await fetchKpFeed(store, 'http://feed.test/kp.json', { nowMs, fetchImpl: async () => new Response(JSON.stringify(fakeKpFeed(nowMs))) })
    expect(good.ok).toBe(true)
    const before = (await admin.get('/api/space-weather')).body as SpaceWeatherStatus
    expect(before.state).toBe('current')
    expect(before.stormDays).toHaveLength(1)
    for (const body of ['<html>busy</html>', '{"kp": 3}', JSON.stringify([{ time_tag: '2026-12-03 00:00:00', kp: 12 }])]) {
      const bad = await fetchKpFeed(store, 'http://feed.test/kp.json', { nowMs: nowMs + 1000, fetchImpl: async () => new Response(body) })
      expect(bad.ok).toBe(false)
    }
    const after = (await north.get('/api/space-weather')).body as SpaceWeatherStatus
    expect(after.state).toBe('stale')
    expect(after.lastError).toMatch(/kp 12 is not a number from 0 to 9/)
    expect(after.blocks).toEqual(before.blocks) // nothing stored from the bad feeds
  })
})
