/**
 * The command-line contract of ENGINE.md: flags, output shape, exit status 2 on bad
 * arguments or unreadable orbit files, nothing but the result on stdout.
 */
import { spawnSync } from 'node:child_process'
import { fileURLToPath } from 'node:url'
import { describe, expect, it } from 'vitest'

const root = fileURLToPath(new URL('../../../', import.meta.url))
const fx = (p: string) => `tests/fixtures/precision/${p}`

function forecast(args: string[]) {
  const r = spawnSync(process.execPath, ['--import', 'tsx', 'server/cli/forecast.ts', ...args], { cwd: root, encoding: 'utf8' })
  return { status: r.status, stdout: r.stdout, stderr: r.stderr }
}

const POINT = ['--lat', '52.03', '--lon', '5.66', '--start', '2026-12-02T06:00:00Z', '--hours', '1', '--step', '15']
const KEYS = ['time', 'satellites', 'ids', 'gdop', 'pdop', 'hdop', 'vdop', 'tdop']

describe('forecast CLI, point mode', () => {
  it.each([
    ['a TLE file', fx('orbits/gps-sample.tle'), /^\d+$/],
    ['an OMM JSON file', fx('orbits/galileo-sample.omm.json'), /^\d+$/],
    ['an OMM XML file', fx('orbits/glonass-sample.omm.xml'), /^\d+$/],
    ['a YUMA almanac', fx('orbits/gps-sample.yuma.txt'), /^G\d\d$/],
    ['nominal:all', 'nominal:all', /^[GRCE][A-Z]\d$/],
  ])('answers for %s with { epochs: [...] }', (_, orbits, idPattern) => {
    const r = forecast(['--orbits', orbits, ...POINT])
    expect(r.status).toBe(0)
    const out = JSON.parse(r.stdout)
    expect(Object.keys(out)).toEqual(['epochs'])
    expect(out.epochs).toHaveLength(4) // 06:00, 06:15, 06:30, 06:45
    expect(out.epochs[0].time).toBe('2026-12-02T06:00:00.000Z')
    for (const e of out.epochs) {
      expect(Object.keys(e)).toEqual(KEYS)
      expect(e.ids).toHaveLength(e.satellites)
      for (const id of e.ids) expect(id).toMatch(idPattern)
      // With 6+ satellites of one constellation above 10 deg there is a fix.
      if (e.satellites >= 6) expect(e.hdop).toBeGreaterThan(0)
    }
  })

  it('writes CSV with the same columns', () => {
    const r = forecast(['--orbits', 'nominal:gps', ...POINT, '--format', 'csv'])
    expect(r.status).toBe(0)
    const lines = r.stdout.trim().split('\n')
    expect(lines[0]).toBe(KEYS.join(','))
    expect(lines).toHaveLength(5)
  })

  it('combines orbit files and filters systems', () => {
    const both = JSON.parse(forecast(['--orbits', 'nominal:gps', '--orbits', 'nominal:galileo', ...POINT]).stdout).epochs[0]
    const gpsOnly = JSON.parse(forecast(['--orbits', 'nominal:gps', '--orbits', 'nominal:galileo', ...POINT, '--systems', 'GPS']).stdout).epochs[0]
    expect(gpsOnly.ids.every((id: string) => id.startsWith('G'))).toBe(true)
    expect(both.satellites).toBeGreaterThan(gpsOnly.satellites)
  })
})

describe('forecast CLI, western and southern coordinates', () => {
  it('takes a negative --lat/--lon as a value, the way people write them', () => {
    const spaced = forecast(['--orbits', 'nominal:gps', '--lat', '-33.9', '--lon', '-93.6', '--start', '2026-12-02T06:00:00Z', '--hours', '1', '--step', '30'])
    const joined = forecast(['--orbits', 'nominal:gps', '--lat=-33.9', '--lon=-93.6', '--start', '2026-12-02T06:00:00Z', '--hours', '1', '--step', '30'])
    expect(spaced.status).toBe(0)
    expect(spaced.stdout).toBe(joined.stdout)
    expect(JSON.parse(spaced.stdout).epochs).toHaveLength(2)
  })
})

describe('forecast CLI, field mode', () => {
  it('prints { hours: [...] } with the hourly aggregates', () => {
    const r = forecast([
      '--orbits', 'nominal:all', '--field', fx('cli/field.geojson'), '--obstructions', fx('cli/obstructions.geojson'),
      '--antenna-height', '3.5', '--start', '2026-12-02T06:00:00Z', '--hours', '2', '--samples', '16',
    ])
    expect(r.status).toBe(0)
    const out = JSON.parse(r.stdout)
    expect(Object.keys(out)).toEqual(['hours'])
    expect(out.hours).toHaveLength(2)
    const h = out.hours[0]
    for (const key of ['time', 'satellites', 'hdop', 'vdop', 'pdopMax', 'n1HdopMax', 'h95M', 'v95M', 'workTypes']) expect(h).toHaveProperty(key)
    expect(h.workTypes.map((w: { id: string }) => w.id)).toEqual(['planting', 'strip-till', 'spraying', 'tile-drainage', 'land-levelling'])
    for (const w of h.workTypes) expect(['clear', 'tight', 'closed']).toContain(w.state)
  })
})

describe('forecast CLI, bad input', () => {
  it.each([
    ['no --orbits', ['--lat', '52', '--lon', '5']],
    ['unknown flag', ['--orbits', 'nominal:gps', '--lat', '52', '--lon', '5', '--colour', 'red']],
    ['bad latitude', ['--orbits', 'nominal:gps', '--lat', '95', '--lon', '5']],
    ['bad start', ['--orbits', 'nominal:gps', '--lat', '52', '--lon', '5', '--start', 'tomorrow']],
    ['bad weights', ['--orbits', 'nominal:gps', '--lat', '52', '--lon', '5', '--weights', 'heavy']],
    ['unknown system', ['--orbits', 'nominal:gps', '--lat', '52', '--lon', '5', '--systems', 'GPS,Loran']],
    ['unknown nominal set', ['--orbits', 'nominal:iridium', '--lat', '52', '--lon', '5']],
    ['unreadable orbit file', ['--orbits', fx('orbits/missing.tle'), '--lat', '52', '--lon', '5']],
    ['orbit file without a usable record', ['--orbits', fx('cli/field.geojson'), '--lat', '52', '--lon', '5']],
  ])('%s: exit status 2 and a one-line message, nothing on stdout', (_, args) => {
    const r = forecast(args)
    expect(r.status).toBe(2)
    expect(r.stdout).toBe('')
    expect(r.stderr.trim().split('\n')).toHaveLength(1)
    expect(r.stderr).toMatch(/^forecast: /)
  })
})

describe('forecast CLI, RTK baseline flags', () => {
  const FIELD = ['--field', fx('cli/field.geojson'), '--start', '2026-12-02T06:00:00Z', '--hours', '1', '--step', '15', '--samples', '16', '--sigma', '0.012']

  it('point mode carries the WGS-84 geodesic baselineKm and its 95 % parts', () => {
    // GeographicLib documentation example (geographiclib-geodesic README): Wellington (41.32 S, 174.81 E)
    // to Salamanca (40.96 N, 5.50 W) is 19,959,679.267 m.
    const r = forecast(['--orbits', 'nominal:gps', '--lat', '-41.32', '--lon', '174.81', '--hours', '1', '--step', '30', '--base', '40.96,-5.50,800', '--ppm-h', '1', '--ppm-v', '2'])
    expect(r.status).toBe(0)
    const out = JSON.parse(r.stdout)
    expect(out.baselineKm).toBeCloseTo(19959.679267, 6)
    // By hand: 2 x 1 mm/km x 19959.679 km = 39.919 m; 1.96 x 2 mm/km x 19959.679 km = 78.242 m.
    expect(out.baselineH95M).toBeCloseTo(39.919358534, 6)
    expect(out.baselineV95M).toBeCloseTo(78.241942782, 6)
  })

  it('field mode adds 2 ppm_H b to the expected errors and closes RTK work past the baseline limit', () => {
    const plain = JSON.parse(forecast(['--orbits', 'nominal:gps', ...FIELD]).stdout)
    const r = forecast(['--orbits', 'nominal:gps', ...FIELD, '--base', '52.05,5.70', '--ppm-h', '1', '--ppm-v', '1', '--max-baseline-km', '2'])
    expect(r.status).toBe(0)
    const out = JSON.parse(r.stdout)
    expect(Object.keys(out)).toEqual(['baselineKm', 'farthestKm', 'hours'])
    expect(out.baselineKm).toBeGreaterThan(2)
    expect(out.hours[0].h95M.max - plain.hours[0].h95M.max).toBeCloseTo((2 * out.baselineKm) / 1000, 5)
    const planting = out.hours[0].workTypes.find((w: { id: string }) => w.id === 'planting')
    expect(planting).toMatchObject({ state: 'closed', reason: 'baseline-limit' })
    const spraying = out.hours[0].workTypes.find((w: { id: string }) => w.id === 'spraying')
    expect(spraying.reason).toBeUndefined() // SBAS work needs no base
  })

  it('refuses a base off the globe and ppm without a base, with exit status 2', () => {
    const off = forecast(['--orbits', 'nominal:gps', ...POINT, '--base', '95,5'])
    expect(off.status).toBe(2)
    expect(off.stderr).toMatch(/latitude must be in \[-90, 90\]/)
    const lone = forecast(['--orbits', 'nominal:gps', ...POINT, '--ppm-h', '1'])
    expect(lone.status).toBe(2)
    expect(lone.stderr).toMatch(/need --base/)
  })
})
