// Elevation model readers and the CRS transform. References:
// - Transverse Mercator: IOGP Publication 373-7-2, Geomatics Guidance Note 7 part 2
//   (EPSG Guidance Note 7-2), "Transverse Mercator" (EPSG method 9807), its worked example
//   for OSGB 1936 / British National Grid: latitude 50 deg 30' 00" N, longitude 00 deg 30' 00" E
//   -> E 577 274.99 m, N 69 740.50 m, and back (figures checked against the note's example
//   as the EPSG dataset carries it for method 9807). The note's figures are rounded to the
//   centimetre; proj4 gives 577 274.984 m / 69 740.492 m, as does the Kruger series to n^6
//   (Karney 2011, below), so the check allows 1 cm.
// - The product's own UTM definitions (crsOfEpsg: EPSG 326nn, 327nn, 258nn) off the central
//   meridian: against the geodesy package (C. Veness, utm.js: C. F. F. Karney, "Transverse
//   Mercator with an accuracy of a few nanometers", J. Geodesy 85 (2011) 475-485, Kruger
//   series to order n^6), a second implementation independent of proj4.
// - GeoTIFFs are written in the test by the geotiff package's own writer (writeArrayBuffer).
import { LatLon } from 'geodesy/utm.js'
import proj4 from 'proj4'
import { describe, expect, it } from 'vitest'
import { localTerrainGrid, modelBounds } from '../../../server/terrain/grid.ts'
import { crsOfEpsg, readAsciiGrid, readElevationModel, TerrainFileError } from '../../../server/terrain/readers.ts'
import { gridHeightAt, localPlane, toPlane } from '../../../shared/precision/index.ts'
import { planeTiff, plainTiff } from '../../support/tiff.ts'

const WGS84 = '+proj=longlat +datum=WGS84 +no_defs'
const dms = (d: number, m: number, s: number) => d + m / 60 + s / 3600

describe('Transverse Mercator (proj4) against EPSG Guidance Note 7-2', () => {
  // OSGB 1936 / British National Grid (EPSG:27700): Airy 1830, natural origin 49 N 2 W,
  // k0 = 0.9996012717, false origin E 400 000 m, N -100 000 m (the note's parameters).
  const airy = '+proj=longlat +ellps=airy +no_defs'
  const bng = '+proj=tmerc +lat_0=49 +lon_0=-2 +k=0.9996012717 +x_0=400000 +y_0=-100000 +ellps=airy +units=m +no_defs'

  it('forward: 50 30 00 N, 00 30 00 E -> E 577 274.99 m, N 69 740.50 m', () => {
    const [e, n] = proj4(airy, bng, [dms(0, 30, 0), dms(50, 30, 0)])
    expect(Math.abs(e - 577274.99)).toBeLessThan(0.01)
    expect(Math.abs(n - 69740.5)).toBeLessThan(0.01)
  })

  it('reverse: E 577 274.99 m, N 69 740.50 m -> 50 30 00.000 N, 00 30 00.000 E', () => {
    const [lon, lat] = proj4(bng, airy, [577274.99, 69740.5])
    // The note gives the result to 0.001"; 0.001" of arc is 3 cm of latitude.
    expect(Math.abs(lat - dms(50, 30, 0)) * 3600).toBeLessThan(0.001)
    expect(Math.abs(lon - dms(0, 30, 0)) * 3600).toBeLessThan(0.001)
  })
})

describe("the reader's UTM definitions (crsOfEpsg) against the geodesy package", () => {
  // Points up to 3 deg off the central meridian (the edge of a zone), north and south.
  const cases: Array<{ code: number; lonDeg: number; latDeg: number; datum?: 'ETRS89' }> = [
    { code: 32632, lonDeg: 9, latDeg: 47.2 }, // on the central meridian
    { code: 32632, lonDeg: 11.95, latDeg: 47.3 }, // 2.95 deg east of it
    { code: 32632, lonDeg: 6.05, latDeg: 60.2 },
    { code: 32618, lonDeg: -77.4181, latDeg: 41.262 }, // the demo hollow's zone
    { code: 32719, lonDeg: -70.5, latDeg: -33.45 },
    { code: 32733, lonDeg: 17.9, latDeg: -29.9 },
    { code: 25833, lonDeg: 14.8, latDeg: 51.1, datum: 'ETRS89' }, // ETRS89: GRS 80 ellipsoid
  ]

  it.each(cases)('EPSG:$code at $latDeg, $lonDeg: forward within 1 mm, and back', ({ code, lonDeg, latDeg, datum }) => {
    const crs = crsOfEpsg(code)!
    const geographic = datum ? '+proj=longlat +ellps=GRS80 +no_defs' : WGS84
    const [e, n] = proj4(geographic, crs.crs, [lonDeg, latDeg])
    const ref = new LatLon(latDeg, lonDeg, 0, datum ? LatLon.datums.ETRS89 : LatLon.datums.WGS84).toUtm(code % 100)
    expect(ref.hemisphere).toBe(code >= 32701 && code <= 32760 ? 'S' : 'N')
    expect(Math.abs(e - ref.easting)).toBeLessThan(0.001)
    expect(Math.abs(n - ref.northing)).toBeLessThan(0.001)
    // The inverse (used for the model's bounds) returns the point to 1e-8 deg (about 1 mm).
    const [lon, lat] = proj4(crs.crs, geographic, [ref.easting, ref.northing])
    expect(Math.abs(lon - lonDeg)).toBeLessThan(1e-8)
    expect(Math.abs(lat - latDeg)).toBeLessThan(1e-8)
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
