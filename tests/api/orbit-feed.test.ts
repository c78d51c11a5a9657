// The orbit feed: the local fake feed (nominal constellations as OMM with today's epoch),
// fetchOrbitFeed against real HTTP servers (success, retries with backoff, timeouts,
// permanent errors, unusable content), rolling active feed data forward, the run-now and
// status endpoints, and roles.
import { createServer, type Server } from 'node:http'
import type { AddressInfo } from 'node:net'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { nominalConstellation, parseOrbitFile, satellitePositions } from '../../shared/precision/index.ts'
import { clearListeners, on } from '../../server/events.ts'
import { fetchOrbitFeed, feedUrlOf, nominalFeedOmm } from '../../server/services/orbitFeed.ts'
import { Client, demo, signIn, startTestServer, type TestServer } from '../support/server.ts'

let server: TestServer
let office: Client
let crew: Client
let appServer: Server
let feedUrl: string
let helper: Server
let helperUrl: string
let hits: Record<string, number> = {}
const reasons: string[] = []

async function listen(s: Server): Promise<string> {
  await new Promise<void>((resolve) => s.listen(0, '127.0.0.1', resolve))
  return `http://127.0.0.1:${(s.address() as AddressInfo).port}`
}

beforeAll(async () => {
  server = await startTestServer()
  office = await signIn(server.app, demo.office)
  crew = await signIn(server.app, demo.contractor)
  appServer = createServer(server.app)
  feedUrl = `${await listen(appServer)}/api/orbit-feed/nominal.json`
  // A stand-in for outside feeds that fail in the ways real ones do.
  helper = createServer((req, res) => {
    const path = req.url ?? '/'
    hits[path] = (hits[path] ?? 0) + 1
    if (path === '/flaky' && hits[path] <= 2) return void res.writeHead(503).end('busy')
    if (path === '/flaky') return void fetch(feedUrl).then(async (r) => res.writeHead(200, { 'content-type': 'application/json' }).end(await r.text()))
    if (path === '/slow') return // never answers
    if (path === '/missing') return void res.writeHead(404).end('no such feed')
    if (path === '/garbage') return void res.writeHead(200, { 'content-type': 'text/plain' }).end('<html><body>Maintenance</body></html>')
    res.writeHead(500).end()
  })
  helperUrl = await listen(helper)
  on('orbits.changed', (p) => void reasons.push(p.reason))
})
afterAll(async () => {
  clearListeners()
  helper?.closeAllConnections()
  await new Promise((r) => helper?.close(r))
  appServer?.closeAllConnections()
  await new Promise((r) => appServer?.close(r))
  await office
    ?.call('put', '/api/orbits/active')
    .send(['GPS', 'GLONASS', 'Galileo', 'BeiDou'].map((system) => ({ system, orbitSetId: null, enabled: true })))
  await server?.close()
})

describe('the local fake feed', () => {
  it('serves the nominal constellations as OMM JSON with today 00:00 UTC as epoch, no sign-in needed', async () => {
    const res = await new Client(server.app).get('/api/orbit-feed/nominal.json')
    expect(res.status).toBe(200)
    expect(res.body).toHaveLength(nominalConstellation('all').length)
    const today = new Date().toISOString().slice(0, 10)
    expect(res.body[0].EPOCH).toBe(`${today}T00:00:00.000`)
    const parsed = parseOrbitFile(JSON.stringify(res.body))
    expect(parsed.errors).toEqual([])
    const count = (s: string) => parsed.satellites.filter((x) => x.system === s).length
    expect([count('GPS'), count('GLONASS'), count('Galileo'), count('BeiDou'), count('Other')]).toEqual([24, 24, 24, 30, 0])
  })

  it('puts the satellites where the nominal constellations are, within 150 km over three days', () => {
    // The builder the endpoint serves.
    const fake = parseOrbitFile(JSON.stringify(nominalFeedOmm(Date.now()))).satellites
    const nominal = nominalConstellation('all')
    const start = Math.floor(Date.now() / 86_400_000) * 86_400_000
    const times = [start + 6 * 3600_000, start + 3 * 86_400_000]
    const a = satellitePositions(nominal, times)
    const b = satellitePositions(fake, times)
    let worstM = 0
    for (let i = 0; i < a.length; i += 3) worstM = Math.max(worstM, Math.hypot(a[i] - b[i], a[i + 1] - b[i + 1], a[i + 2] - b[i + 2]))
    expect(worstM).toBeLessThan(150_000)
  })
})

describe('fetchOrbitFeed', () => {
  it('fetches the local feed over HTTP into a new feed set', async () => {
    const result = await fetchOrbitFeed(server.database.db, feedUrl)
    expect(result.ok).toBe(true)
    if (!result.ok) return
    expect(result).toMatchObject({ attempts: 1, satelliteCount: 102, skippedCount: 0, switched: [] })
    expect(result.name).toMatch(/^Local nominal feed \d{4}-\d\d-\d\d \d\d:\d\d UTC$/)
    const set = (await office.get(`/api/orbit-sets/${result.orbitSetId}`)).body
    expect(set).toMatchObject({ source: 'feed', format: 'omm-json', systems: { GPS: 24, GLONASS: 24, Galileo: 24, BeiDou: 30 }, ageWarning: false })
    expect(reasons.some((r) => r.includes(`set ${result.orbitSetId}`))).toBe(true)
  })

  it('constellations that use a feed set roll forward to the next one', async () => {
    const first = await fetchOrbitFeed(server.database.db, feedUrl)
    if (!first.ok) throw new Error(first.message)
    await office.call('put', '/api/orbits/active').send([
      { system: 'GPS', orbitSetId: first.orbitSetId, enabled: true },
      { system: 'Galileo', orbitSetId: first.orbitSetId, enabled: true },
    ])
    const second = await fetchOrbitFeed(server.database.db, feedUrl)
    if (!second.ok) throw new Error(second.message)
    expect(second.switched.sort()).toEqual(['GPS', 'Galileo'])
    const active = (await office.get('/api/orbits/active')).body as { system: string; orbitSetId: number | null }[]
    expect(active.find((a) => a.system === 'GPS')!.orbitSetId).toBe(second.orbitSetId)
    expect(active.find((a) => a.system === 'GLONASS')!.orbitSetId).toBeNull()
    // The superseded feed set is no longer in use and can be deleted.
    expect((await office.delete(`/api/orbit-sets/${first.orbitSetId}`)).status).toBe(204)
  })

  it('retries server errors with backoff and then succeeds', async () => {
    hits = {}
    const result = await fetchOrbitFeed(server.database.db, `${helperUrl}/flaky`, { backoffMs: 20 })
    expect(result.ok).toBe(true)
    expect(result.attempts).toBe(3)
  })

  it('gives up with a clear status: timeouts, permanent errors, unreachable hosts, unusable content', async () => {
    const before = (await office.get('/api/orbit-sets')).body.length
    const slow = await fetchOrbitFeed(server.database.db, `${helperUrl}/slow`, { timeoutMs: 200, retries: 1, backoffMs: 10 })
    expect(slow).toMatchObject({ ok: false, attempts: 2, error: 'no answer within 0.2 s' })
    expect(slow.message).toMatch(/^The orbit feed at 127\.0\.0\.1:\d+ failed after 2 attempts: no answer within 0\.2 s\.$/)
    const missing = await fetchOrbitFeed(server.database.db, `${helperUrl}/missing`, { backoffMs: 10 })
    expect(missing).toMatchObject({ ok: false, attempts: 1, error: 'the feed answered HTTP 404 Not Found' })
    const closed = createServer()
    const closedUrl = await listen(closed)
    await new Promise((r) => closed.close(r))
    const down = await fetchOrbitFeed(server.database.db, `${closedUrl}/feed.json`, { retries: 1, backoffMs: 10 })
    expect(down).toMatchObject({ ok: false, attempts: 2 })
    expect(!down.ok && down.error).toMatch(/cannot reach the feed \(ECONNREFUSED\)/)
    const garbage = await fetchOrbitFeed(server.database.db, `${helperUrl}/garbage`, { backoffMs: 10 })
    expect(garbage.ok).toBe(false)
    expect(!garbage.ok && garbage.error).toMatch(/No record in the feed could be used/)
    const fivexx = await fetchOrbitFeed(server.database.db, `${helperUrl}/always-500`, { retries: 3, backoffMs: 5 })
    expect(fivexx).toMatchObject({ ok: false, attempts: 4 })
    expect((await office.get('/api/orbit-sets')).body.length).toBe(before)
  })
})

describe('run now and status', () => {
  it('runs the configured feed, records the run and shows it; a failure is a 502 and shows too', async () => {
    const app = server.appWith({ orbitFeedUrl: feedUrl })
    const staff = new Client(app, office.cookie)
    const run = await staff.post('/api/orbit-feed/run')
    expect(run.status).toBe(200)
    expect(run.body).toMatchObject({ ok: true, satelliteCount: 102 })
    const status = (await staff.get('/api/orbit-feed/status')).body
    expect(status).toMatchObject({ url: feedUrl, usesLocalFake: false, lastRun: { ok: true, orbitSetId: run.body.orbitSetId, attempts: 1 } })
    expect(status.newestFeedSet.id).toBe(run.body.orbitSetId)

    const broken = new Client(server.appWith({ orbitFeedUrl: `${helperUrl}/missing` }), office.cookie)
    const failed = await broken.post('/api/orbit-feed/run')
    expect(failed.status).toBe(502)
    expect(failed.body.error).toMatchObject({ code: 'feed_failed', message: expect.stringMatching(/HTTP 404/) })
    const after = (await broken.get('/api/orbit-feed/status')).body
    expect(after.lastRun).toMatchObject({ ok: false, message: expect.stringMatching(/HTTP 404/) })
    expect(after.newestFeedSet.id).toBe(run.body.orbitSetId)
  })

  it('shows runs recorded by the job queue as well (result wrapped as { summary, data })', async () => {
    const result = await fetchOrbitFeed(server.database.db, feedUrl)
    const jobId = await server.repos.orbits.startFeedRun(feedUrl, null)
    await server.repos.orbits.finishFeedRun(jobId, { ok: true, error: null, resultJson: JSON.stringify({ summary: result.message, data: result }) })
    const status = (await office.get('/api/orbit-feed/status')).body
    expect(status.lastRun).toMatchObject({ ok: true, message: result.message, orbitSetId: result.ok ? result.orbitSetId : -1, attempts: 1 })
    expect(status).toMatchObject({ url: '', usesLocalFake: true })
  })

  it('with ORBIT_FEED_URL empty the app fetches its own local fake feed', () => {
    expect(feedUrlOf({ orbitFeedUrl: '', publicUrl: 'http://127.0.0.1:3000' })).toBe('http://127.0.0.1:3000/api/orbit-feed/nominal.json')
    expect(feedUrlOf({ orbitFeedUrl: 'https://feeds.example.net/gnss.json', publicUrl: 'x' })).toBe('https://feeds.example.net/gnss.json')
  })

  it('only office staff and admins run the feed or read its status', async () => {
    expect((await crew.post('/api/orbit-feed/run')).status).toBe(403)
    expect((await crew.get('/api/orbit-feed/status')).status).toBe(403)
    expect((await new Client(server.app).get('/api/orbit-feed/status')).status).toBe(401)
  })
})
