// ISO 11783-10 task data (TASKDATA.XML): a hand-written file made from the standard's
// element tables, a round trip of what Skyfurrow writes, and the errors for broken files.
// References: ISO 11783-10:2015, Tractors and machinery for agriculture and forestry:
// Serial control and communications data network, Part 10: Task controller and management
// information system data interchange; the XML element and attribute descriptions of its
// normative annex (one table per element: CTR, FRM, PFD, PLN, LSG, PNT, TSK, TIM). The
// attribute letters and value lists below are quoted from memory of those tables.
import { readFileSync } from 'node:fs'
import { XMLParser } from 'fast-xml-parser'
import type { MultiPolygon, Polygon } from 'geojson'
import JSZip from 'jszip'
import { describe, expect, it } from 'vitest'
import type { Boundary } from '../../../shared/schemas/geo.ts'
import { measureBoundary } from '../../../server/imports/geometry.ts'
import { buildTaskData, readTaskDataBoundaries, type TaskData } from '../../../server/imports/isoxml.ts'
import { readBoundaryFile } from '../../../server/imports/readers.ts'

const handWritten = readFileSync(new URL('../../fixtures/imports/taskdata/TASKDATA.XML', import.meta.url), 'utf8')

const square = (lon: number, lat: number, d: number) => [
  [lon, lat],
  [lon + d, lat],
  [lon + d, lat + d],
  [lon, lat + d],
  [lon, lat],
]

function errorOf(fn: () => unknown): string {
  try {
    fn()
  } catch (error) {
    return (error as Error).message
  }
  throw new Error('expected an error')
}

describe('reading a hand-written TASKDATA.XML', () => {
  const fields = readTaskDataBoundaries(handWritten)

  it('reads every PFD with a PLN of PolygonType 1 as a field, named by PartfieldDesignator (C)', () => {
    // PFD table: A PartfieldId, C PartfieldDesignator, E CustomerIdRef, F FarmIdRef (ISO 11783-10, PFD element; from memory).
    expect(fields.map((f) => [f.id, f.designator, f.farm, f.customer])).toEqual([
      ['PFD1', 'Pond Quarter', 'Juniper Flats', 'Juniper Flats Cooperative'],
      ['PFD2', 'Split Eighty', 'Juniper Flats', 'Juniper Flats Cooperative'],
    ])
  })

  it('takes PNT C as latitude and D as longitude, and an LSG of type 2 as a hole', () => {
    // PNT table: C PointNorth, D PointEast, degrees WGS-84; LSG A: 1 polygon exterior, 2 polygon interior (ISO 11783-10; from memory).
    const pond = fields[0].boundary as Polygon
    expect(pond.type).toBe('Polygon')
    expect(pond.coordinates).toHaveLength(2)
    // The open exterior ring (a version 3 habit: closing implicit) is closed on reading.
    expect(pond.coordinates[0]).toEqual([
      [-96, 41],
      [-95.995, 41],
      [-95.995, 41.004],
      [-96, 41.004],
      [-96, 41],
    ])
    expect(pond.coordinates[1][0]).toEqual([-95.999, 41.001])
    // The hole is cut out of the area: area(with hole) = area(exterior) - area(hole) (derived).
    const measure = (g: Polygon) => measureBoundary(g as Boundary).areaHa
    const whole = measure({ type: 'Polygon', coordinates: [pond.coordinates[0]] })
    const hole = measure({ type: 'Polygon', coordinates: [pond.coordinates[1]] })
    expect(measure(pond)).toBeCloseTo(whole - hole, 6)
    expect(hole).toBeGreaterThan(0.5)
  })

  it('reads two boundary polygons of one partfield as a MultiPolygon, and leaves obstacles out', () => {
    const split = fields[1].boundary as MultiPolygon
    expect(split.type).toBe('MultiPolygon')
    expect(split.coordinates.map((p) => p[0][0])).toEqual([
      [-96, 41.01],
      [-95.997, 41.01],
    ])
    // PLN type 6 (obstacle) and a PFD-level LSG of type 9 (obstacle) are not boundaries.
    expect((fields[0].boundary as Polygon).coordinates.flat().some(([, lat]) => lat > 41.004)).toBe(false)
  })

  it('is recognised by the boundary upload as text and inside a zip', async () => {
    const text = await readBoundaryFile(Buffer.from(handWritten))
    expect(text.format).toBe('isoxml')
    expect(text.collection.features.map((f) => f.properties?.name)).toEqual(['Pond Quarter', 'Split Eighty'])
    const zip = new JSZip()
    zip.file('TASKDATA/TASKDATA.XML', handWritten)
    const zipped = await readBoundaryFile(await zip.generateAsync({ type: 'nodebuffer' }))
    expect(zipped.format).toBe('isoxml')
    expect(zipped.collection.features[0].geometry).toEqual(fields[0].boundary)
  })
})

describe('writing TASKDATA.XML', () => {
  const model: TaskData = {
    softwareVersion: '9.9.9',
    customers: [{ id: 'CTR1', name: 'Hollis & Daughters' }],
    farms: [{ id: 'FRM1', designator: 'Hollis Creek Farms', street: '1 Creek Road', customerIdRef: 'CTR1' }],
    partfields: [
      {
        id: 'PFD1',
        designator: 'North 40 <with pond>',
        areaM2: 161_874.3,
        customerIdRef: 'CTR1',
        farmIdRef: 'FRM1',
        boundary: { type: 'Polygon', coordinates: [square(-93.62, 42.05, 0.004), square(-93.619, 42.051, 0.001)] },
        obstacles: [{ designator: 'Tree line 18 m', geometry: { type: 'LineString', coordinates: [[-93.62, 42.0541], [-93.616, 42.0541]] } }],
      },
      {
        id: 'PFD2',
        designator: 'Two parts',
        areaM2: 20_000,
        customerIdRef: 'CTR1',
        farmIdRef: 'FRM1',
        boundary: { type: 'MultiPolygon', coordinates: [[square(-93.6, 42.0, 0.001)], [square(-93.598123456, 42.000987654, 0.001)]] },
        obstacles: [],
      },
    ],
    tasks: [
      {
        id: 'TSK1',
        designator: 'Planting North 40',
        customerIdRef: 'CTR1',
        farmIdRef: 'FRM1',
        partfieldIdRef: 'PFD1',
        startIso: '2026-12-04T14:00:00.000Z',
        stopIso: '2026-12-04T20:30:00.000Z',
      },
    ],
  }
  const xml = buildTaskData(model)
  const parsed = new XMLParser({ ignoreAttributes: false, attributeNamePrefix: '', isArray: (_name, _path, _leaf, isAttribute) => !isAttribute }).parse(xml)
  const root = parsed.ISO11783_TaskData[0]

  it('round-trips the geometry: holes as interior rings, several polygons as several PLN', () => {
    const back = readTaskDataBoundaries(xml)
    expect(back.map((f) => f.designator)).toEqual(['North 40 <with pond>', 'Two parts'])
    const close = (a: number[][][], b: number[][][]) => {
      expect(a.length).toBe(b.length)
      a.forEach((ring, i) => ring.forEach((p, k) => p.forEach((x, j) => expect(x).toBeCloseTo(b[i][k][j], 9))))
    }
    close((back[0].boundary as Polygon).coordinates, (model.partfields[0].boundary as Polygon).coordinates)
    const multi = back[1].boundary as MultiPolygon
    expect(multi.type).toBe('MultiPolygon')
    multi.coordinates.forEach((poly, i) => close(poly, (model.partfields[1].boundary as MultiPolygon).coordinates[i]))
  })

  it('writes the root, CTR, FRM and PFD attributes of the element tables', () => {
    // Root: VersionMajor 4, VersionMinor 3 (ISO 11783-10:2015 is version 4), DataTransferOrigin 1 = FMIS (from memory).
    expect(root).toMatchObject({ VersionMajor: '4', VersionMinor: '3', ManagementSoftwareManufacturer: 'Skyfurrow', DataTransferOrigin: '1' })
    // CTR: A CustomerId, B CustomerLastName; FRM: A FarmId, B FarmDesignator, C FarmStreet, I CustomerIdRef (from memory).
    expect(root.CTR[0]).toMatchObject({ A: 'CTR1', B: 'Hollis & Daughters' })
    expect(root.FRM[0]).toMatchObject({ A: 'FRM1', B: 'Hollis Creek Farms', C: '1 Creek Road', I: 'CTR1' })
    // PFD: D PartfieldArea in whole square metres (from memory).
    expect(root.PFD[0]).toMatchObject({ A: 'PFD1', C: 'North 40 <with pond>', D: '161874', E: 'CTR1', F: 'FRM1' })
    const pln = root.PFD[0].PLN[0]
    expect(pln.A).toBe('1')
    expect(pln.LSG.map((l: { A: string }) => l.A)).toEqual(['1', '2'])
    // The tree line goes with the partfield as an LSG of type 9 (obstacle).
    expect(root.PFD[0].LSG[0]).toMatchObject({ A: '9', B: 'Tree line 18 m' })
    expect(root.PFD[1].PLN).toHaveLength(2)
    // Special characters are escaped by the XML builder, not written raw.
    expect(xml).toContain('Hollis &amp; Daughters')
    expect(xml).toContain('North 40 &lt;with pond&gt;')
  })

  it('writes planned passes as TSK with TaskStatus 1 and a planned TIM', () => {
    // TSK: A TaskId, B TaskDesignator, C CustomerIdRef, D FarmIdRef, E PartfieldIdRef, G TaskStatus 1 = planned;
    // TIM: A Start, B Stop (xs:dateTime), C Duration (s), D Type 1 = planned (from memory).
    expect(root.TSK[0]).toMatchObject({ A: 'TSK1', B: 'Planting North 40', C: 'CTR1', D: 'FRM1', E: 'PFD1', G: '1' })
    expect(root.TSK[0].TIM[0]).toMatchObject({ A: '2026-12-04T14:00:00Z', B: '2026-12-04T20:30:00Z', C: String(6.5 * 3600), D: '1' })
  })
})

describe('broken task data', () => {
  const pfd = (inner: string, attrs = 'A="PFD1" C="Field" D="1"') =>
    `<ISO11783_TaskData VersionMajor="4" VersionMinor="3" DataTransferOrigin="1"><PFD ${attrs}>${inner}</PFD></ISO11783_TaskData>`
  const ring = (type: number, pts: Array<[number, number]>) => `<LSG A="${type}">${pts.map(([lat, lon]) => `<PNT A="2" C="${lat}" D="${lon}"/>`).join('')}</LSG>`
  const good = ring(1, [[41, -96], [41, -95.99], [41.01, -95.99]])

  it('names the element that is wrong', () => {
    expect(errorOf(() => readTaskDataBoundaries('<ISO11783_TaskData><PFD A="PFD1"'))).toMatch(/not well-formed XML \(line 1\)/)
    expect(errorOf(() => readTaskDataBoundaries('<TaskData/>'))).toContain('no ISO11783_TaskData root element')
    expect(errorOf(() => readTaskDataBoundaries('<ISO11783_TaskData VersionMajor="4"/>'))).toContain('holds no PFD (partfield) element')
    expect(errorOf(() => readTaskDataBoundaries(pfd(`<PLN A="1">${good}</PLN>`, 'A="Field1" C="North"')))).toBe(
      'PFD Field1 "North" has PartfieldId (A) "Field1"; it must be PFD followed by a number, e.g. PFD1.',
    )
    expect(errorOf(() => readTaskDataBoundaries(pfd(`<PLN A="1">${good}</PLN>`, 'A="PFD4"')))).toBe('PFD PFD4 has no PartfieldDesignator (C).')
    expect(errorOf(() => readTaskDataBoundaries(pfd(`<PLN A="6">${good}</PLN>`)))).toBe('PFD PFD1 "Field" has no PLN element of PolygonType 1 (partfield boundary).')
    expect(errorOf(() => readTaskDataBoundaries(pfd(`<PLN A="1">${ring(2, [[41, -96], [41, -95.99], [41.01, -95.99]])}</PLN>`)))).toBe(
      'PLN 1 in PFD PFD1 "Field" has no LSG of LineStringType 1 (polygon exterior).',
    )
    expect(errorOf(() => readTaskDataBoundaries(pfd(`<PLN A="1">${ring(1, [[41, -96], [41, -95.99]])}</PLN>`)))).toBe(
      'LSG 1 in PLN 1 in PFD PFD1 "Field" has 2 points; a polygon ring needs at least 3 PNT elements.',
    )
    expect(errorOf(() => readTaskDataBoundaries(pfd(`<PLN A="1">${ring(1, [[41, -96], [95, -95.99], [41.01, -95.99]])}</PLN>`)))).toBe(
      'PNT 2 in LSG 1 in PLN 1 in PFD PFD1 "Field" has PointNorth (C) "95", which is not a latitude in degrees.',
    )
    expect(errorOf(() => readTaskDataBoundaries(pfd(`<PLN A="1">${good}${ring(2, [[50, 10], [50, 10.1], [50.1, 10.1]])}</PLN>`)))).toBe(
      'PLN 1 in PFD PFD1 "Field" has an interior LSG (a hole) that lies outside every exterior ring.',
    )
    expect(errorOf(() => readTaskDataBoundaries(pfd(`<PLN A="1">${good.replace('LSG A="1"', 'LSG A="5"')}</PLN>`)))).toContain('has LineStringType (A) "5"')
    expect(errorOf(() => readTaskDataBoundaries(`<!DOCTYPE x [<!ENTITY a "b">]>${pfd('')}`))).toContain('declares XML entities')
  })

  it('reaches the upload as a 400 with the sentence', async () => {
    await expect(readBoundaryFile(Buffer.from(pfd(`<PLN A="6">${good}</PLN>`)))).rejects.toMatchObject({
      status: 400,
      message: 'PFD PFD1 "Field" has no PLN element of PolygonType 1 (partfield boundary).',
    })
  })
})
