import type { FeatureCollection } from 'geojson'
import { describe, expect, it } from 'vitest'
import { fromPlane, horizonMask, localPlane } from '@shared/precision'

const ORIGIN = { latDeg: 51.95, lonDeg: 4.91 }
const plane = localPlane(ORIGIN.latDeg, ORIGIN.lonDeg)
/** [lon, lat] of a point x m east and y m north of the origin. */
const at = (x: number, y: number): [number, number] => {
  const p = fromPlane(plane, x, y)
  return [p.lonDeg, p.latDeg]
}

function line(coords: Array<[number, number]>, heightM: number, extra: Record<string, unknown> = {}): FeatureCollection {
  return {
    type: 'FeatureCollection',
    features: [{ type: 'Feature', properties: { heightM, ...extra }, geometry: { type: 'LineString', coordinates: coords } }],
  }
}

const RAD = 180 / Math.PI

describe('horizon mask from obstructions', () => {
  it('20 m trees 50 m away block 18.8 deg for a 3 m antenna (geometry: atan((h - ha) / d))', () => {
    // REFERENCES.md, facts of the trade: atan((20 - 3) / 50) = 18.78 deg.
    const mask = horizonMask(ORIGIN, line([at(-200, 50), at(200, 50)], 20), 3)
    expect(mask).toHaveLength(360)
    // Bin [0, 1) contains the perpendicular foot (due north): the full 18.78 deg.
    expect(mask[0]).toBeCloseTo(Math.atan(17 / 50) * RAD, 6)
    expect(mask[0]).toBeCloseTo(18.8, 1)
    // Bin [45, 46): nearest point of the bin at 45 deg, d = 50 / cos 45.
    expect(mask[45]).toBeCloseTo(Math.atan(17 / (50 / Math.cos(Math.PI / 4))) * RAD, 6)
    // Bin [359, 360) reaches the foot at 360: full height.
    expect(mask[359]).toBeCloseTo(Math.atan(17 / 50) * RAD, 6)
    // The line spans azimuths -76..76 deg; the south is open.
    expect(mask[180]).toBe(0)
    expect(mask[90]).toBe(0)
    expect(mask[75]).toBeGreaterThan(0)
  })

  it('a polygon blocks with its nearest edge, and obstructions lower than the antenna do not block', () => {
    const wood: FeatureCollection = {
      type: 'FeatureCollection',
      features: [
        {
          type: 'Feature',
          properties: { heightM: 15 },
          geometry: { type: 'Polygon', coordinates: [[at(30, -20), at(80, -20), at(80, 20), at(30, 20), at(30, -20)]] },
        },
        { type: 'Feature', properties: { heightM: 2 }, geometry: { type: 'LineString', coordinates: [at(-50, -100), at(-50, 100)] } },
      ],
    }
    const mask = horizonMask(ORIGIN, wood, 3)
    // Due east (bin 90 = [90, 91)), nearest edge x = 30 m: atan(12 / 30).
    expect(mask[90]).toBeCloseTo(Math.atan(12 / 30) * RAD, 6)
    expect(mask[270]).toBe(0) // the 2 m hedge is below the 3 m antenna
  })

  it('the mask is the maximum over obstructions', () => {
    const fc: FeatureCollection = {
      type: 'FeatureCollection',
      features: [...line([at(-100, 40), at(100, 40)], 10).features, ...line([at(-100, 80), at(100, 80)], 30).features],
    }
    const mask = horizonMask(ORIGIN, fc, 0)
    expect(mask[0]).toBeCloseTo(Math.max(Math.atan(10 / 40), Math.atan(30 / 80)) * RAD, 6)
  })

  it('a leafless deciduous tree line does not block on its leafless dates only', () => {
    // Foliage blocks L-band strongly (Vogel & Goldhirsh 1986), so trees in leaf block.
    const fc = line([at(-200, 50), at(200, 50)], 20, { kind: 'deciduous', leaflessFrom: '11-15', leaflessTo: '04-10' })
    expect(horizonMask(ORIGIN, fc, 3, { atMs: Date.UTC(2026, 11, 20) })[0]).toBe(0)
    expect(horizonMask(ORIGIN, fc, 3, { atMs: Date.UTC(2027, 2, 1) })[0]).toBe(0)
    expect(horizonMask(ORIGIN, fc, 3, { atMs: Date.UTC(2026, 6, 1) })[0]).toBeCloseTo(18.78, 2)
    // Evergreens ignore leafless dates.
    const ever = line([at(-200, 50), at(200, 50)], 20, { kind: 'evergreen', leaflessFrom: '11-15', leaflessTo: '04-10' })
    expect(horizonMask(ORIGIN, ever, 3, { atMs: Date.UTC(2026, 11, 20) })[0]).toBeCloseTo(18.78, 2)
  })

  it('rejects an obstruction without a height, naming it', () => {
    const fc: FeatureCollection = {
      type: 'FeatureCollection',
      features: [{ type: 'Feature', id: 'east hedge', properties: {}, geometry: { type: 'LineString', coordinates: [at(0, 0), at(1, 1)] } }],
    }
    expect(() => horizonMask(ORIGIN, fc, 3)).toThrow(/obstruction 1 \(east hedge\).*heightM/)
  })
})
