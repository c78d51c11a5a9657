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
let targetFarmId: number

const binary = (res: Response, done: (err: Error | null, body: Buffer) => void) => {
  const chunks: Buffer[] = []
  res.on('data', (c: Buffer) => chunks.push(c))
  res.on('end', () => done(null, Buffer.concat(chunks)))
}

beforeAll(async () => {
  server = await startTestServer()
  w = await planningWorld(server)
  targetFarmId = await server.repos.farms.insert({ name: unique('Terminal farm '), timeZone: 'America/Chicago', address: '', notes: '' })
})
afterAll(async () => {
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
    const fields = (await w.office.get(`/api/farms/${w.northFarmId}/fields`)).body as Field[]
    expect(fields.length).toBeGreaterThan(0)
    const res = await w.office.get(`/api/farms/${w.northFarmId}/taskdata.zip`).buffer(true).parse(binary)
    expect(res.status).toBe(200)
    expect(res.headers['content-type']).toContain('application/zip')
    expect(res.headers['content-disposition']).toMatch(/attachment; filename="?hollis-creek-farms-taskdata\.zip"?/)
    const zip = await JSZip.loadAsync(res.body as Buffer)
    const xml = await zip.file('TASKDATA/TASKDATA.XML')!.async('string')

    // Every field is a PFD with its boundary, geometry as stored.
    const read = readTaskDataBoundaries(xml)
    expect(read.map((p) => p.designator).sort()).toEqual(fields.map((f) => f.name).sort())
    for (const f of fields) closeTo(read.find((p) => p.designator === f.name)!.boundary.coordinates, f.boundary.coordinates)

    // The upcoming planned and confirmed passes are TSK elements with TaskStatus (G) 1.
    const upcoming = ((await w.office.get(`/api/passes?farmId=${w.northFarmId}&status=planned,confirmed&from=${new Date().toISOString()}`)).body as Pass[])
    expect((xml.match(/<TSK /g) ?? []).length).toBe(upcoming.length)
    if (upcoming.length) expect(xml).toContain(`B="${upcoming[0].workTypeName} ${upcoming[0].fieldName}`.slice(0, 35))

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
      expect(copy.areaHa).toBeCloseTo(measureBoundary(f.boundary).areaHa, 6)
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
