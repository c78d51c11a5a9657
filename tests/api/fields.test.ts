// Fields: create, read, edit, delete; boundary checks that say where; unusual areas that
// need confirmation; unique names per farm; revisions; who may see and change what.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { clearListeners, on } from '../../server/events.ts'
import { Client, demo, signIn, startTestServer, unique, type TestServer } from '../support/server.ts'
import { offset, polygon, rectangle, ringM, type LonLat } from '../fixtures/imports/shapes.ts'

let server: TestServer
let admin: Client
let office: Client
let crew: Client
let north: Client
let northFarmId: number
let otherFarmId: number
let serviceLevelId: number
const origin: LonLat = [-93.6234, 42.0512]
const events: unknown[] = []

beforeAll(async () => {
  server = await startTestServer()
  admin = await signIn(server.app, demo.admin)
  office = await signIn(server.app, demo.office)
  crew = await signIn(server.app, demo.contractor)
  north = await signIn(server.app, demo.clientNorth)
  const northFarms: number[] = (await north.get('/api/auth/me')).body.farmIds
  northFarmId = northFarms[0]
  const all = (await admin.get('/api/farms?pageSize=50')).body.items as { id: number }[]
  otherFarmId = all.map((f) => f.id).find((id) => !northFarms.includes(id))!
  serviceLevelId =
    (await server.repos.fields.serviceLevelIdByName('RTK')) ??
    (await server.repos.fields.insertServiceLevel({ name: 'RTK', sigmaUereM: 0.012, note: '' }))
  on('field.changed', (p) => void events.push(p))
})
afterAll(async () => {
  clearListeners()
  await server?.close()
})

function body(extra: Record<string, unknown> = {}) {
  return { name: unique('Field '), serviceLevelId, boundary: polygon(rectangle(offset(origin, Math.random() * 5000, 0), 400, 250)), ...extra }
}

describe('creating and reading fields', () => {
  it('stores a field with its area in ha and ac, centroid and revision 1', async () => {
    const res = await crew.post(`/api/farms/${northFarmId}/fields`, body({ crop: 'corn', antennaHeightM: 3.2 }))
    expect(res.status).toBe(201)
    const f = res.body
    // 400 m x 250 m = 10 ha; turf's spherical area differs from the flat layout by well under 1 %.
    expect(f.areaHa).toBeGreaterThan(9.9)
    expect(f.areaHa).toBeLessThan(10.1)
    expect(f.areaAc / f.areaHa).toBeCloseTo(2.4710538, 5)
    expect(f.centroid.latDeg).toBeCloseTo(origin[1] + 125 / 111_320, 4)
    expect(f.revision).toBe(1)
    expect(f.antennaHeightM).toBe(3.2)
    expect((await north.get(`/api/fields/${f.id}`)).body.name).toBe(f.name)
    const list = await north.get(`/api/farms/${northFarmId}/fields`)
    expect(list.status).toBe(200)
    expect(list.body.map((x: { id: number }) => x.id)).toContain(f.id)
    expect(events).toContainEqual({ fieldId: f.id, farmId: northFarmId, deleted: false })
  })

  it('subtracts a pond (hole) from the area and accepts MultiPolygons', async () => {
    const o = offset(origin, 9000, 0)
    const shell = rectangle(o, 500, 400)
    const pond = ringM(o, [
      [100, 100],
      [100, 200],
      [200, 200],
      [200, 100],
    ])
    const res = await crew.post(`/api/farms/${northFarmId}/fields`, body({ boundary: polygon(shell, pond) }))
    expect(res.status).toBe(201)
    expect(res.body.areaHa).toBeCloseTo(19, 0)
    const multi = {
      type: 'MultiPolygon',
      coordinates: [[rectangle(offset(o, 0, 1000), 200, 200)], [rectangle(offset(o, 400, 1000), 200, 200)]],
    }
    const res2 = await crew.post(`/api/farms/${northFarmId}/fields`, body({ boundary: multi }))
    expect(res2.status).toBe(201)
    expect(res2.body.areaHa).toBeCloseTo(8, 0)
  })
})

describe('boundaries that cannot be stored are refused with where', () => {
  it('a self-crossing (bow-tie) boundary names the crossing point', async () => {
    const bow = ringM(origin, [
      [0, 0],
      [400, 400],
      [400, 0],
      [0, 400],
    ])
    const res = await crew.post(`/api/farms/${northFarmId}/fields`, body({ boundary: polygon(bow) }))
    expect(res.status).toBe(400)
    const mid = offset(origin, 200, 200)
    expect(res.body.error.message).toContain('crosses itself near')
    expect(res.body.error.message).toContain(`${mid[1].toFixed(4)} N, ${Math.abs(mid[0]).toFixed(4)} W`)
    expect(res.body.error.fields.boundary).toBeTruthy()
  })

  it('too few distinct corners, no area, a hole outside the shell, overlapping parts', async () => {
    const p = origin
    const twoCorners = polygon([p, offset(p, 100, 0), p, offset(p, 100, 0), p])
    const r1 = await crew.post(`/api/farms/${northFarmId}/fields`, body({ boundary: twoCorners }))
    expect(r1.status).toBe(400)
    expect(r1.body.error.message).toMatch(/distinct corner/)
    const flat = polygon(ringM(p, [[0, 0], [100, 0], [200, 0]]))
    const r2 = await crew.post(`/api/farms/${northFarmId}/fields`, body({ boundary: flat }))
    expect(r2.status).toBe(400)
    expect(r2.body.error.message).toMatch(/no area/)
    const hole = ringM(p, [[600, 600], [600, 700], [700, 700], [700, 600]])
    const r3 = await crew.post(`/api/farms/${northFarmId}/fields`, body({ boundary: polygon(rectangle(p, 400, 400), hole) }))
    expect(r3.status).toBe(400)
    expect(r3.body.error.message).toMatch(/Hole 1 of the boundary lies outside it near \d+\.\d{4} N/)
    const overlap = { type: 'MultiPolygon', coordinates: [[rectangle(p, 300, 300)], [rectangle(offset(p, 200, 200), 300, 300)]] }
    const r4 = await crew.post(`/api/farms/${northFarmId}/fields`, body({ boundary: overlap }))
    expect(r4.status).toBe(400)
    expect(r4.body.error.message).toMatch(/Parts 1 and 2 of the boundary overlap near/)
    const bad = await crew.post(`/api/farms/${northFarmId}/fields`, body({ boundary: { type: 'Point', coordinates: [0, 0] } }))
    expect(bad.status).toBe(400)
    expect(bad.body.error.fields).toHaveProperty('boundary.type')
  })

  it('unusual areas need confirmation (422 confirm-area), then are stored', async () => {
    const huge = polygon(rectangle(offset(origin, 0, 20_000), 5000, 5000)) // 2,500 ha
    const r1 = await crew.post(`/api/farms/${northFarmId}/fields`, body({ boundary: huge }))
    expect(r1.status).toBe(422)
    expect(r1.body.error.code).toBe('confirm-area')
    expect(r1.body.error.message).toMatch(/more than 2,000 ha/)
    const r2 = await crew.post(`/api/farms/${northFarmId}/fields`, body({ boundary: huge, confirmUnusualArea: true }))
    expect(r2.status).toBe(201)
    const tiny = polygon(rectangle(offset(origin, 0, 30_000), 20, 20)) // 0.04 ha
    const r3 = await crew.post(`/api/farms/${northFarmId}/fields`, body({ boundary: tiny }))
    expect(r3.status).toBe(422)
    expect(r3.body.error.message).toMatch(/less than 0.05 ha/)
  })
})

describe('names, edits and deletion', () => {
  it('a name is unique per farm (409 naming it), not across farms', async () => {
    const name = unique('Home quarter ')
    expect((await crew.post(`/api/farms/${northFarmId}/fields`, body({ name }))).status).toBe(201)
    const dup = await crew.post(`/api/farms/${northFarmId}/fields`, body({ name }))
    expect(dup.status).toBe(409)
    expect(dup.body.error.message).toContain(name)
    expect((await crew.post(`/api/farms/${otherFarmId}/fields`, body({ name }))).status).toBe(201)
  })

  it('PATCH changes only what is sent, bumps the revision and re-measures a new boundary', async () => {
    const f = (await crew.post(`/api/farms/${northFarmId}/fields`, body({ antennaHeightM: 4, crop: 'beans' }))).body
    const r1 = await office.patch(`/api/fields/${f.id}`, { notes: 'wet corner in the south-east' })
    expect(r1.status).toBe(200)
    expect(r1.body).toMatchObject({ revision: 2, antennaHeightM: 4, crop: 'beans', notes: 'wet corner in the south-east' })
    const r2 = await crew.patch(`/api/fields/${f.id}`, { boundary: polygon(rectangle(offset(origin, 0, 40_000), 200, 100)) })
    expect(r2.body.revision).toBe(3)
    expect(r2.body.areaHa).toBeCloseTo(2, 1)
    const same = await crew.patch(`/api/fields/${f.id}`, { crop: 'beans' })
    expect(same.body.revision).toBe(3)
    const bow = polygon(ringM(origin, [[0, 0], [10, 10], [10, 0], [0, 10]]))
    const r3 = await crew.patch(`/api/fields/${f.id}`, { boundary: bow })
    expect(r3.status).toBe(400)
    expect((await crew.get(`/api/fields/${f.id}`)).body.revision).toBe(3)
  })

  it('DELETE removes the field and emits a deleted change', async () => {
    const f = (await crew.post(`/api/farms/${northFarmId}/fields`, body())).body
    expect((await crew.delete(`/api/fields/${f.id}`)).status).toBe(204)
    expect((await crew.get(`/api/fields/${f.id}`)).status).toBe(404)
    expect(events).toContainEqual({ fieldId: f.id, farmId: northFarmId, deleted: true })
    expect((await crew.delete(`/api/fields/${f.id}`)).status).toBe(404)
  })

  it('an unknown service level is a 400 naming serviceLevelId', async () => {
    const res = await crew.post(`/api/farms/${northFarmId}/fields`, body({ serviceLevelId: 999_999 }))
    expect(res.status).toBe(400)
    expect(res.body.error.fields).toHaveProperty('serviceLevelId')
  })
})

describe('roles', () => {
  it('clients read their farms only (404 elsewhere) and never write', async () => {
    const other = (await crew.post(`/api/farms/${otherFarmId}/fields`, body())).body
    expect((await north.get(`/api/fields/${other.id}`)).status).toBe(404)
    expect((await north.get(`/api/farms/${otherFarmId}/fields`)).status).toBe(404)
    expect((await north.post(`/api/farms/${northFarmId}/fields`, body())).status).toBe(403)
    const mine = (await crew.post(`/api/farms/${northFarmId}/fields`, body())).body
    expect((await north.patch(`/api/fields/${mine.id}`, { notes: 'x' })).status).toBe(403)
    expect((await north.delete(`/api/fields/${mine.id}`)).status).toBe(403)
    expect((await admin.patch(`/api/fields/${mine.id}`, { notes: 'by admin' })).status).toBe(200)
  })

  it('signed-out callers get 401; unknown farms 404', async () => {
    expect((await new Client(server.app).get(`/api/farms/${northFarmId}/fields`)).status).toBe(401)
    expect((await crew.get('/api/farms/999999/fields')).status).toBe(404)
    expect((await crew.post('/api/farms/999999/fields', body())).status).toBe(404)
  })
})
