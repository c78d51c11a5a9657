// Boundary files as uploaded, read into one GeoJSON FeatureCollection in WGS-84
// longitude/latitude. The format is told from the content, never from the file name:
// a zip (KMZ: a .kml inside; zipped ESRI Shapefile: .shp + .dbf + .prj; a zipped
// GeoJSON; or ISO 11783-10 task data, TASKDATA.XML), GeoJSON text (FeatureCollection,
// Feature or a bare geometry), KML text, or TASKDATA.XML text (isoxml.ts).
//
// Shapefiles: ESRI Shapefile Technical Description (ESRI white paper, July 1998) read by
// the `shapefile` package; the .prj WKT is handed to proj4 and coordinates are
// reprojected to WGS-84 (EPSG:4326). A .prj proj4 cannot read is refused with its name.
import { DOMParser } from '@xmldom/xmldom'
import { kml as kmlToGeoJson } from '@tmcw/togeojson'
import type { Feature, FeatureCollection, Geometry, Position } from 'geojson'
import proj4 from 'proj4'
import * as shapefile from 'shapefile'
import type { BoundaryFileFormat } from '../../shared/schemas/fields.ts'
import { badRequest } from '../http/errors.ts'
import { looksLikeTaskData, readTaskDataBoundaries } from './isoxml.ts'
import { expandEntries, inspectZip, isZip, type ZipEntryInfo, type ZipLimits, DEFAULT_ZIP_LIMITS } from './zip.ts'

export interface BoundaryFile {
  format: BoundaryFileFormat
  /** The coordinate system the file was reprojected from; null when it was WGS-84 already. */
  sourceCrs: string | null
  collection: FeatureCollection<Geometry | null>
}

const refuse = (message: string) => badRequest(message, { file: message })

const KINDS = 'GeoJSON, KML, KMZ, ISO 11783-10 task data (TASKDATA.XML, or a .zip holding it) or a zipped ESRI Shapefile (.shp, .dbf and .prj in one .zip)'

/** Reads an uploaded boundary file; 400 naming the problem when it cannot be read. */
export async function readBoundaryFile(buf: Buffer, limits: ZipLimits = DEFAULT_ZIP_LIMITS): Promise<BoundaryFile> {
  if (buf.length === 0 || (buf.length < 4096 && buf.toString('utf8').trim() === '')) throw refuse('The file is empty.')
  if (isZip(buf)) return readZip(buf, limits)
  if (buf.length >= 4 && buf.readUInt32BE(0) === 9994) {
    throw refuse('This is a bare .shp file. Put the .shp, .dbf and .prj files of the shapefile into one .zip and upload that.')
  }
  const text = decodeText(buf)
  const t = text.replace(/^\uFEFF/, '').trimStart()
  if (t.startsWith('{') || t.startsWith('[')) return { format: 'geojson', ...readGeoJson(t) }
  if (t.startsWith('<')) {
    if (looksLikeTaskData(t)) return { format: 'isoxml', sourceCrs: null, collection: readTaskData(t) }
    if (!/<kml[\s>]/i.test(t.slice(0, 4096))) throw refuse(`This XML file is not KML. Upload ${KINDS}.`)
    return { format: 'kml', sourceCrs: null, collection: readKml(t) }
  }
  throw refuse(`The file type was not recognised. Upload ${KINDS}.`)
}

function decodeText(buf: Buffer): string {
  const sample = buf.subarray(0, 8192)
  if (sample.includes(0)) throw refuse(`The file is not a text or zip file. Upload ${KINDS}.`)
  try {
    return new TextDecoder('utf-8', { fatal: true }).decode(buf)
  } catch {
    return buf.toString('latin1')
  }
}

// ---- GeoJSON ---------------------------------------------------------------------------

const WGS84_NAMES = /^(urn:ogc:def:crs:OGC:1\.3:CRS84|urn:ogc:def:crs:OGC::CRS84|EPSG:4326|urn:ogc:def:crs:EPSG::4326|WGS ?84|CRS84)$/i

function readGeoJson(text: string): { sourceCrs: null; collection: FeatureCollection<Geometry | null> } {
  let data: unknown
  try {
    data = JSON.parse(text)
  } catch (error) {
    throw refuse(`The file is not valid JSON: ${error instanceof Error ? error.message : String(error)}.`)
  }
  const obj = data as { type?: unknown; crs?: { properties?: { name?: unknown } } }
  if (!obj || typeof obj !== 'object' || Array.isArray(obj) || typeof obj.type !== 'string') {
    throw refuse('The JSON file is not GeoJSON (no "type" member). Upload a FeatureCollection, a Feature or a Polygon.')
  }
  const crsName = obj.crs?.properties?.name
  if (typeof crsName === 'string' && !WGS84_NAMES.test(crsName.trim())) {
    throw refuse(`The GeoJSON names the coordinate system "${crsName}"; only WGS-84 longitude/latitude is accepted (GeoJSON, RFC 7946).`)
  }
  let collection: FeatureCollection<Geometry | null>
  if (obj.type === 'FeatureCollection') {
    const features = (data as { features?: unknown }).features
    if (!Array.isArray(features)) throw refuse('The GeoJSON FeatureCollection has no "features" array.')
    collection = { type: 'FeatureCollection', features: features as Feature<Geometry | null>[] }
  } else if (obj.type === 'Feature') {
    collection = { type: 'FeatureCollection', features: [data as Feature<Geometry | null>] }
  } else if (['Polygon', 'MultiPolygon', 'GeometryCollection', 'Point', 'MultiPoint', 'LineString', 'MultiLineString'].includes(obj.type)) {
    collection = { type: 'FeatureCollection', features: [{ type: 'Feature', properties: {}, geometry: data as Geometry }] }
  } else {
    throw refuse(`The JSON file is not GeoJSON ("type": "${String(obj.type).slice(0, 40)}").`)
  }
  assertLonLat(collection, 'The GeoJSON')
  return { sourceCrs: null, collection }
}

// ---- KML / KMZ -------------------------------------------------------------------------

function readKml(text: string): FeatureCollection<Geometry | null> {
  if (/<!ENTITY/i.test(text)) throw refuse('The KML file declares XML entities, which are not accepted.')
  let doc
  try {
    doc = new DOMParser({
      onError: (level, message) => {
        if (level !== 'warning') throw new Error(message)
      },
    }).parseFromString(text, 'text/xml')
  } catch (error) {
    const raw = error instanceof Error ? error.message.split('\n')[0] : String(error)
    const msg = (/^Reporting \w+ "(.*)" caused/.exec(raw)?.[1] ?? raw).replace(/\.$/, '')
    throw refuse(`The KML file is not well-formed XML: ${msg}.`)
  }
  if (!doc.documentElement || doc.documentElement.localName?.toLowerCase() !== 'kml') throw refuse('The XML file is not KML (no <kml> root element).')
  const collection = kmlToGeoJson(doc)
  assertLonLat(collection, 'The KML')
  return collection
}

// ---- ISO 11783-10 task data -------------------------------------------------------------

/** Each partfield (PFD) with a boundary becomes one feature named by its designator. */
function readTaskData(text: string): FeatureCollection<Geometry | null> {
  const features: Feature<Geometry | null>[] = readTaskDataBoundaries(text).map((p) => ({
    type: 'Feature',
    properties: { name: p.designator, partfield: p.id, farm: p.farm, customer: p.customer },
    geometry: p.boundary,
  }))
  return { type: 'FeatureCollection', features }
}

// ---- zip: KMZ, zipped shapefile, zipped GeoJSON, zipped task data -----------------------

const base = (name: string) => name.replace(/\\/g, '/').split('/').pop()!
const ext = (name: string) => (/\.([^./]+)$/.exec(name)?.[1] ?? '').toLowerCase()
const stem = (name: string) => name.replace(/\.[^./]+$/, '')
const ignoredEntry = (e: ZipEntryInfo) => e.isDirectory || e.name.startsWith('__MACOSX/') || base(e.name).startsWith('._')

async function readZip(buf: Buffer, limits: ZipLimits): Promise<BoundaryFile> {
  const entries = inspectZip(buf, limits).filter((e) => !ignoredEntry(e))
  if (entries.length === 0) throw refuse('The zip file is empty.')
  const byExt = (x: string) => entries.filter((e) => ext(e.name) === x).sort((a, b) => a.name.split('/').length - b.name.split('/').length)
  const kmls = byExt('kml')
  const shps = byExt('shp')
  const jsons = [...byExt('geojson'), ...byExt('json')]
  const taskData = entries.find((e) => base(e.name).toUpperCase() === 'TASKDATA.XML')
  if (taskData) {
    const files = await expandEntries(buf, entries, [taskData.name], limits)
    return { format: 'isoxml', sourceCrs: null, collection: readTaskData(decodeText(files.get(taskData.name)!).replace(/^\uFEFF/, '')) }
  }
  if (kmls.length) {
    const chosen = kmls.find((e) => base(e.name).toLowerCase() === 'doc.kml') ?? kmls[0]
    const files = await expandEntries(buf, entries, [chosen.name], limits)
    return { format: 'kmz', sourceCrs: null, collection: readKml(decodeText(files.get(chosen.name)!)) }
  }
  if (shps.length) return readZippedShapefiles(buf, entries, shps, limits)
  if (jsons.length) {
    const files = await expandEntries(buf, entries, [jsons[0].name], limits)
    return { format: 'geojson', ...readGeoJson(decodeText(files.get(jsons[0].name)!).replace(/^\uFEFF/, '')) }
  }
  const names = entries.slice(0, 6).map((e) => base(e.name)).join(', ')
  throw refuse(`The zip file holds no .shp, .kml, .geojson or TASKDATA.XML file (it holds ${names}${entries.length > 6 ? ', ...' : ''}).`)
}

async function readZippedShapefiles(buf: Buffer, entries: ZipEntryInfo[], shps: ZipEntryInfo[], limits: ZipLimits): Promise<BoundaryFile> {
  const sibling = (shp: ZipEntryInfo, x: string) => entries.find((e) => stem(e.name).toLowerCase() === stem(shp.name).toLowerCase() && ext(e.name) === x)
  const wanted: string[] = []
  for (const shp of shps) {
    wanted.push(shp.name)
    for (const x of ['dbf', 'prj', 'cpg']) {
      const s = sibling(shp, x)
      if (s) wanted.push(s.name)
    }
  }
  const files = await expandEntries(buf, entries, wanted, limits)
  const features: Feature<Geometry | null>[] = []
  const crsNames: string[] = []
  for (const shp of shps) {
    const layer = base(stem(shp.name))
    const dbf = sibling(shp, 'dbf')
    const prj = sibling(shp, 'prj')
    const cpg = sibling(shp, 'cpg')
    const encoding = cpg && /utf-?8/i.test(files.get(cpg.name)!.toString('latin1')) ? 'utf-8' : 'windows-1252'
    let collection: FeatureCollection
    try {
      const shpBytes = new Uint8Array(files.get(shp.name)!)
      collection = dbf
        ? await shapefile.read(shpBytes, new Uint8Array(files.get(dbf.name)!), { encoding })
        : await shapefile.read(shpBytes)
    } catch (error) {
      throw refuse(`The shapefile "${base(shp.name)}" cannot be read: ${error instanceof Error ? error.message : String(error)}.`)
    }
    const projected = prj ? files.get(prj.name)!.toString('latin1').trim() : ''
    const crs = reprojectLayer(collection, projected, base(shp.name))
    if (crs) crsNames.push(crs)
    for (const f of collection.features) features.push({ ...f, properties: { ...(f.properties ?? {}), ...(shps.length > 1 ? { layer } : {}) } })
  }
  const result: FeatureCollection<Geometry | null> = { type: 'FeatureCollection', features }
  assertLonLat(result, 'The shapefile')
  return { format: 'shapefile', sourceCrs: crsNames.length ? [...new Set(crsNames)].join(', ') : null, collection: result }
}

/** Name of a WKT coordinate system (PROJCS["NAD_1983_UTM_Zone_15N", ...] -> NAD_1983_UTM_Zone_15N). */
const wktName = (wkt: string) => /^\s*(?:PROJCS|GEOGCS|PROJCRS|GEOGCRS|GEODCRS)\s*\[\s*"([^"]*)"/i.exec(wkt)?.[1] ?? wkt.slice(0, 60)

/**
 * Reprojects a shapefile layer in place from its .prj WKT to WGS-84 longitude/latitude.
 * Returns the source system's name, or null when it is already geographic WGS-84.
 */
function reprojectLayer(collection: FeatureCollection, wkt: string, fileName: string): string | null {
  if (!wkt) {
    if (layerLooksLonLat(collection)) return null
    throw refuse(`The shapefile "${fileName}" has no .prj file and its coordinates are not longitude/latitude. Add its .prj file to the zip.`)
  }
  const name = wktName(wkt)
  if (/^\s*GEOGCS\s*\[/i.test(wkt) && /WGS[ _]?(19)?84/i.test(wkt) && !/PROJCS/i.test(wkt)) return null
  let transform: proj4.Converter
  try {
    transform = proj4(wkt, 'EPSG:4326')
    const probe = transform.forward(firstPosition(collection) ?? [0, 0])
    if (!probe.every(Number.isFinite)) throw new Error('the projection gives no coordinates')
  } catch (error) {
    const projection = /PROJECTION\s*\[\s*"([^"]*)"/i.exec(wkt)?.[1]
    const why = projection ? `unknown projection "${projection}"` : (error instanceof Error ? error.message : String(error)).slice(0, 100)
    throw refuse(
      `The coordinate system of "${fileName}" ("${name}") in its .prj file is not supported (${why}). Export the shapefile in WGS-84 (EPSG:4326) or a UTM zone and try again.`,
    )
  }
  const map = (p: Position): Position => {
    const q = transform.forward([p[0], p[1]])
    return [q[0], q[1]]
  }
  for (const f of collection.features) if (f.geometry) f.geometry = mapGeometry(f.geometry, map)
  return name
}

function firstPosition(collection: FeatureCollection): Position | null {
  for (const f of collection.features) {
    const g = f.geometry
    if (!g) continue
    const stack: unknown[] = [(g as { coordinates?: unknown }).coordinates]
    while (stack.length) {
      const c = stack.pop()
      if (Array.isArray(c) && typeof c[0] === 'number') return c as Position
      if (Array.isArray(c)) stack.push(...[...c].reverse())
    }
  }
  return null
}

function mapGeometry(g: Geometry, map: (p: Position) => Position): Geometry {
  switch (g.type) {
    case 'Point':
      return { ...g, coordinates: map(g.coordinates) }
    case 'MultiPoint':
    case 'LineString':
      return { ...g, coordinates: g.coordinates.map(map) }
    case 'MultiLineString':
    case 'Polygon':
      return { ...g, coordinates: g.coordinates.map((r) => r.map(map)) }
    case 'MultiPolygon':
      return { ...g, coordinates: g.coordinates.map((p) => p.map((r) => r.map(map))) }
    case 'GeometryCollection':
      return { ...g, geometries: g.geometries.map((x) => mapGeometry(x, map)) }
  }
}

function* positions(g: Geometry | null): Generator<Position> {
  if (!g) return
  if (g.type === 'GeometryCollection') {
    for (const x of g.geometries) yield* positions(x)
    return
  }
  const stack: unknown[] = [g.coordinates]
  while (stack.length) {
    const c = stack.pop()
    if (Array.isArray(c) && typeof c[0] === 'number') yield c as Position
    else if (Array.isArray(c)) for (const x of c) stack.push(x)
  }
}

const isLonLat = (p: Position) => Number.isFinite(p[0]) && Number.isFinite(p[1]) && Math.abs(p[0]) <= 180 && Math.abs(p[1]) <= 90

function layerLooksLonLat(collection: FeatureCollection): boolean {
  for (const f of collection.features) for (const p of positions(f.geometry)) if (!isLonLat(p)) return false
  return true
}

/** 400 when some coordinate is not a longitude/latitude pair (e.g. projected metres). */
function assertLonLat(collection: FeatureCollection<Geometry | null>, what: string): void {
  for (const f of collection.features) {
    if (!f || typeof f !== 'object') continue
    let g: Geometry | null
    try {
      g = f.geometry
      for (const p of positions(g)) {
        if (!Array.isArray(p) || !isLonLat(p)) {
          const shown = Array.isArray(p) ? p.slice(0, 2).map((x) => (typeof x === 'number' ? Math.round(x * 1e4) / 1e4 : String(x))).join(', ') : String(p)
          throw refuse(`${what} has coordinates that are not longitude/latitude (e.g. ${shown}). Export it in WGS-84 (EPSG:4326).`)
        }
      }
    } catch (error) {
      if (error instanceof Error && error.name === 'HttpError') throw error
      throw refuse(`${what} has a geometry that cannot be read.`)
    }
  }
}
