import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { formatOrbitIssue, parseOrbitFile, tleChecksum } from '@shared/precision'

const fixture = (name: string) => readFileSync(new URL(`../../fixtures/precision/orbits/${name}`, import.meta.url), 'utf8')

// Element sets of AIAA 2006-6753 (SGP4-VER.TLE): valid checksums per the TLE format.
const L1 = '1 28129U 03058A   06175.57071136 -.00000104  00000-0  10000-3 0   459'
const L2 = '2 28129  54.7298 324.8098 0048506 266.2640  93.1663  2.00562768 18443'
const M1 = '1 00005U 58002B   00179.78495062  .00000023  00000-0  28098-4 0  4753'
const M2 = '2 00005  34.2682 348.7242 1859667 331.7664  19.3264 10.82419157413667'

describe('orbit file formats', () => {
  it('TLE checksum: (sum of digits, minus signs count 1) mod 10 reproduces the published sets', () => {
    // The checksum rule of the NORAD two-line format (Spacetrack Report #3 documentation).
    for (const l of [L1, L2, M1, M2]) expect(tleChecksum(l)).toBe(Number(l[68]))
  })

  it('reads the four invented sample files, telling the constellation from the names', () => {
    const cases: Array<[string, string, number, string]> = [
      ['gps-sample.tle', 'tle', 24, 'GPS'],
      ['galileo-sample.omm.json', 'omm-json', 24, 'Galileo'],
      ['glonass-sample.omm.xml', 'omm-xml', 24, 'GLONASS'],
      ['gps-sample.yuma.txt', 'yuma', 24, 'GPS'],
    ]
    for (const [file, format, count, system] of cases) {
      const r = parseOrbitFile(fixture(file))
      expect(r.format).toBe(format)
      expect(r.errors).toEqual([])
      expect(r.satellites).toHaveLength(count)
      expect(new Set(r.satellites.map((s) => s.system))).toEqual(new Set([system]))
    }
  })
})

describe('bad records: clear errors naming record and line, good records kept', () => {
  it('TLE: broken checksum, missing line 2, bad number', () => {
    const bad = L2.slice(0, 68) + String((Number(L2[68]) + 1) % 10)
    const badNumber = M2.slice(0, 8) + ' 34.2x82' + M2.slice(16, 68)
    const text = [
      'GOOD ONE', L1, L2, // record 1, lines 1-3
      'BROKEN SUM', L1, bad, // record 2, lines 4-6
      'LONELY', M1, // record 3, lines 7-8 (line 2 missing)
      'BAD NUMBER', M1, badNumber.slice(0, 68) + tleChecksum(badNumber), // record 4, lines 9-11
      'GOOD TWO', M1, M2, // record 5, lines 12-14
    ].join('\n')
    const r = parseOrbitFile(text, { system: 'GPS' })
    expect(r.satellites.map((s) => s.id)).toEqual(['28129', '5'])
    expect(r.skipped).toBe(3)
    expect(r.errors[0]).toMatchObject({ record: 2, line: 6, satellite: 'BROKEN SUM' })
    expect(r.errors[0].message).toMatch(/checksum/)
    expect(r.errors[1]).toMatchObject({ record: 3, line: 9, satellite: 'LONELY' })
    expect(r.errors[1].message).toMatch(/missing line 2/)
    expect(r.errors[2]).toMatchObject({ record: 4, line: 11, satellite: 'BAD NUMBER' })
    expect(r.errors[2].message).toMatch(/inclination/)
    expect(formatOrbitIssue(r.errors[0])).toMatch(/^record 2, line 6 \(BROKEN SUM\): line 2 checksum/)
  })

  it('OMM JSON: unknown field and missing element, with the line of the record', () => {
    const good = JSON.parse(fixture('galileo-sample.omm.json'))[0]
    const unknown = { ...good, NORAD_CAT_ID: 99991, SPIN_RATE: 3 }
    const missing = { ...good, NORAD_CAT_ID: 99992 }
    delete missing.MEAN_MOTION
    const text = JSON.stringify([good, unknown, missing], null, 2)
    const r = parseOrbitFile(text)
    expect(r.satellites).toHaveLength(1)
    expect(r.errors).toHaveLength(2)
    expect(r.errors[0]).toMatchObject({ record: 2, message: 'unknown field SPIN_RATE' })
    expect(r.errors[1]).toMatchObject({ record: 3, message: 'missing MEAN_MOTION' })
    const lines = text.split('\n')
    expect(lines[r.errors[0].line - 1].trim()).toBe('{')
    expect(lines.slice(r.errors[0].line).join('\n')).toMatch(/^\s*"OBJECT_NAME"/)
  })

  it('OMM XML: bad number names the record', () => {
    const text = fixture('glonass-sample.omm.xml').replace('<ECCENTRICITY>0.0003</ECCENTRICITY>', '<ECCENTRICITY>0.0O03</ECCENTRICITY>')
    const r = parseOrbitFile(text)
    expect(r.satellites).toHaveLength(23)
    expect(r.errors).toHaveLength(1)
    expect(r.errors[0]).toMatchObject({ record: 1, line: 3 })
    expect(r.errors[0].message).toMatch(/ECCENTRICITY/)
  })

  it('YUMA: unknown field and a missing field', () => {
    const records = fixture('gps-sample.yuma.txt').split('\n\n')
    const r1 = records[1].replace('Af1(s/s):', 'Af2(s/s/s):')
    const r2 = records[2].replace(/^Mean Anom.*$/m, '')
    const text = [records[0], r1, r2, records[3]].join('\n\n')
    const r = parseOrbitFile(text)
    expect(r.satellites.map((s) => s.id)).toEqual(['G01', 'G04'])
    expect(r.errors[0]).toMatchObject({ record: 2, satellite: 'G02' })
    expect(r.errors[0].message).toMatch(/unknown field "Af2\(s\/s\/s\)"/)
    expect(text.split('\n')[r.errors[0].line - 1]).toMatch(/^Af2/)
    expect(r.errors[1]).toMatchObject({ record: 3, satellite: 'G03' })
    expect(r.errors[1].message).toMatch(/missing field\(s\): Mean Anom/)
  })
})
