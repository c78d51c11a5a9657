// Elevation model readers and the CRS transform. References:
// - UTM: EPSG Guidance Note 7-2 (IOGP 373-7-2), Transverse Mercator: on the central
//   meridian the easting is the false easting (500 000 m) and the northing is k0 * M(phi),
//   M the meridian arc of the ellipsoid, by the series of that note (terms to e^6), k0 = 0.9996.
// - GeoTIFFs are written in the test by the geotiff package's own writer (writeArrayBuffer).
import proj4 from 'proj4'
import { describe, expect, it } from 'vitest'
import { localTerrainGrid, modelBounds } from '../../../server/terrain/grid.ts'
import { crsOfEpsg, readAsciiGrid, readElevationModel, TerrainFileError } from '../../../server/terrain/readers.ts'
import { gridHeightAt, localPlane, toPlane } from '../../../shared/precision/index.ts'
import { planeTiff, plainTiff } from '../../support/tiff.ts'

const WGS84 = '+proj=longlat +datum=WGS84 +no_defs'

/** Meridian arc (m) from the equator to latitude phi (rad), EPSG GN 7-2 series. */
function meridianArcM(phi: number, a = 6378137, f = 1 / 298.257223563): number {
  const e2 = f * (2 - f)
  const e4 = e2 * e2
  const e6 = e4 * e2
  return a * ((1 - e2 / 4 - (3 * e4) / 64 - (5 * e6) / 256) * phi - ((3 * e2) / 8 + (3 * e4) / 32 + (45 * e6) / 1024) * Math.sin(2 * phi) + ((15 * e4) / 256 + (45 * e6) / 1024) * Math.sin(4 * phi) - ((35 * e6) / 3072) * Math.sin(6 * phi))
}

describe('CRS transform (proj4) against EPSG Guidance Note 7-2', () => {
  it('UTM zone 32N on its central meridian (9 deg E): E = 500 000 m, N = 0.9996 M(phi)', () => {
    const utm = crsOfEpsg(32632)!
    for (const lat of [0, 30, 47.2, 60]) {
      const [e, n] = proj4(WGS84, utm.crs, [9, lat])
      expect(e).toBeCloseTo(500000, 3)
      expect(Math.abs(n - 0.9996 * meridianArcM((lat * Math.PI) / 180))).toBeLessThan(0.01)
    }
  })

  it('UTM south zones add the false northing of 10 000 000 m', () => {
    const [e, n] = proj4(WGS84, crsOfEpsg(32733)!.crs, [15, -30])
    expect(e).toBeCloseTo(500000, 3)
    expect(Math.abs(n - (10_000_000 - 0.9996 * meridianArcM((30 * Math.PI) / 180)))).toBeLessThan(0.01)
  })

  it('names an unsupported code', () => {
    expect(crsOfEpsg(2056)).toBeNull()
  })
})

describe('GeoTIFF (written by geotiff.writeArrayBuffer)', () => {
  it('reads size, cell centres, heights, nodata and the CRS', async () => {
    const t = planeTiff()
    const m = await readElevationModel(t.bytes)
    expect(m.format).toBe('geotiff')
    expect([m.cols, m.rows]).toEqual([t.width, t.height])
    expect(m.crsLabel).toContain('EPSG:32632')
    // PixelIsArea: the tie point is the corner of the first cell; its centre is half a cell in.
    expect(m.x0).toBeCloseTo(t.left + t.cell / 2, 6)
    expect(m.y0).toBeCloseTo(t.top - t.cell / 2, 6)
    expect(Number.isNaN(m.heightsM[3])).toBe(true)
    expect(m.heightsM[10]).toBeCloseTo(400 + 0.01 * (t.left + 10.5 * t.cell - t.E0) - 0.02 * (t.top - 0.5 * t.cell - t.N0), 2)
    const b = modelBounds(m)
    expect(b.minLonDeg).toBeLessThan(9.4)
    expect(b.maxLonDeg).toBeGreaterThan(9.4)
  })

  it('resampled to the engine grid, the plane is read back at a point from its UTM coordinates', async () => {
    const t = planeTiff()
    const m = await readElevationModel(t.bytes)
    const box = { minLonDeg: 9.399, maxLonDeg: 9.401, minLatDeg: 47.199, maxLatDeg: 47.201 }
    const grid = localTerrainGrid(m, box, 300)
    const plane = localPlane(grid.originLatDeg, grid.originLonDeg)
    for (const [lon, lat] of [[9.4, 47.2], [9.402, 47.199], [9.398, 47.2015]]) {
      const [x, y] = toPlane(plane, lon, lat)
      const h = gridHeightAt(grid, (x - grid.x0M) / grid.cellM, (grid.y0M - y) / grid.cellM)
      const [e, n] = proj4(WGS84, crsOfEpsg(32632)!.crs, [lon, lat])
      // A plane is exact under bilinear reading; the local plane's own scale error over a
      // few hundred metres stays under 0.05 m of height here.
      expect(Math.abs(h - (400 + 0.01 * (e - t.E0) - 0.02 * (n - t.N0)))).toBeLessThan(0.05)
    }
  })

  it('a TIFF without georeferencing and a file that is not a TIFF are refused with a sentence', async () => {
    // geotiff's writer always adds geo keys: the plain TIFF is built by hand (tests/support/tiff.ts).
    await expect(readElevationModel(plainTiff())).rejects.toThrow(/no georeferencing/)
    await expect(readElevationModel(new TextEncoder().encode('hello, this is no elevation model'))).rejects.toThrow(TerrainFileError)
  })
})

describe('ESRI ASCII grid', () => {
  const text = ['ncols 3', 'nrows 2', 'xllcorner 9.0', 'yllcorner 47.0', 'cellsize 0.001', 'NODATA_value -9999', '1 2 3', '4 -9999 6', ''].join('\n')

  it('reads WGS-84 degrees without a .prj, rows from the north, nodata as missing', () => {
    const m = readAsciiGrid(text, null)
    expect(m.crsLabel).toContain('EPSG:4326')
    expect(m.x0).toBeCloseTo(9.0005, 9)
    expect(m.y0).toBeCloseTo(47.0015, 9) // centre of the northern row
    expect(m.dy).toBeCloseTo(-0.001, 12)
    expect(Array.from(m.heightsM.slice(0, 3))).toEqual([1, 2, 3])
    expect(Number.isNaN(m.heightsM[4])).toBe(true)
  })

  it('reads a .prj (WKT) through proj4', () => {
    const wkt = 'PROJCS["WGS 84 / UTM zone 32N",GEOGCS["WGS 84",DATUM["WGS_1984",SPHEROID["WGS 84",6378137,298.257223563]],PRIMEM["Greenwich",0],UNIT["degree",0.0174532925199433]],PROJECTION["Transverse_Mercator"],PARAMETER["latitude_of_origin",0],PARAMETER["central_meridian",9],PARAMETER["scale_factor",0.9996],PARAMETER["false_easting",500000],PARAMETER["false_northing",0],UNIT["metre",1]]'
    const m = readAsciiGrid(text.replace('xllcorner 9.0', 'xllcorner 500000').replace('yllcorner 47.0', 'yllcorner 5228000').replace('cellsize 0.001', 'cellsize 25'), wkt)
    const [lon] = proj4(m.crs, WGS84, [500000, 5228000])
    expect(lon).toBeCloseTo(9, 6)
    expect(m.crsLabel).toContain('UTM zone 32N')
  })

  it('names what is wrong', () => {
    expect(() => readAsciiGrid(text.replace('4 -9999 6', '4 -9999'), null)).toThrow(/5 values; ncols x nrows = 6/)
    expect(() => readAsciiGrid(text.replace('cellsize 0.001\n', ''), null)).toThrow(/cellsize/)
    expect(() => readAsciiGrid(text.replace('ncols 3', 'ncols 3000').replace('nrows 2', 'nrows 3000'), null)).toThrow(/at most/)
  })
})
