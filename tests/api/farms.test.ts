// Farms: who sees which, paging / sorting / search, validation with field messages, the
// admin-only changes and their all-or-nothing writes.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import {
  Client,
  createUserWithPassword,
  demo,
  signIn,
  startTestServer,
  unique,
  type TestServer,
} from '../support/server.ts'

let server: TestServer
let admin: Client
let office: Client
let north: Client
let south: Client
let northFarmIds: number[]
let southFarmIds: number[]

beforeAll(async () => {
  server = await startTestServer()
  admin = await signIn(server.app, demo.admin)
  office = await signIn(server.app, demo.office)
  north = await signIn(server.app, demo.clientNorth)
  south = await signIn(server.app, demo.clientSouth)
  northFarmIds = (await north.get('/api/auth/me')).body.farmIds
  southFarmIds = (await south.get('/api/auth/me')).body.farmIds
})
afterAll(async () => {
  await server?.close()
})

async function createFarm(body: Record<string, unknown> = {}) {
  const res = await admin.post('/api/farms', { name: unique('Farm '), timeZone: 'America/Chicago', ...body })
  expect(res.status).toBe(201)
  return res.body as { id: number; name: string }
}

describe('who sees which farm', () => {
  it('the demo clients share no farm', () => {
    expect(northFarmIds.length).toBeGreaterThan(0)
    expect(southFarmIds.length).toBeGreaterThan(0)
    expect(northFarmIds.filter((id) => southFarmIds.includes(id))).toEqual([])
  })

  it('a client lists only linked farms; other roles list all', async () => {
    const mine = await north.get('/api/farms?pageSize=200')
    expect(mine.status).toBe(200)
    expect(mine.body.items.map((f: { id: number }) => f.id).sort()).toEqual([...northFarmIds].sort())
    expect(mine.body.total).toBe(northFarmIds.length)
    const all = await office.get('/api/farms?pageSize=200')
    expect(all.body.total).toBeGreaterThanOrEqual(3)
    const zones = new Set(all.body.items.map((f: { timeZone: string }) => f.timeZone))
    expect(zones.size).toBeGreaterThanOrEqual(2)
  })

  it('a client reading another farm gets 404, as for a farm that does not exist', async () => {
    const other = await north.get(`/api/farms/${southFarmIds[0]}`)
    expect(other.status).toBe(404)
    const missing = await north.get('/api/farms/999999')
    expect(missing.status).toBe(404)
    expect(other.body).toEqual(missing.body)
    expect((await north.get(`/api/farms/${northFarmIds[0]}`)).status).toBe(200)
  })

  it('a client linked later sees the farm at once', async () => {
    const farm = await createFarm()
    const user = await createUserWithPassword(server, { role: 'client' })
    const client = await signIn(server.app, user.email, user.password)
    expect((await client.get(`/api/farms/${farm.id}`)).status).toBe(404)
    await admin.patch(`/api/farms/${farm.id}`, { clientIds: [user.id] })
    expect((await client.get(`/api/farms/${farm.id}`)).status).toBe(200)
    expect((await client.get('/api/farms')).body.total).toBe(1)
    await admin.patch(`/api/farms/${farm.id}`, { clientIds: [] })
    expect((await client.get(`/api/farms/${farm.id}`)).status).toBe(404)
    expect((await client.get('/api/farms')).body).toMatchObject({ items: [], total: 0 })
  })
})

describe('paging, sorting and search', () => {
  const tag = unique('pg')
  beforeAll(async () => {
    for (const [i, zone] of ['Europe/Berlin', 'America/Denver', 'America/Chicago', 'America/Denver', 'Europe/Berlin'].entries()) {
      await createFarm({ name: `${tag} ${String.fromCharCode(69 - i)}`, timeZone: zone, notes: `paging set ${tag}` })
    }
  })

  it('pages through search results with a stable total', async () => {
    const p1 = await office.get(`/api/farms?q=${tag}&pageSize=2&page=1&sort=name`)
    const p3 = await office.get(`/api/farms?q=${tag}&pageSize=2&page=3&sort=name`)
    expect(p1.body).toMatchObject({ total: 5, page: 1, pageSize: 2 })
    expect(p1.body.items.map((f: { name: string }) => f.name)).toEqual([`${tag} A`, `${tag} B`])
    expect(p3.body.items.map((f: { name: string }) => f.name)).toEqual([`${tag} E`])
  })

  it('sorts descending and by other columns', async () => {
    const desc = await office.get(`/api/farms?q=${tag}&sort=name&order=desc`)
    expect(desc.body.items.map((f: { name: string }) => f.name)).toEqual(['E', 'D', 'C', 'B', 'A'].map((l) => `${tag} ${l}`))
    const byZone = await office.get(`/api/farms?q=${tag}&sort=timeZone`)
    const zones = byZone.body.items.map((f: { timeZone: string }) => f.timeZone)
    expect(zones).toEqual([...zones].sort())
  })

  it('searches name, address and notes, with LIKE wildcards taken literally', async () => {
    expect((await office.get(`/api/farms?q=${encodeURIComponent(`paging set ${tag}`)}`)).body.total).toBe(5)
    expect((await office.get(`/api/farms?q=${encodeURIComponent(`${tag}%`)}`)).body.total).toBe(0)
    expect((await office.get('/api/farms?q=%25')).body.total).toBe(0)
  })

  it('rejects bad paging and sort parameters, naming them', async () => {
    const res = await office.get('/api/farms?page=0&pageSize=1000&sort=password&order=sideways')
    expect(res.status).toBe(400)
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['order', 'page', 'pageSize', 'sort'])
    expect(res.body.error.fields.sort).toMatch(/Sort by one of: name/)
  })
})

describe('admin changes', () => {
  // Links go to disposable client users: the demo clients' farms stay as seeded.
  async function disposableClient() {
    const user = await createUserWithPassword(server, { role: 'client' })
    return (await admin.get(`/api/users/${user.id}`)).body as { id: number; name: string; email: string }
  }

  it('creates a farm with linked clients', async () => {
    const northUser = await disposableClient()
    const res = await admin.post('/api/farms', {
      name: `  ${unique('Prairie Dell ')}  `,
      timeZone: 'America/Denver',
      address: '1 Test Road',
      clientIds: [northUser.id],
    })
    expect(res.status).toBe(201)
    expect(res.body.name).not.toMatch(/^\s|\s$/)
    expect(res.body).toMatchObject({ timeZone: 'America/Denver', address: '1 Test Road', notes: '' })
    expect(res.body.clients).toEqual([{ id: northUser.id, name: northUser.name, email: northUser.email }])
    expect((await admin.get(`/api/farms/${res.body.id}`)).body).toEqual(res.body)
  })

  it('names every bad field', async () => {
    const res = await admin.post('/api/farms', { name: '', timeZone: 'Mars/Olympus_Mons', clientIds: ['x'] })
    expect(res.status).toBe(400)
    expect(res.body.error.fields.name).toBe('Enter the farm name')
    expect(res.body.error.fields.timeZone).toBe('Choose an IANA time zone such as America/Chicago')
    expect(res.body.error.fields['clientIds.0']).toBeTruthy()
  })

  it('refuses linking users who are not clients, and unknown users; nothing is stored', async () => {
    const name = unique('Half ')
    const officeUser = (await office.get('/api/auth/me')).body
    const notClient = await admin.post('/api/farms', { name, timeZone: 'UTC', clientIds: [officeUser.id] })
    expect(notClient.status).toBe(400)
    expect(notClient.body.error.fields.clientIds).toMatch(/Only client users/)
    const unknown = await admin.post('/api/farms', { name, timeZone: 'UTC', clientIds: [987654] })
    expect(unknown.status).toBe(400)
    expect(unknown.body.error.fields.clientIds).toMatch(/No user with id 987654/)
    expect((await admin.get(`/api/farms?q=${encodeURIComponent(name)}`)).body.total).toBe(0)
  })

  it('refuses a duplicate name with 409 on create and on rename', async () => {
    const a = await createFarm()
    const b = await createFarm()
    const dup = await admin.post('/api/farms', { name: a.name, timeZone: 'UTC' })
    expect(dup.status).toBe(409)
    expect(dup.body.error.fields.name).toMatch(/already exists/)
    const rename = await admin.patch(`/api/farms/${b.id}`, { name: a.name })
    expect(rename.status).toBe(409)
  })

  it('simultaneous creates of one name: one farm is made, the others get 409 naming the field, none a 500', async () => {
    const name = unique('Same name ')
    const results = await Promise.all(Array.from({ length: 4 }, () => admin.post('/api/farms', { name, timeZone: 'UTC' })))
    const statuses = results.map((r) => r.status).sort()
    expect(statuses).toEqual([201, 409, 409, 409])
    for (const r of results.filter((x) => x.status === 409)) expect(r.body.error.fields.name).toMatch(/already exists/)
    const listed = await admin.get(`/api/farms?q=${encodeURIComponent(name)}`)
    expect(listed.body.items.filter((f: { name: string }) => f.name === name)).toHaveLength(1)
  })

  it('a patch changes only the fields it names', async () => {
    const northUser = await disposableClient()
    const farm = await createFarm({ address: 'Keep me', notes: 'Keep these notes', clientIds: [northUser.id] })
    const res = await admin.patch(`/api/farms/${farm.id}`, { timeZone: 'Europe/Berlin' })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ name: farm.name, timeZone: 'Europe/Berlin', address: 'Keep me', notes: 'Keep these notes' })
    expect(res.body.clients.map((c: { id: number }) => c.id)).toEqual([northUser.id])
    const bad = await admin.patch(`/api/farms/${farm.id}`, { timeZone: 'Nowhere' })
    expect(bad.status).toBe(400)
    expect(bad.body.error.fields.timeZone).toBeTruthy()
  })

  it('deletes a farm; then it is gone', async () => {
    const farm = await createFarm()
    expect((await admin.delete(`/api/farms/${farm.id}`)).status).toBe(204)
    expect((await admin.get(`/api/farms/${farm.id}`)).status).toBe(404)
    expect((await admin.delete(`/api/farms/${farm.id}`)).status).toBe(404)
  })

  it('rejects a malformed id in the address', async () => {
    const res = await admin.get('/api/farms/abc')
    expect(res.status).toBe(400)
    expect(res.body.error.fields.id).toBeTruthy()
  })

  it('only admins change farms', async () => {
    const farm = await createFarm()
    expect((await office.post('/api/farms', { name: unique('No '), timeZone: 'UTC' })).status).toBe(403)
    expect((await office.patch(`/api/farms/${farm.id}`, { notes: 'x' })).status).toBe(403)
    expect((await north.delete(`/api/farms/${farm.id}`)).status).toBe(403)
  })
})
