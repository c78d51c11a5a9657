// User administration: listing with paging / sort / search / role filter, invitations'
// validation, farm links, deactivation and the last-admin rule.
import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { users } from '../../server/db/schema.ts'
import {
  Client,
  createUserWithPassword,
  demo,
  linkToken,
  signIn,
  startTestServer,
  unique,
  waitForMail,
  type TestServer,
} from '../support/server.ts'

let server: TestServer
let admin: Client
let adminId: number

beforeAll(async () => {
  server = await startTestServer()
  admin = await signIn(server.app, demo.admin)
  adminId = (await admin.get('/api/auth/me')).body.id
})
afterAll(async () => {
  await server?.close()
})

describe('listing', () => {
  it('filters by role and shows farm links and the password state', async () => {
    const res = await admin.get('/api/users?role=client&pageSize=200')
    expect(res.status).toBe(200)
    expect(res.body.items.length).toBeGreaterThanOrEqual(2)
    for (const u of res.body.items) expect(u.role).toBe('client')
    const north = res.body.items.find((u: { email: string }) => u.email === demo.clientNorth)
    expect(north).toMatchObject({ active: true, passwordSet: true })
    expect(north.farmIds.length).toBeGreaterThan(0)
    expect(north).not.toHaveProperty('passwordHash')
  })

  it('searches name and e-mail, sorts and pages', async () => {
    const tag = unique('lst')
    for (const name of ['Cara', 'Abel', 'Bert']) {
      await server.repos.users.insert({ email: `${name.toLowerCase()}.${tag}@example.test`, name: `${name} ${tag}`, role: 'office' })
    }
    const page1 = await admin.get(`/api/users?q=${tag}&sort=name&pageSize=2`)
    expect(page1.body.total).toBe(3)
    expect(page1.body.items.map((u: { name: string }) => u.name)).toEqual([`Abel ${tag}`, `Bert ${tag}`])
    const page2 = await admin.get(`/api/users?q=${tag}&sort=name&pageSize=2&page=2`)
    expect(page2.body.items.map((u: { name: string }) => u.name)).toEqual([`Cara ${tag}`])
    const byEmailDesc = await admin.get(`/api/users?q=${tag}&sort=email&order=desc`)
    expect(byEmailDesc.body.items[0].email).toMatch(/^cara\./)
    expect((await admin.get(`/api/users?q=abel.${tag}`)).body.total).toBe(1)
  })

  it('rejects an unknown role filter or sort key', async () => {
    const res = await admin.get('/api/users?role=boss&sort=passwordHash&active=maybe')
    expect(res.status).toBe(400)
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['active', 'role', 'sort'])
  })

  it('filters by active state', async () => {
    const user = await createUserWithPassword(server, { role: 'office' })
    await admin.patch(`/api/users/${user.id}`, { active: false })
    const inactive = await admin.get('/api/users?active=false&pageSize=200')
    expect(inactive.body.items.some((u: { id: number }) => u.id === user.id)).toBe(true)
    for (const u of inactive.body.items) expect(u.active).toBe(false)
  })
})

describe('invitations: validation and farm links', () => {
  it('names every bad field', async () => {
    const res = await admin.post('/api/users', { email: 'nope', name: ' ', role: 'owner', farmIds: [0] })
    expect(res.status).toBe(400)
    expect(res.body.error.fields).toMatchObject({ email: 'Enter a valid e-mail address', name: 'Enter a name' })
    expect(res.body.error.fields.role).toBeTruthy()
    expect(res.body.error.fields['farmIds.0']).toBeTruthy()
  })

  it('links a client to farms, and refuses farm links for other roles or unknown farms', async () => {
    const farmId = (await admin.get('/api/farms?pageSize=1')).body.items[0].id
    const email = `${unique('cl')}@example.test`
    const since = new Date()
    const ok = await admin.post('/api/users', { email, name: 'Clem Client', role: 'client', farmIds: [farmId] })
    expect(ok.status).toBe(201)
    expect(ok.body.farmIds).toEqual([farmId])
    const { token } = linkToken((await waitForMail(server.repos, email, since)).textBody)
    await new Client(server.app).post('/api/auth/reset', { token, password: 'client-password' })
    const client = await signIn(server.app, email, 'client-password')
    expect((await client.get('/api/farms')).body.items.map((f: { id: number }) => f.id)).toEqual([farmId])

    const office = await admin.post('/api/users', { email: `${unique('of')}@example.test`, name: 'Olga', role: 'office', farmIds: [farmId] })
    expect(office.status).toBe(400)
    expect(office.body.error.fields.farmIds).toMatch(/Only client users/)
    const unknownFarm = await admin.post('/api/users', { email: `${unique('cl')}@example.test`, name: 'Cy', role: 'client', farmIds: [999999] })
    expect(unknownFarm.status).toBe(400)
    expect(unknownFarm.body.error.fields.farmIds).toMatch(/No farm with id 999999/)
  })

  it('changing a client to another role drops the farm links', async () => {
    const farmId = (await admin.get('/api/farms?pageSize=1')).body.items[0].id
    const user = await createUserWithPassword(server, { role: 'client', farmIds: [farmId] })
    const res = await admin.patch(`/api/users/${user.id}`, { role: 'contractor' })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ role: 'contractor', farmIds: [] })
  })
})

describe('changes', () => {
  it('renames, changes role and units', async () => {
    const user = await createUserWithPassword(server, { role: 'contractor' })
    const res = await admin.patch(`/api/users/${user.id}`, { name: 'New Name', role: 'office', units: 'imperial' })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ name: 'New Name', role: 'office', units: 'imperial', email: user.email })
    const session = await signIn(server.app, user.email, user.password)
    expect((await session.get('/api/auth/me')).body.role).toBe('office')
  })

  it('a role change ends the open sessions of the user; the next sign-in has the new role and a new session', async () => {
    const user = await createUserWithPassword(server, { role: 'admin' })
    const session = await signIn(server.app, user.email, user.password)
    expect((await session.get('/api/users')).status).toBe(200)
    await admin.patch(`/api/users/${user.id}`, { role: 'office' })
    expect(await server.repos.sessions.countOf(user.id)).toBe(0)
    expect((await session.get('/api/users')).status).toBe(401)
    const again = await signIn(server.app, user.email, user.password)
    expect(again.cookie).not.toBe(session.cookie)
    expect((await again.get('/api/auth/me')).body.role).toBe('office')
    expect((await again.get('/api/users')).status).toBe(403)
  })

  it('deactivating a user ends their sessions; reactivating lets them sign in again', async () => {
    const user = await createUserWithPassword(server, { role: 'office' })
    const session = await signIn(server.app, user.email, user.password)
    const res = await admin.patch(`/api/users/${user.id}`, { active: false })
    expect(res.status).toBe(200)
    expect(res.body.active).toBe(false)
    expect(await server.repos.sessions.countOf(user.id)).toBe(0)
    expect((await session.get('/api/auth/me')).status).toBe(401)
    expect((await new Client(server.app).post('/api/auth/sign-in', { email: user.email, password: user.password })).status).toBe(401)
    await admin.patch(`/api/users/${user.id}`, { active: true })
    await signIn(server.app, user.email, user.password)
  })

  it('404 for an unknown user, 400 for bad fields', async () => {
    expect((await admin.patch('/api/users/999999', { name: 'X' })).status).toBe(404)
    const bad = await admin.patch(`/api/users/${adminId}`, { role: 'king', active: 'yes' })
    expect(bad.status).toBe(400)
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['active', 'role'])
  })
})

describe('the last active admin', () => {
  async function otherActiveAdmins(): Promise<number[]> {
    const rows = await server.database.db.select().from(users).where(eq(users.role, 'admin'))
    return rows.filter((r) => r.active && r.id !== adminId).map((r) => r.id)
  }

  it('cannot be demoted or deactivated, but can be once another admin exists', async () => {
    // Make the demo admin the only active admin for this test (other test admins are demoted).
    for (const id of await otherActiveAdmins()) await server.repos.users.update(id, { role: 'office' })

    const demote = await admin.patch(`/api/users/${adminId}`, { role: 'office' })
    expect(demote.status).toBe(409)
    expect(demote.body.error.fields.role).toMatch(/at least one active admin/)
    const deactivate = await admin.patch(`/api/users/${adminId}`, { active: false })
    expect(deactivate.status).toBe(409)
    expect(deactivate.body.error.fields.active).toMatch(/at least one active admin/)
    // A harmless change to the last admin is fine.
    expect((await admin.patch(`/api/users/${adminId}`, { units: 'imperial' })).status).toBe(200)

    // With a second active admin, that one can be demoted and deactivated...
    const second = await createUserWithPassword(server, { role: 'admin' })
    expect((await admin.patch(`/api/users/${second.id}`, { active: false })).status).toBe(200)
    // ...and once it is inactive, the demo admin is the last active one again.
    expect((await admin.patch(`/api/users/${adminId}`, { role: 'contractor' })).status).toBe(409)
    expect((await admin.get('/api/auth/me')).body.role).toBe('admin')
  })

  it('two admins demoting each other at the same moment leave one admin, not none', async () => {
    // For this test the demo admin steps aside, so that exactly two admins are active.
    for (const id of await otherActiveAdmins()) await server.repos.users.update(id, { role: 'office' })
    const a = await createUserWithPassword(server, { role: 'admin' })
    const b = await createUserWithPassword(server, { role: 'admin' })
    await server.repos.users.update(adminId, { active: false })
    try {
      const asA = await signIn(server.app, a.email, a.password)
      const asB = await signIn(server.app, b.email, b.password)
      const results = await Promise.all([
        asA.patch(`/api/users/${b.id}`, { role: 'office' }),
        asB.patch(`/api/users/${a.id}`, { active: false }),
      ])
      // One change wins. The other is refused: 409 when both passed the role check before
      // either wrote; when the loser's request was read after the winner's change, 403 (A
      // demoted B) or 401 (B deactivated A, which ended A's sessions).
      const statuses = results.map((r) => r.status).sort()
      expect(statuses.filter((s) => s === 200)).toHaveLength(1)
      expect([401, 403, 409]).toContain(statuses.find((s) => s !== 200))
      const left = (await server.database.db.select().from(users).where(eq(users.role, 'admin'))).filter((u) => u.active)
      expect(left).toHaveLength(1)
    } finally {
      await server.repos.users.update(adminId, { active: true })
    }
  })
})
