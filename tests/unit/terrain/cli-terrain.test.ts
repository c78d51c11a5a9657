/**
 * `--terrain FILE` of the forecast command line: an ESRI ASCII grid without a .prj is read
 * as WGS-84 degrees; point mode JSON carries terrainHorizon; bad files exit with status 2.
 * The expected angle is the closed form atan((H - h0 - (1 - k) d^2/2R) / d) (terrain.ts header),
 * d the distance to the plateau edge, within one grid cell of the resampled model; k is the
 * engine's default, 0.13, unless --refraction says otherwise.
 */
import { spawnSync } from 'node:child_process'
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { afterAll, describe, expect, it } from 'vitest'
import { EARTH_MEAN_RADIUS_M, localPlane, TERRAIN_REFRACTION_K, toPlane } from '../../../shared/precision/index.ts'

const root = fileURLToPath(new URL('../../../', import.meta.url))
const dir = mkdtempSync(join(tmpdir(), 'skyfurrow-terrain-'))
afterAll(() => rmSync(dir, { recursive: true, force: true }))

function forecast(args: string[]) {
  const r = spawnSync(process.execPath, ['--import', 'tsx', 'server/cli/forecast.ts', ...args], { cwd: root, encoding: 'utf8' })
  return { status: r.status, stdout: r.stdout, stderr: r.stderr }
}

const LAT = 47.2
const LON = 9.4
const CELL = 0.0005
const EDGE_LON = LON + 0.0135
// Flat ground at 500 m; from EDGE_LON eastwards a plateau at 900 m (a straight N-S wall).
const cols = 120
const rows = 120
const xll = LON - 60 * CELL
const yll = LAT - 60 * CELL
const lines = [`ncols ${cols}`, `nrows ${rows}`, `xllcorner ${xll}`, `yllcorner ${yll}`, `cellsize ${CELL}`, 'NODATA_value -9999']
for (let j = 0; j < rows; j++) {
  lines.push(Array.from({ length: cols }, (_, i) => (xll + (i + 0.5) * CELL >= EDGE_LON ? '900' : '500')).join(' '))
}
const gridFile = join(dir, 'valley.asc')
writeFileSync(gridFile, lines.join('\n'))
const POINT = ['--orbits', 'nominal:all', '--lat', String(LAT), '--lon', String(LON), '--start', '2026-12-07T06:00:00Z', '--hours', '1', '--step', '15', '--antenna-height', '3']

describe('forecast CLI --terrain', () => {
  it('prints the terrain horizon of the point and uses it for the epochs', () => {
    const withTerrain = forecast([...POINT, '--terrain', gridFile])
    expect(withTerrain.status).toBe(0)
    const out = JSON.parse(withTerrain.stdout)
    expect(out.terrainHorizon).toHaveLength(360)
    expect(out.terrainHorizon[90]).toMatchObject({ azimuthDeg: 90 })
    // The first node at 900 m is the first cell centre east of EDGE_LON; the resampled grid
    // and the ray steps place the edge within one cell (about 34 m) either side of it.
    const plane = localPlane(LAT, LON)
    const firstFullLon = xll + (Math.ceil((EDGE_LON - xll) / CELL - 0.5) + 0.5) * CELL
    const [d] = toPlane(plane, firstFullLon, LAT)
    const cellM = CELL * plane.mPerDegLon
    const angle = (dM: number) => (Math.atan((400 - 3 - ((1 - TERRAIN_REFRACTION_K) * dM * dM) / (2 * EARTH_MEAN_RADIUS_M)) / dM) * 180) / Math.PI
    expect(out.terrainHorizon[90].elevationDeg).toBeGreaterThan(angle(d + cellM))
    expect(out.terrainHorizon[90].elevationDeg).toBeLessThan(angle(d - cellM))
    expect(out.terrainHorizon[270].elevationDeg).toBe(0)
    const plain = JSON.parse(forecast(POINT).stdout)
    for (let e = 0; e < plain.epochs.length; e++) expect(out.epochs[e].satellites).toBeLessThanOrEqual(plain.epochs[e].satellites)
    expect(out.epochs.some((ep: { satellites: number }, e: number) => ep.satellites < plain.epochs[e].satellites)).toBe(true)
  })

  it('exits with status 2 and a sentence on a file that is no elevation model', () => {
    const bad = join(dir, 'notes.asc')
    writeFileSync(bad, 'nothing to see here')
    const r = forecast([...POINT, '--terrain', bad])
    expect(r.status).toBe(2)
    expect(r.stderr).toMatch(/--terrain .*neither a TIFF/)
    const missing = forecast([...POINT, '--terrain', join(dir, 'none.tif')])
    expect(missing.status).toBe(2)
    expect(missing.stderr).toMatch(/cannot read/)
  })
})
