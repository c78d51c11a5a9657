// Boundary uploads: every accepted format (GeoJSON, KML, KMZ, zipped shapefile reprojected
// from its .prj) previewed and imported; every bad or hostile file refused with a clear 4xx
// and nothing stored; the all-or-nothing import; roles. Files are invented by
// tests/fixtures/imports/make-fixtures.ts.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { clearListeners, on } from '../../server/events.ts'
import {
  UNKNOWN_PRJ,
  WGS84_PRJ,
  bowTieGeoJson,
  geojsonFile,
  kmlText,
  kmzFile,
  lyingZip,
  rawZip,
  shapefileZip,
  traversalZip,
  zipBomb,
  zipOf,
  zipWithManyEntries,
} from '../fixtures/imports/make-fixtures.ts'
import { Client, demo, signIn, startTestServer, unique, type TestServer } from '../support/server.ts'

let server: TestServer
let crew: Client
let north: Client
let farmId: number
let serviceLevelId: number
const created: number[] = []

beforeAll(async () => {
  server = await startTestServer()
  crew = await signIn(server.app, demo.contractor)
  north = await signIn(server.app, demo.clientNorth)
  // A farm of its own, so field names never clash with other suites.
  farmId = await server.repos.farms.insert({ name: unique('Import farm '), timeZone: 'America/Chicago', address: '', notes: '' })
  serviceLevelId =
    (await server.repos.fields.serviceLevelIdByName('RTK')) ??
    (await server.repos.fields.insertServiceLevel({ name: 'RTK', sigmaUereM: 0.012, note: '' }))
  on('field.changed', (p) => void created.push(p.fieldId))
})
afterAll(async () => {
  clearListeners()
  await server?.close()
})

const preview = (file: Buffer, name = 'upload.bin', client = crew) =>
  client.call('post', `/api/farms/${farmId}/fields/import/preview`).attach('file', file, name)

function importFile(file: Buffer, options: unknown, name = 'upload.bin') {
  return crew
    .call('post', `/api/farms/${farmId}/fields/import`)
    .field('options', JSON.stringify(options))
    .attach('file', file, name)
}

async function fieldCount(): Promise<number> {
  return (await crew.get(`/api/farms/${farmId}/fields`)).body.length
}

const expectedNames = ['North Eighty', 'Pond Quarter', 'Creek Strip']

function expectInventedFields(body: { features: { suggestedName: string; areaHa: number; problems: string[] }[] }) {
  expect(body.features.map((f) => f.suggestedName)).toEqual(expectedNames)
  // 800 x 400 m = 32 ha; 800 x 800 m less a 150 x 120 m pond = 62.2 ha; the trapezoid 21.25 ha
  // (laid out with a flat-earth approximation, so within 0.5 %).
  const areas = body.features.map((f) => f.areaHa)
  expect(areas[0]).toBeCloseTo(32, 0)
  expect(areas[1]).toBeCloseTo(62.2, 0)
  expect(areas[2]).toBeCloseTo(21.25, 0)
  for (const f of body.features) expect(f.problems).toEqual([])
}

describe('previews of every accepted format', () => {
  it('GeoJSON: polygons with attributes; points and lines are counted, not offered', async () => {
    const res = await preview(geojsonFile(), 'fields.geojson')
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ format: 'geojson', fileName: 'fields.geojson', sourceCrs: null, ignored: { LineString: 1, Point: 1 } })
    expect(res.body.attributes).toEqual(['FIELD_NAME', 'crop', 'acres_est'])
    expect(res.body.features[1].geometry.coordinates).toHaveLength(2) // the pond is a hole
    expectInventedFields(res.body)
    // ?preview=1 on the import path is the same
    const same = await crew.call('post', `/api/farms/${farmId}/fields/import?preview=1`).attach('file', geojsonFile(), 'f.json')
    expect(same.status).toBe(200)
    expect(same.body.features).toHaveLength(3)
  })

  it('KML and KMZ (told from the content, not the name)', async () => {
    const kml = await preview(Buffer.from(kmlText()), 'boundaries.txt')
    expect(kml.status).toBe(200)
    expect(kml.body.format).toBe('kml')
    expect(kml.body.attributes).toEqual(expect.arrayContaining(['name', 'crop']))
    expectInventedFields(kml.body)
    const kmz = await preview(await kmzFile(), 'boundaries.kmz')
    expect(kmz.body.format).toBe('kmz')
    expectInventedFields(kmz.body)
  })

  it('a zipped shapefile in NAD83 / UTM 15N is reprojected to WGS-84 from its .prj', async () => {
    const res = await preview(await shapefileZip(), 'fields.zip')
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ format: 'shapefile', sourceCrs: 'NAD_1983_UTM_Zone_15N' })
    expect(res.body.attributes).toEqual(['NAME', 'CROP'])
    expectInventedFields(res.body)
    const [lon, lat] = res.body.features[0].geometry.coordinates[0][0]
    expect(lon).toBeCloseTo(-93.6234, 4)
    expect(lat).toBeCloseTo(42.0512 + 900 / 111_320, 4)
  })

  it('a zipped shapefile in WGS-84, or in a sub-folder, reads as well', async () => {
    const wgs = await preview(await shapefileZip({ prj: WGS84_PRJ, projectWith: 'none', folder: 'export/farm' }), 'f.zip')
    expect(wgs.status).toBe(200)
    expect(wgs.body.sourceCrs).toBeNull()
    expectInventedFields(wgs.body)
  })

  it('broken polygons are listed with where they are broken', async () => {
    const res = await preview(bowTieGeoJson(), 'bow.geojson')
    expect(res.status).toBe(200)
    expect(res.body.features[0].problems[0]).toMatch(/crosses itself near 42\.\d{4} N, 93\.\d{4} W/)
    expect(res.body.features[0].areaHa).toBeNull()
  })
})

describe('bad and hostile files get a clear 4xx and change nothing', () => {
  const cases: [string, () => Promise<Buffer> | Buffer, number, RegExp][] = [
    ['an empty file', () => Buffer.alloc(0), 400, /The file is empty/],
    ['a picture', () => Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13]), 400, /not a text or zip file/],
    ['plain text', () => Buffer.from('field one, field two'), 400, /not recognised/],
    ['JSON that is not GeoJSON', () => Buffer.from('{"fields": []}'), 400, /not GeoJSON/],
    ['GeoJSON with only lines', () => Buffer.from(JSON.stringify({ type: 'LineString', coordinates: [[-93.6, 42], [-93.5, 42]] })), 400, /no polygons \(it holds 1 LineString\)/],
    ['GeoJSON in projected metres', () => Buffer.from(JSON.stringify({ type: 'Polygon', coordinates: [[[447000, 4655000], [448000, 4655000], [448000, 4656000], [447000, 4655000]]] })), 400, /not longitude\/latitude \(e\.g\. 447000, 4655000\)/],
    ['GeoJSON naming another CRS', () => Buffer.from(JSON.stringify({ type: 'FeatureCollection', crs: { type: 'name', properties: { name: 'EPSG:26915' } }, features: [] })), 400, /EPSG:26915/],
    ['broken KML', () => Buffer.from('<kml><Document><Placemark></kml>'), 400, /not well-formed XML/],
    ['XML that is not KML', () => Buffer.from('<?xml version="1.0"?><gpx></gpx>'), 400, /not KML/],
    ['a bare .shp', async () => Buffer.from([0, 0, 0x27, 0x0a, 0, 0, 0, 0]), 400, /bare \.shp/],
    ['a shapefile with an unknown projection', () => shapefileZip({ prj: UNKNOWN_PRJ }), 400, /Skyfurrow_Invented_Grid.*not supported \(unknown projection "Skyfurrow_Furrow_Projection"\)/],
    ['a projected shapefile without .prj', () => shapefileZip({ prj: null }), 400, /no \.prj file/],
    ['a zip with 250 entries', () => zipWithManyEntries(250), 413, /holds 250 entries; at most 200/],
    ['a zip expanding to 60 MB', () => zipBomb(60), 413, /expand to more than 50 MB/],
    ['a zip that lies about its sizes', () => lyingZip(), 413, /expands beyond its declared size/],
    ['a zip with a ../ path', () => traversalZip(), 400, /unsafe path \("\.\.\/doc\.kml"\)/],
    ['a zip without boundary files', () => zipOf({ 'notes.txt': 'x', 'map.pdf': 'y' }), 400, /no \.shp, \.kml, \.geojson or TASKDATA\.XML file \(it holds notes\.txt, map\.pdf\)/],
    ['an empty zip', () => rawZip([]), 400, /zip file is empty/],
    ['a truncated zip', async () => (await kmzFile()).subarray(0, 40), 400, /damaged or incomplete/],
  ]
  for (const [what, make, status, message] of cases) {
    it(what, async () => {
      const before = await fieldCount()
      const file = await make()
      const p = await preview(file)
      expect(p.status, JSON.stringify(p.body)).toBe(status)
      expect(p.body.error.message).toMatch(message)
      const i = await importFile(file, { selections: [{ index: 0, name: 'X' }], serviceLevelId })
      expect(i.status).toBe(status)
      expect(await fieldCount()).toBe(before)
    })
  }

  it('a file over 10 MB is refused with 413', async () => {
    const big = Buffer.alloc(10 * 1024 * 1024 + 10, 0x20)
    const res = await preview(big, 'big.geojson')
    expect(res.status).toBe(413)
    expect(res.body.error.message).toMatch(/larger than 10 MB/)
  })

  it('no file, or no options, is a 400', async () => {
    expect((await crew.call('post', `/api/farms/${farmId}/fields/import/preview`).field('x', 'y')).body.error.message).toMatch(/Choose a boundary file/)
    const noOptions = await crew.call('post', `/api/farms/${farmId}/fields/import`).attach('file', geojsonFile(), 'f.geojson')
    expect(noOptions.status).toBe(400)
    expect(noOptions.body.error.fields).toHaveProperty('options')
  })
})

describe('importing the chosen features', () => {
  it('creates the chosen features as fields, names from an attribute or typed, in one go', async () => {
    const before = await fieldCount()
    const res = await importFile(
      await shapefileZip(),
      { selections: [{ index: 0 }, { index: 1, name: 'Pond Forty' }], nameAttribute: 'NAME', serviceLevelId, antennaHeightM: 3.8, crop: 'corn' },
      'fields.zip',
    )
    expect(res.status).toBe(201)
    expect(res.body.created.map((f: { name: string }) => f.name)).toEqual(['North Eighty', 'Pond Forty'])
    expect(res.body.created[0]).toMatchObject({ antennaHeightM: 3.8, crop: 'corn', serviceLevelId, revision: 1 })
    expect(res.body.created[1].areaHa).toBeCloseTo(62.2, 0)
    expect(await fieldCount()).toBe(before + 2)
    for (const f of res.body.created) expect(created).toContain(f.id)
  })

  it('all or nothing: one taken name, one broken feature or a bad index stores nothing', async () => {
    const before = await fieldCount()
    // 'North Eighty' exists now (previous test): the whole import is refused.
    const taken = await importFile(geojsonFile(), { selections: [{ index: 2 }, { index: 0 }], nameAttribute: 'FIELD_NAME', serviceLevelId })
    expect(taken.status).toBe(409)
    expect(taken.body.error.message).toContain('North Eighty')
    expect(taken.body.error.fields).toHaveProperty('selections.1.name')
    const twice = await importFile(geojsonFile(), { selections: [{ index: 2, name: 'Same' }, { index: 1, name: 'same' }], serviceLevelId })
    expect(twice.status).toBe(409)
    const broken = await importFile(bowTieGeoJson(), { selections: [{ index: 0, name: 'Tie' }], serviceLevelId })
    expect(broken.status).toBe(400)
    expect(broken.body.error.message).toMatch(/cannot become a field: the boundary crosses itself near/)
    const index = await importFile(geojsonFile(), { selections: [{ index: 7, name: 'Ghost' }], serviceLevelId })
    expect(index.status).toBe(400)
    expect(index.body.error.fields['selections.0.index']).toMatch(/no polygon feature 7/)
    const noName = await importFile(geojsonFile(), { selections: [{ index: 2 }], serviceLevelId })
    expect(noName.status).toBe(400)
    const level = await importFile(geojsonFile(), { selections: [{ index: 2, name: 'Levelless' }], serviceLevelId: 999_999 })
    expect(level.status).toBe(400)
    expect(level.body.error.fields).toHaveProperty('serviceLevelId')
    expect(await fieldCount()).toBe(before)
  })

  it('unusual areas need confirmUnusualArea', async () => {
    const [lon, lat] = [-100.2, 40.1]
    const d = 0.06 // about 5 x 6.7 km: over 2,000 ha
    const huge = Buffer.from(JSON.stringify({ type: 'Polygon', coordinates: [[[lon, lat], [lon + d, lat], [lon + d, lat + d], [lon, lat + d], [lon, lat]]] }))
    const p = await preview(huge)
    expect(p.body.features[0].unusualArea).toBe(true)
    const refused = await importFile(huge, { selections: [{ index: 0, name: 'Whole section block' }], serviceLevelId })
    expect(refused.status).toBe(422)
    expect(refused.body.error.code).toBe('confirm-area')
    const ok = await importFile(huge, { selections: [{ index: 0, name: 'Whole section block' }], serviceLevelId, confirmUnusualArea: true })
    expect(ok.status).toBe(201)
  })
})

describe('roles', () => {
  it('clients cannot upload; other farms are 404 to clients; unknown farms 404', async () => {
    expect((await preview(geojsonFile(), 'f.geojson', north)).status).toBe(403)
    expect((await north.call('post', `/api/farms/${farmId}/fields/import`).attach('file', geojsonFile(), 'f.geojson')).status).toBe(403)
    expect((await crew.call('post', '/api/farms/999999/fields/import/preview').attach('file', geojsonFile(), 'f.geojson')).status).toBe(404)
    expect((await new Client(server.app).call('post', `/api/farms/${farmId}/fields/import/preview`).attach('file', geojsonFile(), 'f')).status).toBe(401)
  })
})
