// A farm's fields round-trip through ISO 11783-10 task data: the export (a zip with
// TASKDATA/TASKDATA.XML, or the XML alone) holds every field as a PFD and the upcoming
// passes as planned TSK; uploading that zip into another farm creates the same fields with
// the same geometry. Element names: ISO 11783-10:2015, element tables of its normative
// annex (from memory; see tests/unit/server/isoxml.test.ts).
import JSZip from 'jszip'
import type { Response } from 'superagent'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Field } from '../../shared/schemas/fields.ts'
import type { Pass } from '../../shared/schemas/passes.ts'
import { measureBoundary } from '../../server/imports/geometry.ts'
import { readTaskDataBoundaries } from '../../server/imports/isoxml.ts'
import { planningWorld, type PlanningWorld } from '../support/passes.ts'
import { startTestServer, unique, type TestServer } from '../support/server.ts'

let server: TestServer
let w: PlanningWorld
/** a farm of this file's own: two fields (one with a hole, one in two parts), a tree line, a pass */
let sourceFarmId: number
let targetFarmId: number
let passId: number

const binary = (res: Response, done: (err: Error | null, body: Buffer) => void) => {
  const chunks: Buffer[] = []
  res.on('data', (c: Buffer) => chunks.push(c))
  res.on('end', () => done(null, Buffer.concat(chunks)))
}

beforeAll(async () => {
  server = await startTestServer()
  w = await planningWorld(server)
  sourceFarmId = await server.repos.farms.insert({ name: unique('Task data farm '), timeZone: 'America/Chicago', address: '7 Section Line Road', notes: '' })
  targetFarmId = await server.repos.farms.insert({ name: unique('Terminal farm '), timeZone: 'America/Chicago', address: '', notes: '' })
  const square = (lon: number, lat: number, d: number) => [[lon, lat], [lon + d, lat], [lon + d, lat + d], [lon, lat + d], [lon, lat]]
  const shapes = [
    { name: 'Pond Forty', boundary: { type: 'Polygon', coordinates: [square(-93.62, 42.05, 0.004), square(-93.619, 42.051, 0.001)] } },
    { name: 'Split Eighty', boundary: { type: 'MultiPolygon', coordinates: [[square(-93.61, 42.05, 0.003)], [square(-93.605, 42.05, 0.003)]] } },
  ]
  const fieldIds: number[] = []
  for (const shape of shapes) {
    const m = measureBoundary(shape.boundary as Field['boundary'])
    fieldIds.push(
      await server.repos.fields.insert({
        farmId: sourceFarmId,
        name: shape.name,
        crop: '',
        notes: '',
        serviceLevelId: w.serviceLevelId,
        antennaHeightM: 3.5,
        boundary: JSON.stringify(shape.boundary),
        areaHa: m.areaHa,
        centroidLat: m.centroid.latDeg,
        centroidLon: m.centroid.lonDeg,
      }),
    )
  }
  await server.repos.obstructions.insert({ farmId: sourceFarmId, kind: 'deciduous', heightM: 18, geometry: JSON.stringify({ type: 'LineString', coordinates: [[-93.62, 42.0545], [-93.616, 42.0545]] }), leaflessFrom: null, leaflessTo: null, note: '' })
  const pass = await w.office.post('/api/passes', { fieldId: fieldIds[0], workTypeId: w.workTypes.planting.id, start: new Date(Date.now() + 48 * 3_600_000).toISOString(), durationMin: 240 })
  expect(pass.status).toBe(201)
  passId = pass.body.id
})
afterAll(async () => {
  // The farms take their fields, obstructions and passes with them.
  if (sourceFarmId) await server.repos.farms.delete(sourceFarmId)
  if (targetFarmId) await server.repos.farms.delete(targetFarmId)
  await server?.close()
})

function closeTo(a: unknown, b: unknown) {
  if (typeof a === 'number') return expect(a).toBeCloseTo(b as number, 9)
  expect(Array.isArray(a) && Array.isArray(b) && a.length === b.length).toBe(true)
  ;(a as unknown[]).forEach((x, i) => closeTo(x, (b as unknown[])[i]))
}

describe('task data of a farm', () => {
  it('exports the fields and planned passes, and the upload creates the same fields elsewhere', async () => {
    const fields = (await w.office.get(`/api/farms/${sourceFarmId}/fields`)).body as Field[]
    expect(fields).toHaveLength(2)
    const res = await w.office.get(`/api/farms/${sourceFarmId}/taskdata.zip`).buffer(true).parse(binary)
    expect(res.status).toBe(200)
    expect(res.headers['content-type']).toContain('application/zip')
    expect(res.headers['content-disposition']).toMatch(/attachment; filename="?task-data-farm-.+-taskdata\.zip"?/)
    const zip = await JSZip.loadAsync(res.body as Buffer)
    const xml = await zip.file('TASKDATA/TASKDATA.XML')!.async('string')

    // Every field is a PFD with its boundary, geometry as stored.
    const read = readTaskDataBoundaries(xml)
    expect(read.map((p) => p.designator).sort()).toEqual(fields.map((f) => f.name).sort())
    for (const f of fields) closeTo(read.find((p) => p.designator === f.name)!.boundary.coordinates, f.boundary.coordinates)

    // The hole is an interior ring, the two parts are two PLN of type 1.
    expect((read.find((p) => p.designator === 'Pond Forty')!.boundary.coordinates as unknown[]).length).toBe(2)
    expect(read.find((p) => p.designator === 'Split Eighty')!.boundary.type).toBe('MultiPolygon')
    // The tree line near Pond Forty goes with it as an obstacle LSG (type 9), not as a boundary.
    expect(xml).toMatch(/<LSG A="9" B="Tree line 18 m">/)
    // The planned pass is a TSK with TaskStatus (G) 1 and a planned TIM (D 1).
    const pass = (await w.office.get(`/api/passes/${passId}`)).body as Pass
    expect(xml.match(/<TSK /g) ?? []).toHaveLength(1)
    expect(xml).toContain(`<TSK A="TSK1" B="Planting Pond Forty" C="CTR1" D="FRM1" E="PFD1" G="1">`)
    expect(xml).toContain(`A="${pass.start.replace(/\.\d{3}Z$/, 'Z')}" B="${pass.end.replace(/\.\d{3}Z$/, 'Z')}" C="14400" D="1"`)

    // Uploaded into another farm: the preview names every field, the import creates them.
    const preview = await w.crew.call('post', `/api/farms/${targetFarmId}/fields/import/preview`).attach('file', res.body as Buffer, 'taskdata.zip')
    expect(preview.status).toBe(200)
    expect(preview.body.format).toBe('isoxml')
    const features = preview.body.features as Array<{ index: number; suggestedName: string; problems: string[] }>
    expect(features.map((f) => f.suggestedName).sort()).toEqual(fields.map((f) => f.name).sort())
    const imported = await w.crew
      .call('post', `/api/farms/${targetFarmId}/fields/import`)
      .field('options', JSON.stringify({ selections: features.map((f) => ({ index: f.index })), nameAttribute: 'name', serviceLevelId: w.serviceLevelId, confirmUnusualArea: true }))
      .attach('file', res.body as Buffer, 'taskdata.zip')
    expect(imported.status).toBe(201)
    const copies = (await w.crew.get(`/api/farms/${targetFarmId}/fields`)).body as Field[]
    for (const f of fields) {
      const copy = copies.find((c) => c.name === f.name)!
      closeTo(copy.boundary.coordinates, f.boundary.coordinates)
      // The same area as the stored boundary measures (a test may store a field with a round nominal area).
      expect(copy.areaHa).toBeCloseTo(measureBoundary(f.boundary).areaHa, 3)
    }
  })

  it('offers the XML alone, and only to those who may see the farm', async () => {
    const xml = await w.north.get(`/api/farms/${w.northFarmId}/taskdata.xml`)
    expect(xml.status).toBe(200)
    expect(xml.headers['content-type']).toContain('application/xml')
    expect(xml.text).toMatch(/^<\?xml version="1.0" encoding="UTF-8"\?>\n<ISO11783_TaskData VersionMajor="4"/)
    expect((await w.south.get(`/api/farms/${w.northFarmId}/taskdata.xml`)).status).toBe(404)
  })
})
