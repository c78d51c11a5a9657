// Pure parts of the Fields page and its sky check: the polar projection and horizon cut
// of the sky view, unit formats, reading where a boundary problem is, and turning the
// API's orbit data into the engine's satellites as the worker does; the sky check's
// error budget with the Kp feed's state.
import { describe, expect, it } from 'vitest'
import { skyView } from '@shared/precision'
import type { OrbitData } from '@shared/schemas/orbits'
import type { ServiceLevel } from '@shared/schemas/planning'
import { compassPoint, horizonCutPath, horizonPeak, markerPath, polarToXY, systemSymbols, trackPieces } from '@/components/sky/polar'
import { formatAreaBoth, formatErrorM, formatHeight } from '@/lib/units'
import { positionFromMessage, positionsFromData } from '@/views/fields/boundaryErrors'
import { skyErrorBudget } from '@/views/fields/skyErrorBudget'
import { nominalFallback, nominalName, satellitesFromOrbitData } from '@/workers/orbitSatellites'

// Three records of the project's invented GPS sample (tests/fixtures/precision/orbits/gps-sample.tle).
const tle = [
  'GPS TEST GA1 (PRN 01)',
  '1 90001U 26900A   26334.50000000  .00000000  00000-0  00000-0 0  9990',
  '2 90001  55.0000 159.8732 0001000   0.0000  74.7116  2.00569110    19',
  'GPS TEST GA2 (PRN 02)',
  '1 90002U 26900A   26334.50000000  .00000000  00000-0  00000-0 0  9991',
  '2 90002  55.0000 159.8732 0001000   0.0000 328.3716  2.00569110    14',
  'GPS TEST GA3 (PRN 03)',
  '1 90003U 26900A   26334.50000000  .00000000  00000-0  00000-0 0  9992',
  '2 90003  55.0000 159.8732 0001000   0.0000 178.2616  2.00569110    16',
].join('\n')

describe('polar sky view geometry', () => {
  it('puts the zenith in the middle, the horizon on the rim, north up and east right', () => {
    expect(polarToXY(0, 90, 100)).toEqual({ x: 0, y: -0 })
    const north = polarToXY(0, 0, 100)
    expect(north.x).toBeCloseTo(0, 9)
    expect(north.y).toBeCloseTo(-100, 9)
    const east = polarToXY(90, 0, 100)
    expect(east.x).toBeCloseTo(100, 9)
    expect(east.y).toBeCloseTo(0, 9)
    // Radius linear in zenith angle: 30 deg elevation is two thirds out.
    const s30 = polarToXY(180, 30, 90)
    expect(s30.y).toBeCloseTo(60, 9)
  })

  it('draws no horizon cut for an open sky, and an even-odd ring for a blocked one', () => {
    expect(horizonCutPath(new Array(360).fill(0), 100)).toBe('')
    const mask = new Array(360).fill(0)
    for (let k = 80; k < 100; k++) mask[k] = 30
    const path = horizonCutPath(mask, 90)
    // Inner outline (360 bins, 2 points each) then the outer circle as two arcs.
    expect(path.match(/A/g)?.length).toBe(2)
    expect(path.split('Z').length - 1).toBe(2)
    // At azimuth 85 the outline is at elevation 30: 60 units from the centre.
    expect(path).toContain('L59.77,-5.23')
    expect(horizonPeak(mask)).toEqual({ elevationDeg: 30, azimuthDeg: 80.5 })
    expect(horizonPeak(new Array(360).fill(0))).toBeNull()
  })

  it('names compass points and splits tracks where they dip below the horizon', () => {
    expect([0, 44, 46, 90, 181, 359].map(compassPoint)).toEqual(['N', 'NE', 'NE', 'E', 'S', 'N'])
    const pieces = trackPieces(
      [
        { azimuthDeg: 10, elevationDeg: 5 },
        { azimuthDeg: 12, elevationDeg: 8 },
        { azimuthDeg: 14, elevationDeg: -1 },
        { azimuthDeg: 16, elevationDeg: 2 },
        { azimuthDeg: 18, elevationDeg: 4 },
        { azimuthDeg: 20, elevationDeg: 6 },
      ],
      100,
    )
    expect(pieces).toHaveLength(2)
    expect(pieces[1].split(' ')).toHaveLength(3)
  })

  it('gives every constellation its own shape and colour', () => {
    const shapes = Object.values(systemSymbols).map((s) => s.shape)
    const colours = Object.values(systemSymbols).map((s) => s.colour)
    expect(new Set(shapes).size).toBe(shapes.length)
    expect(new Set(colours).size).toBe(colours.length)
    for (const s of shapes) expect(markerPath(s, 12)).toMatch(/^M.*Z$/)
  })
})

describe('unit formats', () => {
  it('shows areas in both units, the user’s first', () => {
    expect(formatAreaBoth(40.468564224, 'metric')).toBe('40.5 ha (100 ac)')
    expect(formatAreaBoth(40.468564224, 'imperial')).toBe('100 ac (40.5 ha)')
    expect(formatAreaBoth(0.5, 'metric')).toBe('0.5 ha (1.24 ac)')
  })
  it('shows heights and errors in m/cm or ft/in', () => {
    expect(formatHeight(12, 'metric')).toBe('12 m')
    expect(formatHeight(3.048, 'imperial')).toBe('10 ft')
    expect(formatErrorM(0.0254, 'metric')).toBe('2.5 cm')
    expect(formatErrorM(0.0254, 'imperial')).toBe('1 in')
    expect(formatErrorM(2.5, 'metric')).toBe('2.5 m')
  })
})

describe('where a boundary problem is', () => {
  it('reads hemisphere-marked positions and plain pairs', () => {
    expect(positionFromMessage('The boundary crosses itself near 41.5123 N, 95.2012 W.', null)).toEqual([-95.2012, 41.5123])
    // A plain pair: the reading nearer the field wins.
    expect(positionFromMessage('crosses near 41.51, -95.20', [-95.2, 41.5])).toEqual([-95.2, 41.51])
    expect(positionFromMessage('crosses near -95.20, 41.51', [-95.2, 41.5])).toEqual([-95.2, 41.51])
    expect(positionFromMessage('no place named', null)).toBeNull()
  })
  it('reads positions given as data', () => {
    expect(positionsFromData({ at: [-95.2, 41.5] })).toEqual([[-95.2, 41.5]])
    expect(positionsFromData({ points: [{ lonDeg: 1, latDeg: 2 }] })).toEqual([[1, 2]])
  })
})

describe('satellites from the orbit data', () => {
  it('takes each constellation from its source: nominal by name, a stored file parsed with its options', () => {
    const data: OrbitData = {
      sources: [
        { system: 'GPS', kind: 'set', orbitSetId: 7, name: 'GPS sample', format: 'tle', content: tle, parseOptions: {} },
        { system: 'Galileo', kind: 'nominal', nominal: 'galileo' },
      ],
      enabledSystems: ['GPS', 'Galileo'],
      outages: [],
      version: 'v1',
    }
    const built = satellitesFromOrbitData(data)
    const gps = built.satellites.filter((s) => s.system === 'GPS')
    const galileo = built.satellites.filter((s) => s.system === 'Galileo')
    expect(gps.map((s) => s.id)).toEqual(['90001', '90002', '90003'])
    expect(gps.every((s) => s.source === 'tle')).toBe(true)
    expect(galileo).toHaveLength(24)
    expect(galileo.every((s) => s.source === 'nominal')).toBe(true)
    expect(built.info.sources.map((s) => s.label)).toEqual(['GPS: GPS sample', 'Galileo nominal'])
    expect(built.info.fallback).toBeNull()
    expect(nominalName('nominal:gps', 'GPS')).toBe('gps')
    expect(nominalName(undefined, 'BeiDou')).toBe('beidou')
  })

  it('falls back to the four nominal constellations and says why', () => {
    const fallback = nominalFallback('offline')
    expect(fallback.info.fallback).toBe('offline')
    expect(fallback.satellites).toHaveLength(102)
  })

  it('gives the sky view a horizon cut from a drawn tree line, rising with its height', () => {
    const point = { latDeg: 41.5, lonDeg: -95.2 }
    // A north-south tree line 40 m east of the point.
    const dLon = 40 / (111_320 * Math.cos((point.latDeg * Math.PI) / 180))
    const line = (heightM: number) => ({
      type: 'FeatureCollection' as const,
      features: [
        {
          type: 'Feature' as const,
          properties: { heightM, kind: 'deciduous', leaflessFrom: null, leaflessTo: null },
          geometry: { type: 'LineString' as const, coordinates: [[point.lonDeg + dLon, point.latDeg - 0.002], [point.lonDeg + dLon, point.latDeg + 0.002]] },
        },
      ],
    })
    const satellites = nominalFallback('test').satellites
    const at = Date.UTC(2026, 11, 2, 12)
    const low = skyView({ point, atMs: at, satellites, obstructions: line(10), antennaHeightM: 3.5 })
    const high = skyView({ point, atMs: at, satellites, obstructions: line(30), antennaHeightM: 3.5 })
    const lowPeak = horizonPeak(low.horizonMaskDeg)!
    const highPeak = horizonPeak(high.horizonMaskDeg)!
    expect(compassPoint(lowPeak.azimuthDeg)).toBe('E')
    // atan((h - antenna) / d) due east.
    expect(lowPeak.elevationDeg).toBeCloseTo((Math.atan(6.5 / 40) * 180) / Math.PI, 0)
    expect(highPeak.elevationDeg).toBeCloseTo((Math.atan(26.5 / 40) * 180) / Math.PI, 0)
    const hidden = (v: typeof low) => v.satellites.filter((s) => s.status === 'behind-obstruction').length
    expect(hidden(high)).toBeGreaterThanOrEqual(hidden(low))
  })
})

describe('the sky check’s error budget', () => {
  const rtk: ServiceLevel = { id: 3, name: 'RTK', sigmaUereM: 0.012, note: '', ppmH: 1, ppmV: 1, maxBaselineKm: 30, needsBase: true }
  const link = { kind: 'base' as const, id: 1, name: 'Yard base', baselineKm: 12, farthestKm: 12.4, reachable: true, baselineKnown: true }
  const at = Date.UTC(2026, 11, 3, 10, 20)
  const block = (startH: number, kp: number) => ({
    start: new Date(Date.UTC(2026, 11, 3, startH)).toISOString(),
    end: new Date(Date.UTC(2026, 11, 3, startH + 3)).toISOString(),
    kp,
    g: 0,
    observed: false,
  })
  const feed = (state: 'current' | 'stale' | 'none', lastOkAt: string | null) => ({ state, lastOkAt, blocks: [block(9, 2.33)] })

  it('adds the baseline part to the geometry: H95 = 2 (HDOP sigma + ppm b), V95 = 1.96 (VDOP sigma + ppm b)', () => {
    const b = skyErrorBudget({ hdop: 0.9, vdop: 1.5 }, rtk, link, feed('current', '2026-12-03T06:00:00.000Z'), at, [])
    // errorModel.ts: 2 x 0.9 x 0.012 = 0.0216; 2 x 1 mm/km x 12 km = 0.024; 1.96 x 1.5 x 0.012 = 0.03528; 1.96 x 12 mm = 0.02352.
    expect(b.geometryH95M).toBeCloseTo(0.0216, 12)
    expect(b.baselineH95M).toBeCloseTo(0.024, 12)
    expect(b.h95M).toBeCloseTo(0.0456, 12)
    expect(b.geometryV95M).toBeCloseTo(0.03528, 12)
    expect(b.v95M).toBeCloseTo(0.03528 + 0.02352, 12)
    expect(b.spaceWeather).toEqual({ kpMax: 2.33, g: 0 })
    expect(b.spaceWeatherFeed).toEqual({ state: 'current', lastOkAt: '2026-12-03T06:00:00.000Z' })
  })

  it('carries a stale feed as stale with its last read, and no feed at all as none: storms unknown, never quiet', () => {
    const stale = skyErrorBudget({ hdop: 0.9, vdop: 1.5 }, rtk, link, feed('stale', '2026-12-01T06:00:00.000Z'), at, [])
    expect(stale.spaceWeatherFeed).toEqual({ state: 'stale', lastOkAt: '2026-12-01T06:00:00.000Z' })
    const missing = skyErrorBudget({ hdop: 0.9, vdop: 1.5 }, rtk, link, null, at, [])
    expect(missing.spaceWeather).toBeNull()
    expect(missing.spaceWeatherFeed).toEqual({ state: 'none', lastOkAt: null })
  })
})
