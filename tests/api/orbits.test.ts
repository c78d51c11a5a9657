// Orbit sets (uploads of TLE, OMM JSON/XML and YUMA files), the active orbit data per
// constellation, and GET /api/orbit-data for browsers and jobs. Uses the invented orbit
// sample files of tests/fixtures/precision/orbits.
import { readFileSync } from 'node:fs'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { nominalConstellation, parseOrbitFile } from '../../shared/precision/index.ts'
import { clearListeners, on } from '../../server/events.ts'
import { loadActiveSatellites } from '../../server/services/orbitData.ts'
import { Client, demo, signIn, startTestServer, unique, type TestServer } from '../support/server.ts'

const sample = (name: string) => readFileSync(new URL(`../fixtures/precision/orbits/${name}`, import.meta.url))

let server: TestServer
let admin: Client
let office: Client
let crew: Client
let north: Client
const reasons: string[] = []

beforeAll(async () => {
  server = await startTestServer()
  admin = await signIn(server.app, demo.admin)
  office = await signIn(server.app, demo.office)
  crew = await signIn(server.app, demo.contractor)
  north = await signIn(server.app, demo.clientNorth)
  on('orbits.changed', (p) => void reasons.push(p.reason))
})
afterAll(async () => {
  // Leave the shared test database on nominal orbits for the other suites.
  await admin
    .call('put', '/api/orbits/active')
    .send(['GPS', 'GLONASS', 'Galileo', 'BeiDou'].map((system) => ({ system, orbitSetId: null, enabled: true })))
  clearListeners()
  await server?.close()
})

function upload(client: Client, file: Buffer, fileName: string, fields: Record<string, string> = {}) {
  let t = client.call('post', '/api/orbit-sets')
  for (const [k, v] of Object.entries({ name: unique('Set '), ...fields })) t = t.field(k, v)
  return t.attach('file', file, fileName)
}

describe('uploading orbit files', () => {
  it('a TLE file becomes an orbit set with its satellites, epochs and age', async () => {
    const res = await upload(office, sample('gps-sample.tle'), 'gps.tle')
    expect(res.status).toBe(201)
    const set = res.body.orbitSet
    expect(set).toMatchObject({ format: 'tle', source: 'upload', satelliteCount: 24, skippedCount: 0, systems: { GPS: 24 } })
    expect(set.newestEpoch).toBe('2026-11-30T12:00:00.000Z')
    expect(res.body.skipped).toBe(0)
    const detail = await office.get(`/api/orbit-sets/${set.id}`)
    expect(detail.body.satellites).toHaveLength(24)
    expect(detail.body.satellites[0]).toMatchObject({ system: 'GPS', epoch: '2026-11-30T12:00:00.000Z' })
    expect(typeof detail.body.satellites[0].ageDays).toBe('number')
    expect(reasons.some((r) => r.includes(`${set.id}`))).toBe(true)
  })

  it('OMM JSON, OMM XML and YUMA files are told from their content', async () => {
    const omm = await upload(office, sample('galileo-sample.omm.json'), 'x.bin')
    expect(omm.body.orbitSet).toMatchObject({ format: 'omm-json', systems: { Galileo: 24 } })
    const xml = await upload(admin, sample('glonass-sample.omm.xml'), 'glonass.xml')
    expect(xml.body.orbitSet).toMatchObject({ format: 'omm-xml', systems: { GLONASS: 24 } })
    const yuma = await upload(office, sample('gps-sample.yuma.txt'), 'almanac.alm')
    expect(yuma.status).toBe(201)
    expect(yuma.body.orbitSet.format).toBe('yuma')
    expect(yuma.body.orbitSet.satelliteCount).toBeGreaterThan(20)
  })

  it('a file with some broken records keeps the good ones and reports each bad one', async () => {
    const lines = sample('gps-sample.tle').toString('utf8').split('\n')
    // Break the checksum of the second satellite's line 2 and drop the third's line 1.
    lines[5] = lines[5].slice(0, -1) + String((Number(lines[5].slice(-1)) + 1) % 10)
    lines.splice(7, 1)
    const res = await upload(office, Buffer.from(lines.join('\n')), 'mixed.tle')
    expect(res.status).toBe(201)
    expect(res.body.skipped).toBeGreaterThanOrEqual(2)
    expect(res.body.orbitSet.satelliteCount).toBeLessThanOrEqual(22)
    expect(res.body.orbitSet.problems[0]).toMatchObject({ record: expect.stringMatching(/^record \d/), line: expect.any(Number) })
    expect(res.body.orbitSet.problems.map((p: { message: string }) => p.message).join(' ')).toMatch(/checksum/)
  })

  it('a file with no usable record is refused record by record and nothing is stored', async () => {
    const before = (await office.get('/api/orbit-sets')).body.length
    const bad = Buffer.from(
      'GPS BROKEN 1\n1 90001U 26900A   26334.50000000  .00000000  00000-0  00000-0 0  9999\n2 90001  55.0000 159.8732 0001000   0.0000  74.7116  2.00569110    11\n',
    )
    const res = await upload(office, bad, 'broken.tle')
    expect(res.status).toBe(400)
    expect(res.body.error.code).toBe('no_usable_record')
    expect(res.body.error.message).toMatch(/record 1, line \d/)
    expect(Object.keys(res.body.error.fields)).toContain('record 1')
    const empty = await upload(office, Buffer.alloc(0), 'empty.tle')
    expect(empty.status).toBe(400)
    expect(empty.body.error.message).toMatch(/empty/)
    const binary = await upload(office, Buffer.from([0x50, 0x4b, 0x03, 0x04, 0, 0, 1, 2]), 'x.zip')
    expect(binary.status).toBe(400)
    expect(binary.body.error.message).toMatch(/not a text file/)
    const missing = await office.call('post', '/api/orbit-sets').field('name', 'no file')
    expect(missing.status).toBe(400)
    const noName = await office.call('post', '/api/orbit-sets').attach('file', sample('gps-sample.tle'), 'gps.tle')
    expect(noName.status).toBe(400)
    expect(noName.body.error.fields).toHaveProperty('name')
    expect((await office.get('/api/orbit-sets')).body.length).toBe(before)
  })

  it('the upload can name the constellation for a file whose names do not tell it', async () => {
    const text = sample('gps-sample.tle').toString('utf8').replace(/GPS TEST/g, 'BIRD')
    const other = await upload(office, Buffer.from(text), 'birds.tle')
    expect(other.body.orbitSet.systems).toEqual({ Other: 24 })
    expect(other.body.orbitSet.notes.length).toBeGreaterThan(0)
    const told = await upload(office, Buffer.from(text), 'birds.tle', { system: 'GPS' })
    expect(told.body.orbitSet).toMatchObject({ systems: { GPS: 24 }, fileSystem: 'GPS' })
  })

  it('sets older than 7 days are flagged (common practice)', async () => {
    const list = (await office.get('/api/orbit-sets')).body as { newestEpoch: string; ageWarning: boolean; ageDays: number }[]
    for (const s of list) expect(s.ageWarning).toBe(s.ageDays > 7)
  })
})

describe('active orbit data', () => {
  it('serves the nominal constellations of the enabled systems (the demo tracks GPS and GLONASS at least)', async () => {
    const res = await crew.get('/api/orbit-data')
    expect(res.status).toBe(200)
    expect(res.body.enabledSystems).toEqual(expect.arrayContaining(['GPS', 'GLONASS']))
    expect(res.body.sources).toContainEqual({ system: 'GPS', kind: 'nominal', nominal: 'gps' })
    expect(typeof res.body.version).toBe('string')
    const again = await north.get('/api/orbit-data').set('If-None-Match', `"${res.body.version}"`)
    expect(again.status).toBe(304)
  })

  it('choosing an uploaded set for GPS changes orbit-data, the version and the jobs loader', async () => {
    const set = (await upload(office, sample('gps-sample.tle'), 'gps.tle')).body.orbitSet
    const before = (await crew.get('/api/orbit-data')).body.version
    const res = await office.call('put', '/api/orbits/active').send([{ system: 'GPS', orbitSetId: set.id, enabled: true }])
    expect(res.status).toBe(200)
    expect(res.body.find((a: { system: string }) => a.system === 'GPS')).toMatchObject({ orbitSetId: set.id, satelliteCount: 24, orbitSetName: set.name })
    const data = (await north.get('/api/orbit-data')).body
    expect(data.version).not.toBe(before)
    const gps = data.sources.find((s: { system: string }) => s.system === 'GPS')
    expect(gps).toMatchObject({ kind: 'set', orbitSetId: set.id, format: 'tle' })
    expect(parseOrbitFile(gps.content, gps.parseOptions).satellites).toHaveLength(24)
    expect(reasons).toContain('active orbit data changed')

    const loaded = await loadActiveSatellites(server.database.db)
    expect(loaded.version).toBe(data.version)
    const bySystem = (sys: string) => loaded.satellites.filter((s) => s.system === sys)
    expect(bySystem('GPS').every((s) => s.source === 'tle')).toBe(true)
    expect(bySystem('GPS')).toHaveLength(24)
    expect(bySystem('GLONASS')).toHaveLength(nominalConstellation('glonass').length)
    expect(loaded.summary).toContain(`GPS: ${set.name} (#${set.id}, 24)`)

    // In use: cannot be deleted.
    const del = await office.delete(`/api/orbit-sets/${set.id}`)
    expect(del.status).toBe(409)
    expect(del.body.error.message).toMatch(/in use for GPS/)
  })

  it('disabling a constellation leaves it out; bad choices are refused', async () => {
    const res = await office.call('put', '/api/orbits/active').send([{ system: 'GLONASS', orbitSetId: null, enabled: false }])
    expect(res.status).toBe(200)
    const data = (await crew.get('/api/orbit-data')).body
    expect(data.enabledSystems).not.toContain('GLONASS')
    expect(data.sources.some((s: { system: string }) => s.system === 'GLONASS')).toBe(false)
    const galileoSet = (await upload(office, sample('galileo-sample.omm.json'), 'gal.json')).body.orbitSet
    const wrong = await office.call('put', '/api/orbits/active').send([{ system: 'GPS', orbitSetId: galileoSet.id, enabled: true }])
    expect(wrong.status).toBe(400)
    expect(wrong.body.error.message).toMatch(/has no GPS satellites/)
    const noNominal = await office.call('put', '/api/orbits/active').send([{ system: 'QZSS', orbitSetId: null, enabled: true }])
    expect(noNominal.status).toBe(400)
    const missing = await office.call('put', '/api/orbits/active').send([{ system: 'GPS', orbitSetId: 999999, enabled: true }])
    expect(missing.status).toBe(400)
    expect((await office.call('put', '/api/orbits/active').send([{ system: 'Mars', orbitSetId: null, enabled: true }])).status).toBe(400)
    // An unused set can be deleted.
    expect((await office.delete(`/api/orbit-sets/${galileoSet.id}`)).status).toBe(204)
    expect((await office.get(`/api/orbit-sets/${galileoSet.id}`)).status).toBe(404)
  })
})

describe('roles', () => {
  it('orbit sets and the active choice are for office staff and admins; orbit data for everyone signed in', async () => {
    for (const c of [crew, north]) {
      expect((await c.get('/api/orbit-sets')).status).toBe(403)
      expect((await upload(c, sample('gps-sample.tle'), 'gps.tle')).status).toBe(403)
      expect((await c.get('/api/orbits/active')).status).toBe(403)
      expect((await c.call('put', '/api/orbits/active').send([{ system: 'GPS', orbitSetId: null, enabled: true }])).status).toBe(403)
      expect((await c.get('/api/orbit-data')).status).toBe(200)
    }
    expect((await admin.get('/api/orbits/active')).status).toBe(200)
    expect((await new Client(server.app).get('/api/orbit-data')).status).toBe(401)
  })
})
