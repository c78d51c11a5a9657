// ISO 11783-10 task data (TASKDATA.XML), the file farm terminals and task controllers
// exchange: built and read with fast-xml-parser, never by string concatenation.
//
// What Skyfurrow writes and reads (ISO 11783-10:2015, "Task controller and management
// information system data interchange", the XML element and attribute tables of its
// normative annex; attribute letters and value lists from memory of that annex, checked
// against the element descriptions of the open ADAPT ISOv4 plugin where noted):
//   ISO11783_TaskData  root: VersionMajor, VersionMinor, ManagementSoftwareManufacturer,
//                      ManagementSoftwareVersion, DataTransferOrigin (1 = FMIS)
//   CTR  Customer      A CustomerId (CTR1...), B CustomerLastName (the designator)
//   FRM  Farm          A FarmId, B FarmDesignator, C FarmStreet, I CustomerIdRef
//   PFD  Partfield     A PartfieldId, C PartfieldDesignator, D PartfieldArea (m^2),
//                      E CustomerIdRef, F FarmIdRef; children PLN, LSG, PNT
//   PLN  Polygon       A PolygonType (1 partfield boundary, 6 obstacle), B PolygonDesignator,
//                      C PolygonArea (m^2); children LSG
//   LSG  LineString    A LineStringType (1 polygon exterior, 2 polygon interior, 9 obstacle),
//                      B LineStringDesignator; children PNT
//   PNT  Point         A PointType (2 other), C PointNorth (deg, WGS-84), D PointEast (deg)
//   TSK  Task          A TaskId, B TaskDesignator, C CustomerIdRef, D FarmIdRef,
//                      E PartfieldIdRef, G TaskStatus (1 planned); child TIM
//   TIM  Time          A Start, B Stop (xs:dateTime), C Duration (s), D Type (1 planned)
// A polygon's holes are interior rings: one PLN of type 1 with one exterior LSG (type 1)
// and one interior LSG (type 2) per hole. Rings are written closed (first point repeated);
// on reading a ring that is not closed is closed (version 3 files leave it implicit).
import { XMLBuilder, XMLParser, XMLValidator } from 'fast-xml-parser'
import type { MultiPolygon, Polygon, Position } from 'geojson'
import { badRequest } from '../http/errors.ts'

export const TASKDATA_VERSION = { major: 4, minor: 3 }

/** PLN A (PolygonType) values used here (ISO 11783-10, PLN element table; from memory). */
export const PolygonType = { partfieldBoundary: 1, obstacle: 6 } as const
/** LSG A (LineStringType) values used here (ISO 11783-10, LSG element table; ADAPT ISOLineStringType). */
export const LineStringType = { polygonExterior: 1, polygonInterior: 2, obstacle: 9 } as const
/** PNT A (PointType) "other" (ISO 11783-10, PNT element table; from memory). */
export const PointTypeOther = 2
/** TSK G (TaskStatus) 1 = planned; TIM D (Type) 1 = planned (ISO 11783-10; from memory). */
export const TaskStatusPlanned = 1
export const TimeTypePlanned = 1

export interface TaskDataCustomer {
  id: string
  name: string
}
export interface TaskDataFarm {
  id: string
  designator: string
  street: string
  customerIdRef: string | null
}
export interface TaskDataObstacle {
  designator: string
  geometry: { type: 'LineString'; coordinates: Position[] } | Polygon
}
export interface TaskDataPartfield {
  id: string
  designator: string
  areaM2: number
  customerIdRef: string | null
  farmIdRef: string | null
  boundary: Polygon | MultiPolygon
  obstacles: TaskDataObstacle[]
}
export interface TaskDataTask {
  id: string
  designator: string
  customerIdRef: string | null
  farmIdRef: string | null
  partfieldIdRef: string | null
  startIso: string
  stopIso: string
}
export interface TaskData {
  softwareVersion: string
  customers: TaskDataCustomer[]
  farms: TaskDataFarm[]
  partfields: TaskDataPartfield[]
  tasks: TaskDataTask[]
}

// ---- writing ---------------------------------------------------------------------------

/** Designators are at most 32 characters (ISO 11783-10 string attributes; ADAPT's validation). */
const designator = (s: string) => s.trim().slice(0, 32)
/** Nine decimals of a degree is about 0.1 mm: more than any boundary needs. */
const deg = (x: number) => x.toFixed(9).replace(/0+$/, '').replace(/\.$/, '')

type XmlNode = Record<string, unknown>

function closed(ring: Position[]): Position[] {
  if (ring.length === 0) return ring
  const [a, b] = [ring[0], ring[ring.length - 1]]
  return a[0] === b[0] && a[1] === b[1] ? ring : [...ring, a]
}

function pointsOf(ring: Position[]): XmlNode[] {
  return ring.map((p) => ({ '@_A': PointTypeOther, '@_C': deg(p[1]), '@_D': deg(p[0]) }))
}

function lineString(type: number, ring: Position[], name?: string): XmlNode {
  return { '@_A': type, ...(name ? { '@_B': designator(name) } : {}), PNT: pointsOf(ring) }
}

function polygonNode(type: number, rings: Position[][], name: string, areaM2?: number): XmlNode {
  return {
    '@_A': type,
    '@_B': designator(name),
    ...(areaM2 !== undefined ? { '@_C': Math.round(areaM2) } : {}),
    LSG: rings.map((ring, i) => lineString(i === 0 ? LineStringType.polygonExterior : LineStringType.polygonInterior, closed(ring))),
  }
}

/**
 * TASKDATA.XML text for a farm's customers, farms, partfields and planned tasks.
 * @example buildTaskData({ softwareVersion: '0.1.0', customers: [], farms: [], partfields: [], tasks: [] })
 */
export function buildTaskData(data: TaskData): string {
  const partfieldNode = (p: TaskDataPartfield): XmlNode => {
    const polygons = p.boundary.type === 'Polygon' ? [p.boundary.coordinates] : p.boundary.coordinates
    const obstaclePolygons = p.obstacles.filter((o) => o.geometry.type === 'Polygon')
    const obstacleLines = p.obstacles.filter((o) => o.geometry.type === 'LineString')
    return {
      '@_A': p.id,
      '@_C': designator(p.designator),
      '@_D': Math.round(p.areaM2),
      ...(p.customerIdRef ? { '@_E': p.customerIdRef } : {}),
      ...(p.farmIdRef ? { '@_F': p.farmIdRef } : {}),
      PLN: [
        ...polygons.map((rings, i) => polygonNode(PolygonType.partfieldBoundary, rings, polygons.length > 1 ? `${p.designator} ${i + 1}` : p.designator, polygons.length === 1 ? p.areaM2 : undefined)),
        ...obstaclePolygons.map((o) => polygonNode(PolygonType.obstacle, (o.geometry as Polygon).coordinates, o.designator)),
      ],
      ...(obstacleLines.length ? { LSG: obstacleLines.map((o) => lineString(LineStringType.obstacle, o.geometry.coordinates as Position[], o.designator)) } : {}),
    }
  }
  const root: XmlNode = {
    '@_VersionMajor': TASKDATA_VERSION.major,
    '@_VersionMinor': TASKDATA_VERSION.minor,
    '@_ManagementSoftwareManufacturer': 'Skyfurrow',
    '@_ManagementSoftwareVersion': data.softwareVersion,
    '@_DataTransferOrigin': 1,
    CTR: data.customers.map((c) => ({ '@_A': c.id, '@_B': designator(c.name) })),
    FRM: data.farms.map((f) => ({
      '@_A': f.id,
      '@_B': designator(f.designator),
      ...(f.street ? { '@_C': designator(f.street) } : {}),
      ...(f.customerIdRef ? { '@_I': f.customerIdRef } : {}),
    })),
    PFD: data.partfields.map(partfieldNode),
    TSK: data.tasks.map((t) => ({
      '@_A': t.id,
      '@_B': designator(t.designator),
      ...(t.customerIdRef ? { '@_C': t.customerIdRef } : {}),
      ...(t.farmIdRef ? { '@_D': t.farmIdRef } : {}),
      ...(t.partfieldIdRef ? { '@_E': t.partfieldIdRef } : {}),
      '@_G': TaskStatusPlanned,
      TIM: [
        {
          '@_A': xsDateTime(t.startIso),
          '@_B': xsDateTime(t.stopIso),
          '@_C': Math.round((Date.parse(t.stopIso) - Date.parse(t.startIso)) / 1000),
          '@_D': TimeTypePlanned,
        },
      ],
    })),
  }
  const builder = new XMLBuilder({ ignoreAttributes: false, attributeNamePrefix: '@_', format: true, indentBy: '  ', suppressEmptyNode: true })
  return `<?xml version="1.0" encoding="UTF-8"?>\n${builder.build({ ISO11783_TaskData: root }) as string}`
}

/** xs:dateTime in UTC without fractions: 2026-12-03T14:00:00Z. */
const xsDateTime = (iso: string) => new Date(iso).toISOString().replace(/\.\d{3}Z$/, 'Z')

// ---- reading ---------------------------------------------------------------------------

export interface ReadPartfield {
  id: string
  designator: string
  farm: string | null
  customer: string | null
  boundary: Polygon | MultiPolygon
}

const refuse = (message: string) => badRequest(message, { file: message })

/** Elements that may repeat: always read as arrays. */
const REPEATED = new Set(['CTR', 'FRM', 'PFD', 'PLN', 'LSG', 'PNT', 'TSK', 'TIM'])

type Attrs = Record<string, string | XmlNode[] | undefined>

const list = (node: Attrs, name: string) => ((node[name] as XmlNode[] | undefined) ?? []) as Attrs[]

/** "PLN 2 (type 1) of PFD PFD3 "North 40"": where a problem is, in the standard's names. */
function describe(path: string[]): string {
  return path.join(' in ')
}

function readPoint(pnt: Attrs, where: string[]): Position {
  const lat = Number(pnt.C)
  const lon = Number(pnt.D)
  if (pnt.C === undefined || pnt.D === undefined) {
    throw refuse(`${describe(where)} has no ${pnt.C === undefined ? 'PointNorth (C)' : 'PointEast (D)'} attribute.`)
  }
  if (!Number.isFinite(lat) || Math.abs(lat) > 90) throw refuse(`${describe(where)} has PointNorth (C) "${String(pnt.C).slice(0, 30)}", which is not a latitude in degrees.`)
  if (!Number.isFinite(lon) || Math.abs(lon) > 180) throw refuse(`${describe(where)} has PointEast (D) "${String(pnt.D).slice(0, 30)}", which is not a longitude in degrees.`)
  return [lon, lat]
}

function readRing(lsg: Attrs, where: string[]): Position[] {
  const points = list(lsg, 'PNT')
  const ring = points.map((p, i) => readPoint(p, [`PNT ${i + 1}`, ...where]))
  const isClosed = ring.length > 1 && ring[0][0] === ring[ring.length - 1][0] && ring[0][1] === ring[ring.length - 1][1]
  const distinct = isClosed ? ring.length - 1 : ring.length
  if (distinct < 3) throw refuse(`${describe(where)} has ${distinct} point${distinct === 1 ? '' : 's'}; a polygon ring needs at least 3 PNT elements.`)
  return closed(ring)
}

/** Ray casting: is the point inside the ring (lon/lat treated as plane coordinates)? */
function inside(p: Position, ring: Position[]): boolean {
  let hit = false
  for (let i = 0, j = ring.length - 1; i < ring.length; j = i++) {
    const [xi, yi] = ring[i]
    const [xj, yj] = ring[j]
    if (yi > p[1] !== yj > p[1] && p[0] < ((xj - xi) * (p[1] - yi)) / (yj - yi) + xi) hit = !hit
  }
  return hit
}

/**
 * The partfield boundaries of a TASKDATA.XML: every PFD with at least one PLN of type 1,
 * as a Polygon (or a MultiPolygon for several boundary polygons), holes as interior rings.
 * 400 naming the element when the file is not task data or an element is broken.
 */
export function readTaskDataBoundaries(text: string): ReadPartfield[] {
  if (/<!ENTITY/i.test(text)) throw refuse('The TASKDATA.XML file declares XML entities, which are not accepted.')
  const valid = XMLValidator.validate(text)
  if (valid !== true) throw refuse(`The TASKDATA.XML file is not well-formed XML (line ${valid.err.line}): ${valid.err.msg}`)
  const parser = new XMLParser({
    ignoreAttributes: false,
    attributeNamePrefix: '',
    parseAttributeValue: false,
    parseTagValue: false,
    processEntities: true,
    isArray: (name) => REPEATED.has(name),
  })
  const doc = parser.parse(text) as Record<string, Attrs | undefined>
  const root = doc.ISO11783_TaskData
  if (!root || typeof root !== 'object') throw refuse('The XML file is not ISO 11783-10 task data (no ISO11783_TaskData root element).')
  const customers = new Map(list(root, 'CTR').map((c) => [String(c.A), String(c.B ?? '')]))
  const farms = new Map(list(root, 'FRM').map((f) => [String(f.A), String(f.B ?? '')]))
  const out: ReadPartfield[] = []
  const pfds = list(root, 'PFD')
  if (pfds.length === 0) throw refuse('The TASKDATA.XML file holds no PFD (partfield) element, so it has no field boundaries.')
  pfds.forEach((pfd, index) => {
    const id = typeof pfd.A === 'string' ? pfd.A : ''
    const name = typeof pfd.C === 'string' ? pfd.C.trim() : ''
    const label = `PFD ${id || `number ${index + 1}`}${name ? ` "${name}"` : ''}`
    if (!/^PFD-?\d+$/.test(id)) throw refuse(`${label} has PartfieldId (A) "${id}"; it must be PFD followed by a number, e.g. PFD1.`)
    if (!name) throw refuse(`${label} has no PartfieldDesignator (C).`)
    const boundaryPolygons = list(pfd, 'PLN').map((pln, i) => ({ pln, i })).filter(({ pln }) => String(pln.A) === String(PolygonType.partfieldBoundary))
    if (boundaryPolygons.length === 0) throw refuse(`${label} has no PLN element of PolygonType 1 (partfield boundary).`)
    const polygons: Position[][][] = []
    for (const { pln, i } of boundaryPolygons) {
      const where = [`PLN ${i + 1}`, label]
      const exteriors: Position[][] = []
      const interiors: Position[][] = []
      list(pln, 'LSG').forEach((lsg, k) => {
        const type = String(lsg.A)
        const at = [`LSG ${k + 1}`, ...where]
        if (type === String(LineStringType.polygonExterior)) exteriors.push(readRing(lsg, at))
        else if (type === String(LineStringType.polygonInterior)) interiors.push(readRing(lsg, at))
        else throw refuse(`${describe(at)} has LineStringType (A) "${type}"; a boundary polygon holds only type 1 (exterior) and 2 (interior).`)
      })
      if (exteriors.length === 0) throw refuse(`${describe(where)} has no LSG of LineStringType 1 (polygon exterior).`)
      const parts = exteriors.map((ring) => [ring])
      for (const hole of interiors) {
        const owner = parts.find((rings) => inside(hole[0], rings[0]))
        if (!owner) throw refuse(`${describe(where)} has an interior LSG (a hole) that lies outside every exterior ring.`)
        owner.push(hole)
      }
      polygons.push(...parts)
    }
    const boundary: Polygon | MultiPolygon = polygons.length === 1 ? { type: 'Polygon', coordinates: polygons[0] } : { type: 'MultiPolygon', coordinates: polygons }
    out.push({
      id,
      designator: name,
      farm: typeof pfd.F === 'string' ? (farms.get(pfd.F) ?? null) : null,
      customer: typeof pfd.E === 'string' ? (customers.get(pfd.E) ?? null) : null,
      boundary,
    })
  })
  return out
}

/** True when the text looks like ISO 11783-10 task data (its root element). */
export const looksLikeTaskData = (text: string) => /<ISO11783_TaskData[\s>/]/.test(text.slice(0, 4096))
