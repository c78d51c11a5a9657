// Obstructions: tree lines and polygons with a height, kind and leafless season; the
// validation of each; edits that change only what is sent; who may see and change them.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { clearListeners, on } from '../../server/events.ts'
import { Client, demo, signIn, startTestServer, type TestServer } from '../support/server.ts'
import { offset, polygon, rectangle, ringM, type LonLat } from '../fixtures/imports/shapes.ts'

let server: TestServer
let crew: Client
let office: Client
let north: Client
let northFarmId: number
let otherFarmId: number
const origin: LonLat = [-97.61, 38.35]
const changed: number[] = []

beforeAll(async () => {
  server = await startTestServer()
  crew = await signIn(server.app, demo.contractor)
  office = await signIn(server.app, demo.office)
  north = await signIn(server.app, demo.clientNorth)
  const farmIds: number[] = (await north.get('/api/auth/me')).body.farmIds
  northFarmId = farmIds[0]
  const all = (await crew.get('/api/farms?pageSize=50')).body.items as { id: number }[]
  otherFarmId = all.map((f) => f.id).find((id) => !farmIds.includes(id))!
  on('obstructions.changed', (p) => void changed.push(p.farmId))
})
afterAll(async () => {
  clearListeners()
  await server?.close()
})

const treeLine = (e = 0) => ({ type: 'LineString', coordinates: [offset(origin, e, 0), offset(origin, e + 400, 0)] })

describe('tree lines, woodlots and buildings', () => {
  it('stores a deciduous tree line with its leafless season and lists it for the farm', async () => {
    const res = await crew.post(`/api/farms/${northFarmId}/obstructions`, {
      kind: 'deciduous',
      heightM: 18,
      geometry: treeLine(),
      leaflessFrom: '11-01',
      leaflessTo: '04-15',
      note: 'cottonwoods',
    })
    expect(res.status).toBe(201)
    expect(res.body).toMatchObject({ kind: 'deciduous', heightM: 18, leaflessFrom: '11-01', leaflessTo: '04-15', farmId: northFarmId })
    expect(changed).toContain(northFarmId)
    const list = await north.get(`/api/farms/${northFarmId}/obstructions`)
    expect(list.status).toBe(200)
    expect(list.body.map((o: { id: number }) => o.id)).toContain(res.body.id)
  })

  it('stores an evergreen woodlot polygon and a building', async () => {
    const wood = await crew.post(`/api/farms/${northFarmId}/obstructions`, {
      kind: 'evergreen',
      heightM: 14,
      geometry: polygon(rectangle(offset(origin, 0, 500), 120, 80)),
    })
    expect(wood.status).toBe(201)
    const shed = await office.post(`/api/farms/${northFarmId}/obstructions`, {
      kind: 'structure',
      heightM: 9.5,
      geometry: polygon(rectangle(offset(origin, 300, 500), 30, 20)),
      note: 'machine shed',
    })
    expect(shed.status).toBe(201)
    expect(shed.body.leaflessFrom).toBeNull()
  })

  it('refuses heights out of 0.5-60 m, bad kinds, bad seasons and broken geometry', async () => {
    const post = (b: Record<string, unknown>) =>
      crew.post(`/api/farms/${northFarmId}/obstructions`, { kind: 'evergreen', heightM: 10, geometry: treeLine(), ...b })
    expect((await post({ heightM: 0.2 })).body.error.fields.heightM).toMatch(/at least 0.5 m/)
    expect((await post({ heightM: 75 })).body.error.fields.heightM).toMatch(/at most 60 m/)
    expect((await post({ kind: 'hedge' })).status).toBe(400)
    const season = await post({ leaflessFrom: '11-01', leaflessTo: '04-01' })
    expect(season.status).toBe(400)
    expect(season.body.error.message).toMatch(/Only deciduous/)
    const half = await post({ kind: 'deciduous', leaflessFrom: '11-01' })
    expect(half.status).toBe(400)
    expect(half.body.error.fields).toHaveProperty('leaflessTo')
    expect((await post({ kind: 'deciduous', leaflessFrom: '13-01', leaflessTo: '04-01' })).body.error.fields.leaflessFrom).toMatch(/MM-DD/)
    const dot = await post({ geometry: { type: 'LineString', coordinates: [origin, origin] } })
    expect(dot.status).toBe(400)
    expect(dot.body.error.message).toMatch(/only one distinct point, near 38.3500 N, 97.6100 W/)
    const bow = await post({ geometry: polygon(ringM(origin, [[0, 0], [50, 50], [50, 0], [0, 50]])) })
    expect(bow.status).toBe(400)
    expect(bow.body.error.message).toMatch(/The outline crosses itself near/)
  })

  it('PATCH keeps what is not sent; switching to evergreen drops the season', async () => {
    const o = (
      await crew.post(`/api/farms/${northFarmId}/obstructions`, {
        kind: 'deciduous',
        heightM: 15,
        geometry: treeLine(1000),
        leaflessFrom: '11-01',
        leaflessTo: '04-30',
        note: 'ash row',
      })
    ).body
    const r1 = await crew.patch(`/api/obstructions/${o.id}`, { heightM: 21 })
    expect(r1.body).toMatchObject({ heightM: 21, leaflessFrom: '11-01', note: 'ash row' })
    const r2 = await crew.patch(`/api/obstructions/${o.id}`, { kind: 'evergreen' })
    expect(r2.body).toMatchObject({ kind: 'evergreen', leaflessFrom: null, leaflessTo: null })
    const r3 = await crew.patch(`/api/obstructions/${o.id}`, { leaflessFrom: '10-01', leaflessTo: '03-01' })
    expect(r3.status).toBe(400)
    expect((await crew.delete(`/api/obstructions/${o.id}`)).status).toBe(204)
    expect((await crew.patch(`/api/obstructions/${o.id}`, { heightM: 3 })).status).toBe(404)
  })
})

describe('roles', () => {
  it('clients read only their farms and never write; other farms are 404', async () => {
    const other = (
      await crew.post(`/api/farms/${otherFarmId}/obstructions`, { kind: 'structure', heightM: 6, geometry: treeLine(2000) })
    ).body
    expect((await north.get(`/api/farms/${otherFarmId}/obstructions`)).status).toBe(404)
    expect((await north.post(`/api/farms/${northFarmId}/obstructions`, { kind: 'structure', heightM: 6, geometry: treeLine() })).status).toBe(403)
    expect((await north.patch(`/api/obstructions/${other.id}`, { heightM: 7 })).status).toBe(403)
    expect((await north.delete(`/api/obstructions/${other.id}`)).status).toBe(403)
    expect((await new Client(server.app).get(`/api/farms/${northFarmId}/obstructions`)).status).toBe(401)
  })
})
