/**
 * Two-line and three-line element sets (TLE / 3LE).
 *
 * Format: the NORAD two-line element set as documented with Spacetrack Report #3 and
 * in Vallado, Crawford, Hujsak, Kelso, "Revisiting Spacetrack Report #3" (AIAA
 * 2006-6753): fixed columns, line number in column 1, catalogue number in columns 3-7,
 * checksum in column 69 = (sum of digits, each '-' counting 1) mod 10.
 */
import { twoline2satrec } from 'satellite.js'
import { systemFromObjectName, type GnssSystem } from '../systems'
import type { OrbitRecordIssue, Satellite } from './types'

/** The checksum digit of a TLE line (columns 1-68). */
export function tleChecksum(line: string): number {
  let sum = 0
  for (let i = 0; i < 68 && i < line.length; i++) {
    const c = line.charCodeAt(i)
    if (c >= 48 && c <= 57) sum += c - 48
    else if (c === 45) sum += 1
  }
  return sum % 10
}

/** A catalogue number as id text: leading zeros dropped for all-digit numbers. */
export function catalogId(text: string): string {
  const t = text.trim()
  return /^\d+$/.test(t) ? String(Number(t)) : t
}

const NUM = /^\s*[+-]?(\d+\.?\d*|\.\d+)\s*$/
/** TLE implied-decimal exponent field, e.g. " 28098-4" or "-11606-4". */
const EXP_FIELD = /^\s*[+-]?\d{1,5}[+-]\d\s*$|^\s*[+-]?0+\s*$|^\s*[+-]?\.\d+[+-]?\d*\s*$/

function field(line: string, from: number, to: number): string {
  return line.slice(from - 1, to)
}

function checkLine(line: string, n: 1 | 2): string | null {
  if (line.length < 69) return `line ${n} is ${line.length} characters long, expected 69`
  if (line[0] !== String(n)) return `expected line ${n} of the element set, found "${line.slice(0, 10)}..."`
  const digit = line.charCodeAt(68) - 48
  if (!(digit >= 0 && digit <= 9)) return `line ${n} has no checksum digit in column 69`
  const want = tleChecksum(line)
  if (digit !== want) return `line ${n} checksum is ${digit}, computed ${want}`
  const checks: Array<[string, number, number, RegExp]> =
    n === 1
      ? [
          ['epoch year', 19, 20, /^\d\d$/],
          ['epoch day', 21, 32, NUM],
          ['mean motion derivative', 34, 43, NUM],
          ['second derivative', 45, 52, EXP_FIELD],
          ['drag term (B*)', 54, 61, EXP_FIELD],
        ]
      : [
          ['inclination', 9, 16, NUM],
          ['right ascension of the node', 18, 25, NUM],
          ['eccentricity', 27, 33, /^\d{7}$/],
          ['argument of perigee', 35, 42, NUM],
          ['mean anomaly', 44, 51, NUM],
          ['mean motion', 53, 63, NUM],
        ]
  for (const [name, a, b, re] of checks) {
    const f = field(line, a, b)
    if (!re.test(f)) return `line ${n}: bad ${name} "${f.trim()}" in columns ${a}-${b}`
  }
  return null
}

/**
 * Reads TLE / 3LE text. Each record is a name line (optional, may start with "0 ")
 * followed by lines 1 and 2. Bad records are reported with their record number and
 * line; good records are kept.
 */
export function parseTle(
  text: string,
  options: { system?: GnssSystem } = {},
): { satellites: Satellite[]; errors: OrbitRecordIssue[]; notes: OrbitRecordIssue[] } {
  const lines = text.split(/\r?\n/)
  const satellites: Satellite[] = []
  const errors: OrbitRecordIssue[] = []
  const notes: OrbitRecordIssue[] = []
  let record = 0
  let i = 0
  while (i < lines.length) {
    const raw = lines[i].replace(/\s+$/, '')
    if (raw.trim() === '') {
      i++
      continue
    }
    record++
    const startLine = i + 1
    let name: string | undefined
    let l1Index = i
    if (!/^1 /.test(raw)) {
      if (/^2 /.test(raw)) {
        errors.push({ record, line: startLine, message: 'line 2 without a line 1 before it' })
        i++
        continue
      }
      name = raw.replace(/^0 /, '').trim()
      l1Index = i + 1
    }
    const l1 = (lines[l1Index] ?? '').replace(/\s+$/, '')
    const l2 = (lines[l1Index + 1] ?? '').replace(/\s+$/, '')
    const label = name
    if (!/^1 /.test(l1)) {
      errors.push({
        record,
        line: l1Index + 1,
        satellite: label,
        message: l1 === '' ? 'missing line 1' : `expected line 1, found "${l1.slice(0, 20)}"`,
      })
      // A name line was consumed (l1Index > i), so this always advances.
      i = l1Index + (/^2 /.test(l1) ? 1 : 0)
      continue
    }
    if (!/^2 /.test(l2)) {
      errors.push({ record, line: l1Index + 2, satellite: label, message: 'missing line 2' })
      i = l1Index + 1
      continue
    }
    i = l1Index + 2
    const bad1 = checkLine(l1, 1)
    if (bad1) {
      errors.push({ record, line: l1Index + 1, satellite: label, message: bad1 })
      continue
    }
    const bad2 = checkLine(l2, 2)
    if (bad2) {
      errors.push({ record, line: l1Index + 2, satellite: label, message: bad2 })
      continue
    }
    const cat1 = field(l1, 3, 7).trim()
    const cat2 = field(l2, 3, 7).trim()
    if (cat1 !== cat2) {
      errors.push({
        record,
        line: l1Index + 2,
        satellite: label,
        message: `catalogue numbers differ between line 1 (${cat1}) and line 2 (${cat2})`,
      })
      continue
    }
    const id = catalogId(cat1)
    const satrec = twoline2satrec(l1, l2)
    if (satrec.error !== 0) {
      errors.push({ record, line: l1Index + 1, satellite: label ?? id, message: `SGP4 cannot start from these elements (error ${satrec.error})` })
      continue
    }
    let system = options.system ?? (name ? systemFromObjectName(name) : null)
    if (!system) {
      system = 'Other'
      notes.push({ record, line: startLine, satellite: name ?? id, message: 'constellation not told by the record: kept as Other' })
    }
    satellites.push({ id, system, source: 'tle', name, healthy: true, orbit: { kind: 'sgp4', tle: [l1, l2] } })
  }
  return { satellites, errors, notes }
}
