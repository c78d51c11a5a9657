/**
 * GPS almanac in YUMA text (the US Coast Guard Navigation Center's YUMA layout):
 * a header line of asterisks per record, then "Label: value" lines -
 * ID, Health (000 = usable), Eccentricity, Time of Applicability (s), Orbital
 * Inclination (rad, full value), Rate of Right Ascen (rad/s), SQRT(A) (m^1/2), Right
 * Ascen at Week (rad), Argument of Perigee (rad), Mean Anom (rad), Af0 (s), Af1 (s/s),
 * week (GPS week modulo 1024).
 * Positions follow IS-GPS-200, Table 20-IV (see kepler.ts), mu = 3.986005e14 m^3/s^2.
 */
import { EARTH_ROTATION_RAD_S, GPS_MU_M3_S2 } from '../constants'
import type { OrbitRecordIssue, Satellite } from './types'

type Key = 'id' | 'health' | 'e' | 'toa' | 'i' | 'omegaDot' | 'sqrtA' | 'omega0' | 'omega' | 'm0' | 'af0' | 'af1' | 'week'

const LABELS: Array<[RegExp, Key]> = [
  [/^id$/, 'id'],
  [/^health$/, 'health'],
  [/^eccentricity$/, 'e'],
  [/^time of applicability/, 'toa'],
  [/^orbital inclination/, 'i'],
  [/^rate of right ascen/, 'omegaDot'],
  [/^sqrt\s*\(a\)/, 'sqrtA'],
  [/^right ascen at week/, 'omega0'],
  [/^argument of perigee/, 'omega'],
  [/^mean anom/, 'm0'],
  [/^af0/, 'af0'],
  [/^af1/, 'af1'],
  [/^week$/, 'week'],
]
const ALL_KEYS: Key[] = LABELS.map(([, k]) => k)
const FIELD_NAMES: Record<Key, string> = {
  id: 'ID',
  health: 'Health',
  e: 'Eccentricity',
  toa: 'Time of Applicability',
  i: 'Orbital Inclination',
  omegaDot: 'Rate of Right Ascen',
  sqrtA: 'SQRT(A)',
  omega0: 'Right Ascen at Week',
  omega: 'Argument of Perigee',
  m0: 'Mean Anom',
  af0: 'Af0',
  af1: 'Af1',
  week: 'week',
}
const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/

/** Reads a YUMA almanac. Each bad record is reported with its record and line. */
export function parseYuma(text: string): { satellites: Satellite[]; errors: OrbitRecordIssue[]; notes: OrbitRecordIssue[] } {
  const lines = text.split(/\r?\n/)
  const satellites: Satellite[] = []
  const errors: OrbitRecordIssue[] = []
  const notes: OrbitRecordIssue[] = []
  type Rec = { record: number; line: number; values: Partial<Record<Key, { v: number; raw: string; line: number }>>; error?: OrbitRecordIssue }
  const records: Rec[] = []
  let cur: Rec | null = null
  lines.forEach((raw, idx) => {
    const line = raw.trim()
    const lineNo = idx + 1
    if (line === '') return
    if (/^\*{3,}/.test(line)) {
      cur = { record: records.length + 1, line: lineNo, values: {} }
      records.push(cur)
      return
    }
    if (!cur) {
      cur = { record: records.length + 1, line: lineNo, values: {} }
      records.push(cur)
    }
    const rec: Rec = cur
    if (rec.error) return
    const colon = line.indexOf(':')
    if (colon < 0) {
      rec.error = { record: rec.record, line: lineNo, message: `expected "Label: value", found "${line.slice(0, 30)}"` }
      return
    }
    const label = line.slice(0, colon).trim().toLowerCase()
    const value = line.slice(colon + 1).trim()
    const key = LABELS.find(([re]) => re.test(label))?.[1]
    if (!key) {
      rec.error = { record: rec.record, line: lineNo, message: `unknown field "${line.slice(0, colon).trim()}"` }
      return
    }
    if (!NUMBER.test(value)) {
      rec.error = { record: rec.record, line: lineNo, message: `bad number for ${line.slice(0, colon).trim()}: "${value}"` }
      return
    }
    if (rec.values[key]) {
      rec.error = { record: rec.record, line: lineNo, message: `field "${line.slice(0, colon).trim()}" given twice` }
      return
    }
    rec.values[key] = { v: Number(value), raw: value, line: lineNo }
  })
  for (const rec of records) {
    const idText = rec.values.id ? `G${String(Math.round(rec.values.id.v)).padStart(2, '0')}` : undefined
    if (rec.error) {
      errors.push({ ...rec.error, satellite: idText })
      continue
    }
    const missing = ALL_KEYS.filter((k) => !rec.values[k])
    if (missing.length > 0) {
      errors.push({ record: rec.record, line: rec.line, satellite: idText, message: `missing field(s): ${missing.map((k) => FIELD_NAMES[k]).join(', ')}` })
      continue
    }
    const v = (k: Key) => rec.values[k]!.v
    const prn = v('id')
    if (!Number.isInteger(prn) || prn < 1 || prn > 63) {
      errors.push({ record: rec.record, line: rec.values.id!.line, message: `bad PRN ${prn}` })
      continue
    }
    const e = v('e')
    if (!(e >= 0 && e < 1)) {
      errors.push({ record: rec.record, line: rec.values.e!.line, satellite: idText, message: `eccentricity ${e} out of [0, 1)` })
      continue
    }
    const toa = v('toa')
    if (!(toa >= 0 && toa < 604800)) {
      errors.push({ record: rec.record, line: rec.values.toa!.line, satellite: idText, message: `time of applicability ${toa} s out of the week` })
      continue
    }
    const sqrtA = v('sqrtA')
    if (!(sqrtA > 0)) {
      errors.push({ record: rec.record, line: rec.values.sqrtA!.line, satellite: idText, message: 'SQRT(A) must be > 0' })
      continue
    }
    const week = v('week')
    if (!Number.isInteger(week) || week < 0) {
      errors.push({ record: rec.record, line: rec.values.week!.line, satellite: idText, message: `bad week ${week}` })
      continue
    }
    const a = sqrtA * sqrtA
    const healthy = Math.round(v('health')) === 0
    if (!healthy) {
      notes.push({ record: rec.record, line: rec.values.health!.line, satellite: idText, message: `health ${rec.values.health!.raw}: kept but not used` })
    }
    satellites.push({
      id: idText!,
      system: 'GPS',
      source: 'almanac',
      healthy,
      orbit: {
        kind: 'kepler',
        aM: a,
        e,
        iRad: v('i'),
        omegaRad: v('omega'),
        m0Rad: v('m0'),
        nRadS: Math.sqrt(GPS_MU_M3_S2 / (a * a * a)),
        lon0Rad: v('omega0') - EARTH_ROTATION_RAD_S * toa,
        lonRateRadS: v('omegaDot') - EARTH_ROTATION_RAD_S,
        tRefMs: NaN,
        almanac: { weekMod1024: week % 1024, toaS: toa, omega0Rad: v('omega0') },
      },
    })
  }
  return { satellites, errors, notes }
}
