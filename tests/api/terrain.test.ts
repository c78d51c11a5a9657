// Elevation models of a farm: upload (GeoTIFF written by the geotiff package, ESRI ASCII
// grid), the refusals (not a TIFF, a TIFF without georeferencing, a model that misses the
// farm, too many cells, a file over the upload limit) with nothing stored, the terrain
// horizon of a point, removal, and who may do what.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { clearListeners, on } from '../../server/events.ts'
import { MB } from '../../server/imports/upload.ts'
import { Client, demo, signIn, startTestServer, type TestServer } from '../support/server.ts'
import { planeTiff, plainTiff } from '../support/tiff.ts'

let server: TestServer
let crew: Client
let north: Client
let farmId: number
let centre: [number, number]
let fieldIds: number[]
const changed: number[] = []

beforeAll(async () => {
  server = await startTestServer()
  crew = await signIn(server.app, demo.contractor)
  north = await signIn(server.app, demo.clientNorth)
  farmId = (await north.get('/api/auth/me')).body.farmIds[0]
  const fields = (await crew.get(`/api/farms/${farmId}/fields`)).body as Array<{ id: number; boundary: { type: string; coordinates: number[][][] } }>
  fieldIds = fields.map((f) => f.id)
  const ring = fields[0].boundary.type === 'Polygon' ? fields[0].boundary.coordinates[0] : (fields[0].boundary.coordinates as unknown as number[][][][])[0][0]
  centre = [ring.reduce((a, p) => a + p[0], 0) / ring.length, ring.reduce((a, p) => a + p[1], 0) / ring.length]
  on('terrain.changed', (p) => void changed.push(p.farmId))
})
afterAll(async () => {
  clearListeners()
  await crew?.call('delete', `/api/farms/${farmId}/terrain`)
  await server?.close()
})

const upload = (client: Client, bytes: Uint8Array, name: string, prj?: string) => {
  const req = client.call('post', `/api/farms/${farmId}/terrain`).attach('file', Buffer.from(bytes), name)
  return prj === undefined ? req : req.field('prj', prj)
}

describe('elevation model upload', () => {
  it('refuses a file that is not a TIFF, a TIFF without georeferencing, and a model that misses the farm; nothing is stored', async () => {
    const notTiff = await upload(crew, new TextEncoder().encode('just some words'), 'notes.tif')
    expect(notTiff.status).toBe(400)
    expect(notTiff.body.error.message).toMatch(/neither a TIFF .* nor an ESRI ASCII grid/)

    const plain = await upload(crew, plainTiff(), 'scan.tif')
    expect(plain.status).toBe(400)
    expect(plain.body.error.message).toMatch(/no georeferencing/)

    const far = await upload(crew, planeTiff(centre[0] + 1.5, centre[1]).bytes, 'elsewhere.tif')
    expect(far.status).toBe(400)
    expect(far.body.error.message).toMatch(/misses every field of the farm/)

    const big = await upload(crew, new TextEncoder().encode('ncols 3000\nnrows 3000\nxllcorner 0\nyllcorner 0\ncellsize 1\n1 2 3\n'), 'big.asc')
    expect(big.status).toBe(400)
    expect(big.body.error.message).toMatch(/at most/)

    expect((await crew.get(`/api/farms/${farmId}/terrain`)).body.model).toBeNull()
    expect(changed).not.toContain(farmId)
  })

  it('refuses a file over the upload limit with 413 naming the limit; a file of the limit itself is read; nothing is stored', async () => {
    // The limit is TERRAIN_FILE_MAX_MB (64 MB by default, tests/unit/server/config.test.ts);
    // the same route on an app configured with 1 MB keeps the bodies small.
    expect(server.config.terrainFileMaxBytes).toBeGreaterThanOrEqual(MB)
    const small = await signIn(server.appWith({ terrainFileMaxBytes: MB }), demo.contractor)
    const over = await upload(small, Buffer.alloc(MB + 1, 0x20), 'huge.asc')
    expect(over.status).toBe(413)
    expect(over.body.error.message).toBe('The elevation model file is larger than 1 MB.')
    expect(over.body.error.fields.file).toBe('At most 1 MB.')
    // Exactly at the limit the file is read (and refused here for what it holds, not its size).
    const at = await upload(small, Buffer.alloc(MB, 0x20), 'blank.asc')
    expect(at.status).toBe(400)
    expect(at.body.error.message).toMatch(/neither a TIFF .* nor an ESRI ASCII grid/)
    expect((await crew.get(`/api/farms/${farmId}/terrain`)).body.model).toBeNull()
    expect(changed).not.toContain(farmId)
  })

  it('stores a GeoTIFF covering the farm, lists the fields it covers and queues their recompute', async () => {
    const res = await upload(crew, planeTiff(centre[0], centre[1]).bytes, 'valley.tif')
    expect(res.status).toBe(201)
    expect(res.body).toMatchObject({ farmId, format: 'geotiff', cols: 60, rows: 50 })
    expect(res.body.crsLabel).toMatch(/UTM zone/)
    expect(res.body.fieldsCovered.map((f: { id: number }) => f.id)).toContain(fieldIds[0])
    expect(res.body.nodataShare).toBeCloseTo(1 / 3000, 6)
    expect(changed).toContain(farmId)
    const again = await north.get(`/api/farms/${farmId}/terrain`)
    expect(again.status).toBe(200)
    expect(again.body.model.fileName).toBe('valley.tif')
  })

  it('gives the terrain horizon of a point on the model: 360 bins, the plane rising to one side', async () => {
    const res = await north.get(`/api/farms/${farmId}/terrain/horizon?latDeg=${centre[1]}&lonDeg=${centre[0]}&antennaHeightM=0`)
    expect(res.status).toBe(200)
    expect(res.body.horizonDeg).toHaveLength(360)
    // The test plane rises 2 m per 100 m to the south and 1 m per 100 m to the east (UTM grid):
    // from its surface the steepest rise is atan(0.0224) = 1.28 deg, less the curvature drop.
    const max = Math.max(...(res.body.horizonDeg as number[]))
    expect(max).toBeGreaterThan(1.0)
    expect(max).toBeLessThan(1.3)
    const off = await north.get(`/api/farms/${farmId}/terrain/horizon?latDeg=${centre[1] + 1}&lonDeg=${centre[0]}`)
    expect(off.body.horizonDeg).toBeNull()
    const bad = await north.get(`/api/farms/${farmId}/terrain/horizon?latDeg=95&lonDeg=0`)
    expect(bad.status).toBe(400)
  })

  it('replaces the model with an ESRI ASCII grid (WGS-84 degrees without a .prj), then removes it', async () => {
    const cols = 40
    const rows = 40
    const cell = 0.0005
    const lines = [`ncols ${cols}`, `nrows ${rows}`, `xllcorner ${centre[0] - (cols / 2) * cell}`, `yllcorner ${centre[1] - (rows / 2) * cell}`, `cellsize ${cell}`, 'NODATA_value -9999']
    for (let j = 0; j < rows; j++) lines.push(Array.from({ length: cols }, (_, i) => (300 + i).toFixed(1)).join(' '))
    const res = await upload(crew, new TextEncoder().encode(lines.join('\n')), 'hills.asc')
    expect(res.status).toBe(201)
    expect(res.body).toMatchObject({ format: 'ascii-grid', cols, rows, minHeightM: 300, maxHeightM: 339 })
    expect(res.body.crsLabel).toMatch(/EPSG:4326/)
    expect((await crew.get(`/api/farms/${farmId}/terrain`)).body.model.fileName).toBe('hills.asc')
    expect((await north.call('delete', `/api/farms/${farmId}/terrain`)).status).toBe(403)
    expect((await crew.call('delete', `/api/farms/${farmId}/terrain`)).status).toBe(204)
    expect((await crew.get(`/api/farms/${farmId}/terrain`)).body.model).toBeNull()
  })

  it('lets a client read but not upload', async () => {
    const res = await upload(north, planeTiff(centre[0], centre[1]).bytes, 'valley.tif')
    expect(res.status).toBe(403)
  })
})
