// Elevation models from files: GeoTIFF (through the geotiff package) and ESRI ASCII grid
// (a small parser of its own), with the coordinate system read from the file (GeoTIFF
// geo keys; an ASCII grid's .prj text, or WGS-84 degrees without one) and handed to proj4.
// Heights are taken as metres; nodata cells become NaN. Errors are sentences for the user.
//
// Sources: GeoTIFF geo keys and raster types: OGC GeoTIFF Standard 1.1 (OGC 19-008r4),
// sections 7.4 (GTRasterTypeGeoKey: 1 PixelIsArea, 2 PixelIsPoint) and 7.5 (ProjectedCRSGeoKey,
// GeodeticCRSGeoKey). UTM zone n: central meridian 6n - 183 deg, scale 0.9996, false easting
// 500 km, false northing 10 000 km south of the equator (EPSG Guidance Note 7-2, "Transverse
// Mercator"; EPSG codes 326nn WGS 84 north, 327nn south, 258nn ETRS89). The ESRI ASCII grid
// header (ncols, nrows, xllcorner|xllcenter, yllcorner|yllcenter, cellsize, NODATA_value,
// rows from north to south) is as documented for ArcGIS "ESRI ASCII raster format".
import { fromArrayBuffer } from 'geotiff'
import proj4 from 'proj4'

/** An elevation model in its own coordinate system. */
export interface ElevationModel {
  format: 'geotiff' | 'ascii-grid'
  cols: number
  rows: number
  /** heights (m), row-major, row 0 north; NaN = no data */
  heightsM: Float32Array
  /** CRS coordinates of the centre of cell (0, 0) and the step per column / row (dy < 0 when rows run south) */
  x0: number
  y0: number
  dx: number
  dy: number
  /** proj4 definition (or WKT) of the coordinate system */
  crs: string
  /** what the user sees, e.g. 'EPSG:32632 (WGS 84 / UTM zone 32N)' */
  crsLabel: string
}

/** A file that cannot be read as an elevation model; the message is a sentence for the user. */
export class TerrainFileError extends Error {}

/** Size limit: 2049 x 2049 nodes (a 2000 x 2000 model and some). */
export const MAX_TERRAIN_CELLS = 2049 * 2049

const WGS84_GEO = '+proj=longlat +datum=WGS84 +no_defs'

/** proj4 definition of an EPSG code the product reads; null when not supported. */
export function crsOfEpsg(code: number): { crs: string; label: string } | null {
  if (code === 4326) return { crs: WGS84_GEO, label: 'EPSG:4326 (WGS 84, degrees)' }
  if (code === 4258) return { crs: '+proj=longlat +ellps=GRS80 +no_defs', label: 'EPSG:4258 (ETRS89, degrees)' }
  if (code >= 32601 && code <= 32660) return { crs: `+proj=utm +zone=${code - 32600} +datum=WGS84 +units=m +no_defs`, label: `EPSG:${code} (WGS 84 / UTM zone ${code - 32600}N)` }
  if (code >= 32701 && code <= 32760) return { crs: `+proj=utm +zone=${code - 32700} +south +datum=WGS84 +units=m +no_defs`, label: `EPSG:${code} (WGS 84 / UTM zone ${code - 32700}S)` }
  if (code >= 25828 && code <= 25838) return { crs: `+proj=utm +zone=${code - 25800} +ellps=GRS80 +units=m +no_defs`, label: `EPSG:${code} (ETRS89 / UTM zone ${code - 25800}N)` }
  return null
}

function checkSize(cols: number, rows: number): void {
  if (!(cols >= 2 && rows >= 2)) throw new TerrainFileError('The elevation model needs at least 2 x 2 cells.')
  if (cols * rows > MAX_TERRAIN_CELLS) {
    throw new TerrainFileError(`The elevation model has ${cols} x ${rows} cells; at most ${MAX_TERRAIN_CELLS.toLocaleString('en')} cells (about 2000 x 2000) are read. Cut it to the farm first.`)
  }
}

/** Reads the bytes as a GeoTIFF or an ESRI ASCII grid (told apart by the content). */
export async function readElevationModel(bytes: Uint8Array, options: { prjText?: string | null } = {}): Promise<ElevationModel> {
  if (bytes.length >= 4 && ((bytes[0] === 0x49 && bytes[1] === 0x49) || (bytes[0] === 0x4d && bytes[1] === 0x4d))) return readGeoTiff(bytes)
  const head = new TextDecoder().decode(bytes.subarray(0, 200)).trimStart().toLowerCase()
  if (head.startsWith('ncols') || head.startsWith('nrows')) return readAsciiGrid(new TextDecoder().decode(bytes), options.prjText ?? null)
  throw new TerrainFileError('The file is neither a TIFF (GeoTIFF) nor an ESRI ASCII grid.')
}

/** A GeoTIFF's first band as an elevation model. */
export async function readGeoTiff(bytes: Uint8Array): Promise<ElevationModel> {
  let image
  try {
    const buffer = bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer
    const tiff = await fromArrayBuffer(buffer)
    image = await tiff.getImage()
  } catch (e) {
    throw new TerrainFileError(`The file is not a readable TIFF (${(e as Error).message}).`)
  }
  const cols = image.getWidth()
  const rows = image.getHeight()
  let origin: number[]
  let resolution: number[]
  try {
    origin = image.getOrigin()
    resolution = image.getResolution()
  } catch {
    throw new TerrainFileError('The TIFF has no georeferencing (no tie point and pixel scale, nor a model transformation): it is not a GeoTIFF.')
  }
  const keys = image.getGeoKeys() ?? {}
  const projected = Number((keys as Record<string, unknown>).ProjectedCSTypeGeoKey ?? NaN)
  const geographic = Number((keys as Record<string, unknown>).GeographicTypeGeoKey ?? NaN)
  const modelType = Number((keys as Record<string, unknown>).GTModelTypeGeoKey ?? NaN)
  let crs: { crs: string; label: string } | null = null
  if (Number.isFinite(projected) && projected !== 32767) {
    crs = crsOfEpsg(projected)
    if (!crs) throw new TerrainFileError(`The GeoTIFF's coordinate system EPSG:${projected} is not read; use geographic WGS 84 / ETRS89 or UTM (WGS 84 or ETRS89).`)
  } else if (Number.isFinite(geographic) && geographic !== 32767 && modelType !== 1) {
    crs = crsOfEpsg(geographic)
    if (!crs) throw new TerrainFileError(`The GeoTIFF's coordinate system EPSG:${geographic} is not read; use geographic WGS 84 / ETRS89 or UTM (WGS 84 or ETRS89).`)
  } else {
    throw new TerrainFileError('The GeoTIFF names no coordinate system (EPSG code) in its geo keys.')
  }
  checkSize(cols, rows)
  const raster = (await image.readRasters({ samples: [0], interleave: true })) as unknown as ArrayLike<number>
  const nodata = image.getGDALNoData()
  const heightsM = new Float32Array(cols * rows)
  for (let i = 0; i < heightsM.length; i++) {
    const v = raster[i]
    heightsM[i] = (nodata !== null && v === nodata) || !Number.isFinite(v) ? NaN : v
  }
  // PixelIsPoint: the tie point is at the centre of the first cell; PixelIsArea (default): at its corner.
  const pixelIsPoint = Number((keys as Record<string, unknown>).GTRasterTypeGeoKey) === 2
  const [dx, dy] = [resolution[0], resolution[1]]
  return {
    format: 'geotiff',
    cols,
    rows,
    heightsM,
    x0: origin[0] + (pixelIsPoint ? 0 : dx / 2),
    y0: origin[1] + (pixelIsPoint ? 0 : dy / 2),
    dx,
    dy,
    ...crsToFields(crs),
  }
}

const crsToFields = (c: { crs: string; label: string }) => ({ crs: c.crs, crsLabel: c.label })

/** An ESRI ASCII grid; `prjText` the .prj beside it (WKT), or null for WGS-84 degrees. */
export function readAsciiGrid(text: string, prjText: string | null): ElevationModel {
  const lines = text.split(/\r?\n/)
  const header = new Map<string, number>()
  let li = 0
  for (; li < lines.length && header.size < 7; li++) {
    const line = lines[li].trim()
    if (line === '') continue
    const m = /^([A-Za-z_]+)\s+(\S+)$/.exec(line)
    if (!m) break
    const value = Number(m[2])
    if (!Number.isFinite(value)) throw new TerrainFileError(`ASCII grid line ${li + 1}: "${m[1]}" is not a number.`)
    header.set(m[1].toLowerCase(), value)
  }
  const need = (k: string) => {
    const v = header.get(k)
    if (v === undefined) throw new TerrainFileError(`The ASCII grid header has no "${k}".`)
    return v
  }
  const cols = need('ncols')
  const rows = need('nrows')
  if (!Number.isInteger(cols) || !Number.isInteger(rows)) throw new TerrainFileError('ncols and nrows of the ASCII grid must be whole numbers.')
  checkSize(cols, rows)
  const cell = header.get('cellsize')
  const dxh = header.get('dx') ?? cell
  const dyh = header.get('dy') ?? cell
  if (!(dxh! > 0) || !(dyh! > 0)) throw new TerrainFileError('The ASCII grid header needs a cellsize > 0.')
  const dx = dxh!
  const dy = dyh!
  const centre = header.has('xllcenter')
  const xll = centre ? need('xllcenter') : need('xllcorner')
  const yll = header.has('yllcenter') ? need('yllcenter') : need('yllcorner')
  const nodata = header.get('nodata_value')
  const heightsM = new Float32Array(cols * rows)
  let n = 0
  for (; li < lines.length; li++) {
    const line = lines[li]
    if (line.trim() === '') continue
    for (const tok of line.trim().split(/\s+/)) {
      const v = Number(tok)
      if (!Number.isFinite(v)) throw new TerrainFileError(`ASCII grid line ${li + 1}: "${tok.slice(0, 20)}" is not a number.`)
      if (n >= heightsM.length) throw new TerrainFileError(`The ASCII grid has more than ncols x nrows = ${cols * rows} values.`)
      heightsM[n++] = nodata !== undefined && v === nodata ? NaN : v
    }
  }
  if (n !== heightsM.length) throw new TerrainFileError(`The ASCII grid has ${n} values; ncols x nrows = ${cols * rows}.`)
  let crs: { crs: string; label: string } = { crs: WGS84_GEO, label: 'EPSG:4326 (WGS 84, degrees; no .prj)' }
  if (prjText && prjText.trim() !== '') {
    try {
      proj4(prjText.trim(), WGS84_GEO)
    } catch (e) {
      throw new TerrainFileError(`The .prj text is not a coordinate system proj4 can read (${(e as Error).message}).`)
    }
    const name = /^\s*\w+\[\s*"([^"]+)"/.exec(prjText)?.[1]
    crs = { crs: prjText.trim(), label: name ? `${name} (from the .prj)` : 'from the .prj' }
  }
  // Row 0 is the northern row: its centre is half a cell below the top edge.
  const x0 = centre ? xll : xll + dx / 2
  const yBottomCentre = centre ? yll : yll + dy / 2
  return { format: 'ascii-grid', cols, rows, heightsM, x0, y0: yBottomCentre + (rows - 1) * dy, dx, dy: -dy, ...crsToFields(crs) }
}
