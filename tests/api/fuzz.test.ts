// Hostile input, generated: property-based fuzzing (fast-check) of every JSON write route
// and of the upload routes (boundary files, orbit files, zip archives). The rule checked
// for every generated request: the answer is a 2xx or a 4xx JSON error with a sentence,
// never a 5xx, and a refused request stores nothing (row counts unchanged). Size limits
// answer 413. Run counts are bounded (FUZZ_RUNS, default 25 per property) so the file runs
// in `npm test`; a failure prints the seed and the shrunk counter-example to replay.
import { count } from 'drizzle-orm'
import fc from 'fast-check'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { clearListeners } from '../../server/events.ts'
import { farms } from '../../server/db/schema.ts'
import { fields, orbitSatellites, orbitSets } from '../../server/db/schema-planning.ts'
import { geojsonFile, kmlText, rawZip, zipOf } from '../fixtures/imports/make-fixtures.ts'
import { listRoutes } from '../support/routes.ts'
import { Client, demo, signIn, startTestServer, unique, type TestServer } from '../support/server.ts'

const RUNS = Number(process.env.FUZZ_RUNS ?? 25)
const params = { numRuns: RUNS, endOnFailure: true }

let server: TestServer
let admin: Client
let farmId: number
let serviceLevelId: number

beforeAll(async () => {
  server = await startTestServer()
  admin = await signIn(server.app, demo.admin)
  farmId = await server.repos.farms.insert({ name: unique('Fuzz farm '), timeZone: 'UTC', address: '', notes: '' })
  serviceLevelId =
    (await server.repos.fields.serviceLevelIdByName('RTK')) ??
    (await server.repos.fields.insertServiceLevel({ name: 'RTK', sigmaUereM: 0.012, note: '' }))
})
afterAll(async () => {
  // Leave no fuzzed fields or farm behind for the other suites.
  for (const f of (await admin.get(`/api/farms/${farmId}/fields`)).body as Array<{ id: number }>) await server.repos.fields.delete(f.id)
  await server.repos.farms.delete(farmId)
  clearListeners()
  await server?.close()
})

interface Answer {
  status: number
  body: unknown
}

/** The rule: no 5xx; an error is JSON with a code and a sentence. */
function expectHandled(res: Answer, what: string): void {
  expect(res.status, `${what} answered ${res.status}: ${JSON.stringify(res.body).slice(0, 300)}`).toBeLessThan(500)
  if (res.status >= 400) {
    const error = (res.body as { error?: { code?: unknown; message?: unknown } }).error
    expect(typeof error?.code, what).toBe('string')
    expect(typeof error?.message, what).toBe('string')
    expect((error?.message as string).length, what).toBeGreaterThan(5)
  }
}

async function rowCounts() {
  const db = server.database.db
  const [[f], [fa], [os], [sat]] = await Promise.all([
    db.select({ n: count() }).from(fields),
    db.select({ n: count() }).from(farms),
    db.select({ n: count() }).from(orbitSets),
    db.select({ n: count() }).from(orbitSatellites),
  ])
  return { fields: f.n, farms: fa.n, orbitSets: os.n, orbitSatellites: sat.n }
}

/** JSON values that break naive code: deep nesting, huge and odd numbers, long and odd strings. */
const hostileScalar = fc.oneof(
  fc.constantFrom(1e308, -1e308, Number.MAX_SAFE_INTEGER + 2, -0, 0.1 + 0.2, 2 ** 53, -1, 0, 1),
  fc.double({ noNaN: true, noDefaultInfinity: true }),
  fc.integer(),
  fc.string({ maxLength: 40 }),
  fc.constantFrom('NaN', 'Infinity', '-Infinity', '', ' ', '\u0000', '<script>alert(1)</script>', "' OR 1=1 --", '../../etc/passwd', 'x'.repeat(5000)),
  fc.boolean(),
  fc.constant(null),
)
const hostileJson = fc.oneof(
  fc.jsonValue({ maxDepth: 4 }),
  fc.dictionary(fc.constantFrom('name', 'id', 'farmId', 'fieldId', 'email', 'role', 'startsAt', 'endsAt', 'coordinates', 'geometry', 'items', 'password', '__proto__', 'constructor'), hostileScalar, { maxKeys: 6 }),
  fc.array(hostileScalar, { maxLength: 5 }),
)
/** Text that JSON.parse reads as deeply nested arrays or objects. */
const deepJson = fc.tuple(fc.integer({ min: 500, max: 20_000 }), fc.boolean()).map(([depth, obj]) =>
  obj ? '{"a":'.repeat(depth) + '1' + '}'.repeat(depth) : '['.repeat(depth) + ']'.repeat(depth),
)

/** Write routes whose fuzzing would end the caller's session or reach the network. */
const skipped = new Set(['POST /api/auth/sign-out', 'POST /api/auth/sign-out-everywhere', 'POST /api/orbit-feed/run', 'POST /api/space-weather/run'])
/** Upload routes: fuzzed with files below. */
const uploads = new Set(['POST /api/farms/:id/fields/import/preview', 'POST /api/farms/:id/fields/import', 'POST /api/orbit-sets'])

describe('every JSON write route', () => {
  it('answers generated hostile bodies with a 2xx or a clear 4xx, never a 5xx, and stores nothing it refused', { timeout: 600_000 }, async () => {
    const writes = listRoutes(server.app)
      .filter((r) => /^(POST|PUT|PATCH) \/api\//.test(r))
      .filter((r) => !skipped.has(r) && !uploads.has(r))
    expect(writes.length).toBeGreaterThan(20)
    for (const route of writes) {
      const [method, pattern] = route.split(' ')
      // An id nobody has: nothing real is touched; the body is checked first or a 404 follows.
      const path = pattern.replace(/:[A-Za-z]+/g, '987654321')
      await fc.assert(
        fc.asyncProperty(fc.oneof(hostileJson.map((v) => JSON.stringify(v)), deepJson), async (text) => {
          const before = await rowCounts()
          const res = await admin
            .call(method.toLowerCase() as 'post' | 'put' | 'patch', path)
            .set('Content-Type', 'application/json')
            .send(text)
          expectHandled(res, `${route} with ${text.slice(0, 120)}`)
          if (res.status >= 400) expect(await rowCounts(), route).toEqual(before)
        }),
        { ...params, numRuns: Math.max(3, Math.ceil(RUNS / 5)) },
      )
    }
  })

  it('a JSON body over 1 MB is refused with 413', async () => {
    const res = await admin.call('post', '/api/farms').set('Content-Type', 'application/json').send(JSON.stringify({ name: 'x'.repeat(1_100_000) }))
    expect(res.status).toBe(413)
    expect(res.body.error.message).toMatch(/too large/)
  })

  it('malformed JSON text is a 400 naming the problem', async () => {
    for (const text of ['{', '{"a":NaN}', '{"a":Infinity}', "{'a':1}", '[1,]']) {
      const res = await admin.call('post', '/api/farms').set('Content-Type', 'application/json').send(text)
      expect(res.status, text).toBe(400)
      expect(res.body.error.message).toBe('The request body is not valid JSON.')
    }
  })
})

// ---- boundary files ---------------------------------------------------------------------

const preview = (file: Buffer, name: string) => admin.call('post', `/api/farms/${farmId}/fields/import/preview`).attach('file', file, name)
const importAll = (file: Buffer, name: string, options: unknown) =>
  admin.call('post', `/api/farms/${farmId}/fields/import`).field('options', JSON.stringify(options)).attach('file', file, name)

const coordinate = fc.oneof(
  fc.double({ min: -200, max: 200, noNaN: true }),
  fc.constantFrom(1e308, -1e308, 0, 90, -90, 180, -180),
)
const ring = fc.array(fc.tuple(coordinate, coordinate), { minLength: 0, maxLength: 12 })
/** GeoJSON-like text, including numbers that JSON reads as Infinity (1e400). */
const boundaryText = fc.oneof(
  fc.array(ring, { maxLength: 3 }).map((rings) => JSON.stringify({ type: 'Feature', properties: { name: 'F' }, geometry: { type: 'Polygon', coordinates: rings } })),
  fc.array(ring, { maxLength: 3 }).map((rings) => JSON.stringify({ type: 'Polygon', coordinates: rings }).replace(/1e\+308/g, '1e400')),
  hostileJson.map((v) => JSON.stringify({ type: 'FeatureCollection', features: v })),
  fc.constantFrom(
    '{"type":"Polygon","coordinates":[[[NaN,1],[2,3],[4,5],[NaN,1]]]}',
    '<?xml version="1.0"?><!DOCTYPE kml [<!ENTITY x "y">]><kml>&x;</kml>',
    '<kml><Document><Placemark><Polygon><outerBoundaryIs><LinearRing><coordinates>a,b c,d</coordinates></LinearRing></outerBoundaryIs></Polygon></Placemark></Document></kml>',
  ),
  fc.string({ maxLength: 300 }),
)
const fileName = fc.oneof(
  fc.constantFrom('fields.geojson', 'fields.kml', 'f.kmz', 'f.zip', 'f.shp', '', '../../etc/passwd', 'C:\\temp\\a.json', 'a'.repeat(300)),
  fc.string({ maxLength: 30 }),
)
/** Zip archives: random entry names (with traversal and absolute names), random contents. */
const zipEntries = fc.array(
  fc.record({
    name: fc.oneof(fc.constantFrom('doc.kml', '../doc.kml', '/abs/doc.kml', 'C:/doc.kml', 'a/../../doc.kml', 'fields.shp', 'fields.dbf', 'x\u0000.kml'), fc.string({ minLength: 1, maxLength: 20 })),
    data: fc.oneof(boundaryText.map((t) => Buffer.from(t)), fc.uint8Array({ maxLength: 200 }).map((a) => Buffer.from(a)), fc.constant(Buffer.from(kmlText()))),
  }),
  { minLength: 0, maxLength: 5 },
)

describe('boundary uploads', () => {
  it('generated boundary texts and names: 200 or a clear 4xx; an import that is refused stores no field', { timeout: 300_000 }, async () => {
    await fc.assert(
      fc.asyncProperty(boundaryText, fileName, async (text, name) => {
        const before = await rowCounts()
        const res = await preview(Buffer.from(text), name)
        expectHandled(res, `preview of ${name}: ${text.slice(0, 100)}`)
        const imp = await importAll(Buffer.from(text), name, { selections: [{ index: 0, name: unique('Fuzz ') }], serviceLevelId, confirmUnusualArea: true })
        expectHandled(imp, `import of ${name}`)
        if (imp.status >= 400) expect(await rowCounts()).toEqual(before)
      }),
      params,
    )
  })

  it('generated zip archives (traversal names, junk, nested kml): 200 or a clear 4xx, never a 5xx', { timeout: 300_000 }, async () => {
    await fc.assert(
      fc.asyncProperty(zipEntries, fc.boolean(), async (entries, handMade) => {
        const byName = new Map(entries.map((e) => [e.name, e.data]))
        const zip = handMade
          ? rawZip([...byName].map(([name, data]) => ({ name, data })))
          : await zipOf(Object.fromEntries([...byName].filter(([n]) => !n.includes('\u0000'))))
        const res = await preview(zip, 'fields.kmz')
        expectHandled(res, `zip with ${[...byName.keys()].join(', ')}`)
        if ([...byName.keys()].some((n) => n.startsWith('../') || n.startsWith('/') || n.includes('/../') || /^[A-Za-z]:/.test(n)) && handMade) {
          expect(res.status).toBe(400)
        }
      }),
      params,
    )
  })

  it('a zip bomb is refused before it is expanded, and huge vertex counts are refused or read, never a 5xx', { timeout: 120_000 }, async () => {
    const bomb = rawZip([{ name: 'doc.kml', data: Buffer.alloc(200 * 1024 * 1024, 0x20) }])
    const res = await preview(bomb, 'bomb.kmz')
    expect([400, 413]).toContain(res.status)
    expect(res.body.error.message).toMatch(/expand|large|MB/i)
    // 400 000 vertices in one ring (about 9 MB of GeoJSON, under the 10 MB file limit).
    const n = 400_000
    const coords = Array.from({ length: n }, (_, i) => [-93 + 0.01 * Math.cos((2 * Math.PI * i) / n), 42 + 0.01 * Math.sin((2 * Math.PI * i) / n)])
    coords.push(coords[0])
    const huge = Buffer.from(JSON.stringify({ type: 'Polygon', coordinates: [coords] }))
    const big = await preview(huge, 'huge.geojson')
    expectHandled(big, 'a ring of 400 000 vertices')
  })

  it('KML declaring XML entities (entity expansion, external entities) is refused', async () => {
    const kml = '<?xml version="1.0"?><!DOCTYPE kml [<!ENTITY x SYSTEM "file:///etc/passwd">]><kml><Document><name>&x;</name></Document></kml>'
    const res = await preview(Buffer.from(kml), 'evil.kml')
    expect(res.status).toBe(400)
    expect(res.body.error.message).toMatch(/entities/)
  })

  it('a file over 10 MB is refused with 413', async () => {
    const res = await preview(Buffer.alloc(10 * 1024 * 1024 + 10, 0x20), 'big.geojson')
    expect(res.status).toBe(413)
    expect(res.body.error.message).toMatch(/larger than 10 MB/)
  })

  it('the accepted sample still imports (the fuzzing did not break the route)', async () => {
    expect((await preview(geojsonFile(), 'fields.geojson')).status).toBe(200)
  })
})

// ---- orbit files ------------------------------------------------------------------------

const tleLine = fc.tuple(fc.constantFrom('1 ', '2 '), fc.string({ minLength: 0, maxLength: 70 })).map(([a, b]) => a + b)
const orbitText = fc.oneof(
  fc.array(fc.oneof(tleLine, fc.string({ maxLength: 30 })), { maxLength: 9 }).map((lines) => lines.join('\n')),
  hostileJson.map((v) => JSON.stringify(v)),
  fc.constantFrom(
    '[{"OBJECT_NAME":"X","EPOCH":"2026-11-30T12:00:00","MEAN_MOTION":"NaN","ECCENTRICITY":2,"INCLINATION":1e400}]',
    '<?xml version="1.0"?><ndm><omm><body><segment><data><meanElements><MEAN_MOTION>Infinity</MEAN_MOTION></meanElements></data></segment></body></omm></ndm>',
    '******** Week 100 almanac for PRN-01 ********\nID: 01\nHealth: 000\nEccentricity: NaN\n',
  ),
)

describe('orbit file uploads', () => {
  it('generated TLE, OMM and YUMA-like files: 201 or a clear 4xx; a refused upload stores no orbit set', { timeout: 300_000 }, async () => {
    await fc.assert(
      fc.asyncProperty(orbitText, fileName, async (text, name) => {
        const before = await rowCounts()
        const res = await admin.call('post', '/api/orbit-sets').field('name', unique('Fuzz set ')).attach('file', Buffer.from(text), name || 'x.txt')
        expectHandled(res, `orbit file ${name}: ${text.slice(0, 100)}`)
        if (res.status >= 400) expect(await rowCounts()).toEqual(before)
        else await server.repos.orbits.deleteSet(res.body.orbitSet.id)
      }),
      params,
    )
  })
})
