/**
 * CCSDS Orbit Mean-Elements Messages (OMM) in JSON and XML.
 *
 * Keywords: CCSDS 502.0-B-3 (Orbit Data Messages, 2023), OMM metadata, mean elements
 * and TLE-related parameters (SGP4 theory, TEME frame, UTC). Common catalogue metadata
 * that element-set publishers add beside them (OBJECT_TYPE, COUNTRY_CODE, ...) is
 * accepted and ignored; any other keyword is reported as unknown.
 */
import { XMLParser } from 'fast-xml-parser'
import { json2satrec, type OMMJsonObject } from 'satellite.js'
import { systemFromObjectName, type GnssSystem } from '../systems'
import { catalogId } from './tle'
import type { OrbitRecordIssue, Satellite } from './types'

const REQUIRED_NUMBERS = [
  'MEAN_MOTION',
  'ECCENTRICITY',
  'INCLINATION',
  'RA_OF_ASC_NODE',
  'ARG_OF_PERICENTER',
  'MEAN_ANOMALY',
] as const
const OPTIONAL_NUMBERS = ['BSTAR', 'MEAN_MOTION_DOT', 'MEAN_MOTION_DDOT', 'ELEMENT_SET_NO', 'REV_AT_EPOCH'] as const

const KNOWN_KEYS = new Set<string>([
  ...REQUIRED_NUMBERS,
  ...OPTIONAL_NUMBERS,
  'NORAD_CAT_ID',
  'EPOCH',
  'OBJECT_NAME',
  'OBJECT_ID',
  'CCSDS_OMM_VERS',
  'COMMENT',
  'CREATION_DATE',
  'ORIGINATOR',
  'MESSAGE_ID',
  'CENTER_NAME',
  'REF_FRAME',
  'REF_FRAME_EPOCH',
  'TIME_SYSTEM',
  'MEAN_ELEMENT_THEORY',
  'EPHEMERIS_TYPE',
  'CLASSIFICATION_TYPE',
  'SEMIMAJOR_AXIS',
  'GM',
  'BTERM',
  'AGOM',
  // catalogue metadata commonly published beside the OMM keywords
  'OBJECT_TYPE',
  'RCS_SIZE',
  'COUNTRY_CODE',
  'LAUNCH_DATE',
  'SITE',
  'DECAY_DATE',
  'FILE',
  'GP_ID',
  'PERIOD',
  'APOAPSIS',
  'PERIAPSIS',
  'TLE_LINE0',
  'TLE_LINE1',
  'TLE_LINE2',
  'USER_DEFINED_PARAMETERS',
])

/** Checks one OMM keyword set; returns the message of the first problem, or null. */
export function checkOmm(o: Record<string, unknown>): string | null {
  for (const key of Object.keys(o)) {
    if (!KNOWN_KEYS.has(key) && !key.startsWith('USER_DEFINED')) return `unknown field ${key}`
  }
  if (o.NORAD_CAT_ID === undefined || String(o.NORAD_CAT_ID).trim() === '') return 'missing NORAD_CAT_ID'
  if (typeof o.EPOCH !== 'string' || o.EPOCH.trim() === '') return 'missing EPOCH'
  const epoch = o.EPOCH.trim()
  if (!/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}(\.\d+)?Z?$/.test(epoch)) return `bad EPOCH "${epoch}"`
  for (const key of REQUIRED_NUMBERS) {
    if (o[key] === undefined || o[key] === null || String(o[key]).trim() === '') return `missing ${key}`
    if (!Number.isFinite(Number(o[key]))) return `bad number ${key} = "${String(o[key])}"`
  }
  for (const key of OPTIONAL_NUMBERS) {
    if (o[key] !== undefined && o[key] !== null && !Number.isFinite(Number(o[key]))) {
      return `bad number ${key} = "${String(o[key])}"`
    }
  }
  if (!(Number(o.MEAN_MOTION) > 0)) return 'MEAN_MOTION must be > 0 (revolutions per day)'
  const e = Number(o.ECCENTRICITY)
  if (!(e >= 0 && e < 1)) return 'ECCENTRICITY must be in [0, 1)'
  if (o.REF_FRAME !== undefined && o.REF_FRAME !== 'TEME') return `REF_FRAME ${String(o.REF_FRAME)} is not TEME`
  if (o.CENTER_NAME !== undefined && String(o.CENTER_NAME).toUpperCase() !== 'EARTH') return `CENTER_NAME ${String(o.CENTER_NAME)} is not EARTH`
  if (o.TIME_SYSTEM !== undefined && o.TIME_SYSTEM !== 'UTC') return `TIME_SYSTEM ${String(o.TIME_SYSTEM)} is not UTC`
  if (o.MEAN_ELEMENT_THEORY !== undefined && !/^SGP4?$|^SGP\/SGP4$/.test(String(o.MEAN_ELEMENT_THEORY))) {
    return `MEAN_ELEMENT_THEORY ${String(o.MEAN_ELEMENT_THEORY)} is not SGP4`
  }
  return null
}

function toSatellite(
  o: Record<string, unknown>,
  record: number,
  line: number,
  options: { system?: GnssSystem },
  errors: OrbitRecordIssue[],
  notes: OrbitRecordIssue[],
): Satellite | null {
  const name = typeof o.OBJECT_NAME === 'string' ? o.OBJECT_NAME.trim() : undefined
  const label = name || (o.NORAD_CAT_ID !== undefined ? String(o.NORAD_CAT_ID) : undefined)
  const bad = checkOmm(o)
  if (bad) {
    errors.push({ record, line, satellite: label, message: bad })
    return null
  }
  const omm = {
    ...o,
    OBJECT_NAME: name ?? '',
    OBJECT_ID: typeof o.OBJECT_ID === 'string' ? o.OBJECT_ID : '',
    EPOCH: String(o.EPOCH).trim(),
    BSTAR: o.BSTAR ?? 0,
    MEAN_MOTION_DOT: o.MEAN_MOTION_DOT ?? 0,
    MEAN_MOTION_DDOT: o.MEAN_MOTION_DDOT ?? 0,
    ELEMENT_SET_NO: o.ELEMENT_SET_NO ?? 999,
  } as OMMJsonObject
  const satrec = json2satrec(omm)
  if (satrec.error !== 0) {
    errors.push({ record, line, satellite: label, message: `SGP4 cannot start from these elements (error ${satrec.error})` })
    return null
  }
  const id = catalogId(String(o.NORAD_CAT_ID))
  let system = options.system ?? (name ? systemFromObjectName(name) : null)
  if (!system) {
    system = 'Other'
    notes.push({ record, line, satellite: label, message: 'constellation not told by the record: kept as Other' })
  }
  return { id, system, source: 'omm', name, healthy: true, orbit: { kind: 'sgp4', omm } }
}

/** 1-based line of a character offset. */
function lineAt(text: string, offset: number): number {
  let n = 1
  for (let i = 0; i < offset && i < text.length; i++) if (text.charCodeAt(i) === 10) n++
  return n
}

/** Offsets of the top-level objects of a JSON array (or the single top-level object). */
function objectOffsets(text: string): number[] {
  const offsets: number[] = []
  let depth = 0
  let inString = false
  for (let i = 0; i < text.length; i++) {
    const c = text[i]
    if (inString) {
      if (c === '\\') i++
      else if (c === '"') inString = false
      continue
    }
    if (c === '"') inString = true
    else if (c === '{' || c === '[') {
      if (c === '{' && (depth === 1 || (depth === 0 && offsets.length === 0))) offsets.push(i)
      depth++
    } else if (c === '}' || c === ']') depth--
  }
  return offsets
}

/** Reads OMM JSON: one object or an array of objects with the OMM keywords. */
export function parseOmmJson(
  text: string,
  options: { system?: GnssSystem } = {},
): { satellites: Satellite[]; errors: OrbitRecordIssue[]; notes: OrbitRecordIssue[] } {
  const errors: OrbitRecordIssue[] = []
  const notes: OrbitRecordIssue[] = []
  const satellites: Satellite[] = []
  let data: unknown
  try {
    data = JSON.parse(text)
  } catch (e) {
    const msg = e instanceof Error ? e.message : String(e)
    const pos = /position (\d+)/.exec(msg)
    errors.push({ record: 1, line: pos ? lineAt(text, Number(pos[1])) : 1, message: `not valid JSON: ${msg}` })
    return { satellites, errors, notes }
  }
  const list = Array.isArray(data) ? data : [data]
  const trimmed = text.trimStart()
  const offsets = objectOffsets(text)
  const lineOf = (k: number) =>
    offsets[k] !== undefined ? lineAt(text, offsets[k]) : lineAt(text, text.length - trimmed.length)
  list.forEach((o, k) => {
    if (!o || typeof o !== 'object' || Array.isArray(o)) {
      errors.push({ record: k + 1, line: lineOf(k), message: 'record is not a JSON object' })
      return
    }
    const sat = toSatellite(o as Record<string, unknown>, k + 1, lineOf(k), options, errors, notes)
    if (sat) satellites.push(sat)
  })
  return { satellites, errors, notes }
}

const XML_SECTIONS = new Set(['metadata', 'meanElements', 'tleParameters', 'spacecraftParameters', 'covarianceMatrix', 'userDefinedParameters', 'COMMENT'])

/** Reads OMM XML: an <omm> document or an <ndm> holding several <omm> elements. */
export function parseOmmXml(
  text: string,
  options: { system?: GnssSystem } = {},
): { satellites: Satellite[]; errors: OrbitRecordIssue[]; notes: OrbitRecordIssue[] } {
  const errors: OrbitRecordIssue[] = []
  const notes: OrbitRecordIssue[] = []
  const satellites: Satellite[] = []
  const parser = new XMLParser({
    ignoreAttributes: true,
    parseTagValue: false,
    removeNSPrefix: true,
    trimValues: true,
    isArray: (name) => name === 'omm' || name === 'segment',
  })
  let doc: Record<string, unknown>
  try {
    doc = parser.parse(text, true) as Record<string, unknown>
  } catch (e) {
    const msg = e instanceof Error ? e.message : String(e)
    const line = /line[: ]+(\d+)/i.exec(msg)
    errors.push({ record: 1, line: line ? Number(line[1]) : 1, message: `not valid XML: ${msg}` })
    return { satellites, errors, notes }
  }
  const root = (doc.ndm as Record<string, unknown> | undefined) ?? doc
  const omms = (root.omm as unknown[] | undefined) ?? []
  if (omms.length === 0) {
    errors.push({ record: 1, line: 1, message: 'no <omm> element found' })
    return { satellites, errors, notes }
  }
  // Line of each <omm ...> start tag, in document order.
  const starts: number[] = []
  const re = /<(?:\w+:)?omm[\s>]/g
  for (let m = re.exec(text); m; m = re.exec(text)) starts.push(lineAt(text, m.index))
  let record = 0
  omms.forEach((omm, k) => {
    const segments = ((omm as Record<string, unknown>)?.body as Record<string, unknown> | undefined)?.segment as
      | Record<string, unknown>[]
      | undefined
    const line = starts[k] ?? 1
    if (!segments || segments.length === 0) {
      record++
      errors.push({ record, line, message: 'missing <body><segment>' })
      return
    }
    for (const seg of segments) {
      record++
      const flat: Record<string, unknown> = {}
      const meta = seg.metadata as Record<string, unknown> | undefined
      const data = seg.data as Record<string, unknown> | undefined
      if (!meta || !data) {
        errors.push({ record, line, message: 'missing <metadata> or <data>' })
        continue
      }
      let unknown: string | null = null
      for (const [k2, v] of Object.entries(meta)) if (k2 !== 'COMMENT') flat[k2] = v
      for (const [section, v] of Object.entries(data)) {
        if (!XML_SECTIONS.has(section)) {
          unknown = `unknown element <${section}> in <data>`
          break
        }
        if (section === 'COMMENT' || section === 'covarianceMatrix' || section === 'userDefinedParameters') continue
        for (const [k2, v2] of Object.entries((v as Record<string, unknown>) ?? {})) if (k2 !== 'COMMENT') flat[k2] = v2
      }
      if (unknown) {
        errors.push({ record, line, satellite: typeof meta.OBJECT_NAME === 'string' ? meta.OBJECT_NAME : undefined, message: unknown })
        continue
      }
      const sat = toSatellite(flat, record, line, options, errors, notes)
      if (sat) satellites.push(sat)
    }
  })
  return { satellites, errors, notes }
}
