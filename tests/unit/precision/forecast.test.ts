import type { FeatureCollection, Polygon } from 'geojson'
import { describe, expect, it } from 'vitest'
import {
  dopFromDirections,
  forecastField,
  forecastPoint,
  fromPlane,
  horizonMask,
  hourState,
  localPlane,
  lookAngles,
  nominalConstellation,
  satellitePositions,
  type WorkType,
} from '@shared/precision'

// An invented field near Ede (NL), 400 m x 300 m, a tree line on its north edge, a
// woodlot to the east and a barn to the south.
const plane = localPlane(52.03, 5.66)
const at = (x: number, y: number): [number, number] => {
  const p = fromPlane(plane, x, y)
  return [p.lonDeg, p.latDeg]
}
const FIELD: Polygon = { type: 'Polygon', coordinates: [[at(0, 0), at(400, 0), at(400, 300), at(0, 300), at(0, 0)]] }
const OBSTRUCTIONS: FeatureCollection = {
  type: 'FeatureCollection',
  features: [
    { type: 'Feature', properties: { heightM: 22, kind: 'evergreen' }, geometry: { type: 'LineString', coordinates: [at(-20, 310), at(420, 310)] } },
    {
      type: 'Feature',
      properties: { heightM: 25, kind: 'deciduous', leaflessFrom: '11-20', leaflessTo: '04-05' },
      geometry: { type: 'Polygon', coordinates: [[at(410, 50), at(480, 50), at(480, 200), at(410, 200), at(410, 50)]] },
    },
    { type: 'Feature', properties: { heightM: 9, kind: 'structure' }, geometry: { type: 'Polygon', coordinates: [[at(150, -30), at(200, -30), at(200, -10), at(150, -10), at(150, -30)]] } },
  ],
}
const ANTENNA_M = 3.5
const MASK_DEG = 10

describe('field forecast hot loop against the plain per-satellite pipeline', () => {
  it('DOP and N-1 margin of every sample equal dopFromDirections with brute-force removal (1e-9)', () => {
    // Independent path: look angles per satellite (geodesy.lookAngles), the horizon mask
    // from the contract function, dopFromDirections (full Cholesky) and N-1 by removing
    // each satellite in turn.
    const sats = nominalConstellation('all')
    const startMs = Date.UTC(2026, 6, 14, 9)
    const r = forecastField({
      field: FIELD, obstructions: OBSTRUCTIONS, antennaHeightM: ANTENNA_M, satellites: sats,
      startMs, hours: 1, stepMin: 20, maskDeg: MASK_DEG, sigmaUereM: 0.012, sampleCount: 16, includeSamples: true,
      outages: [{ satId: 'GA1', fromMs: startMs, toMs: startMs + 1_800_000 }],
    })
    const s = r.samples!
    const epochs = Array.from(s.epochsMs)
    const pos = satellitePositions(sats, epochs)
    let checked = 0
    r.samplePoints.forEach((pt, p) => {
      const mask = horizonMask(pt, OBSTRUCTIONS, ANTENNA_M, { atMs: startMs })
      const here = { latDeg: pt.latDeg, lonDeg: pt.lonDeg, heightM: ANTENNA_M }
      epochs.forEach((t, e) => {
        const dirs: Array<{ azimuthDeg: number; elevationDeg: number; system: string }> = []
        sats.forEach((sat, i) => {
          if (sat.id === 'GA1' && t < startMs + 1_800_000) return
          const la = lookAngles(here, [pos[(e * sats.length + i) * 3], pos[(e * sats.length + i) * 3 + 1], pos[(e * sats.length + i) * 3 + 2]])
          if (la.elevationDeg < MASK_DEG || la.elevationDeg < mask[Math.floor(la.azimuthDeg)]) return
          dirs.push({ azimuthDeg: la.azimuthDeg, elevationDeg: la.elevationDeg, system: sat.system })
        })
        const idx = e * s.points + p
        expect(s.satellites[idx]).toBe(dirs.length)
        const d = dopFromDirections(dirs)!
        expect(Math.abs(s.hdop[idx] - d.hdop)).toBeLessThan(1e-9)
        expect(Math.abs(s.vdop[idx] - d.vdop)).toBeLessThan(1e-9)
        expect(Math.abs(s.pdop[idx] - d.pdop)).toBeLessThan(1e-9)
        let h = 0
        let v = 0
        let pd = 0
        dirs.forEach((_, j) => {
          const dj = dopFromDirections(dirs.filter((__, k) => k !== j))!
          h = Math.max(h, dj.hdop)
          v = Math.max(v, dj.vdop)
          pd = Math.max(pd, dj.pdop)
        })
        expect(Math.abs(s.n1Hdop[idx] - h)).toBeLessThan(1e-9)
        expect(Math.abs(s.n1Vdop[idx] - v)).toBeLessThan(1e-9)
        expect(Math.abs(s.n1Pdop[idx] - pd)).toBeLessThan(1e-9)
        checked++
      })
    })
    expect(checked).toBe(16 * 3)
    // The trees matter: some sample point sees fewer satellites than the open middle.
    expect(Math.min(...s.satellites)).toBeLessThan(Math.max(...s.satellites))
  })

  it('elevation weights: the hot loop equals dopFromDirections with weights too', () => {
    const sats = nominalConstellation('gps')
    const startMs = Date.UTC(2026, 2, 3, 17)
    const r = forecastField({
      field: FIELD, obstructions: OBSTRUCTIONS, antennaHeightM: ANTENNA_M, satellites: sats, weights: 'elevation',
      startMs, hours: 1, stepMin: 30, maskDeg: 5, sigmaUereM: 3, sampleCount: 6, includeSamples: true,
    })
    const s = r.samples!
    r.samplePoints.forEach((pt, p) => {
      const pf = forecastPoint({
        point: { latDeg: pt.latDeg, lonDeg: pt.lonDeg }, satellites: sats, weights: 'elevation', obstructions: OBSTRUCTIONS,
        antennaHeightM: ANTENNA_M, startMs, hours: 1, stepMin: 30, maskDeg: 5,
      })
      pf.forEach((rec, e) => {
        const idx = e * s.points + p
        expect(s.satellites[idx]).toBe(rec.satellites)
        if (rec.hdop === null) expect(s.hdop[idx]).toBeNaN()
        else expect(Math.abs(s.hdop[idx] - rec.hdop)).toBeLessThan(5.1e-5) // point records are rounded to 4 decimals
      })
    })
  })
})

describe('sample points', () => {
  it('weights add up to the field area, points lie inside, denser near the tree line', () => {
    const r = forecastField({
      field: FIELD, obstructions: OBSTRUCTIONS, antennaHeightM: ANTENNA_M, satellites: nominalConstellation('gps'),
      startMs: Date.UTC(2026, 6, 1), hours: 1, sigmaUereM: 1,
    })
    expect(r.samplePoints).toHaveLength(64)
    // Shoelace area of the 400 m x 300 m rectangle: 120000 m^2 (geometry).
    expect(r.areaM2).toBeCloseTo(120_000, -1)
    const total = r.samplePoints.reduce((a, p) => a + p.weightM2, 0)
    expect(total).toBeCloseTo(r.areaM2, 3)
    const near = r.samplePoints.filter((p) => (p.obstructionDistanceM ?? Infinity) < 60)
    const nearArea = near.reduce((a, p) => a + p.weightM2, 0) / total
    // More points than their area share near obstructions (the design asks for density there).
    expect(near.length / r.samplePoints.length).toBeGreaterThan(nearArea)
  })

  it('respects holes: no sample point falls in a hole', () => {
    const withHole: Polygon = { type: 'Polygon', coordinates: [FIELD.coordinates[0], [at(100, 100), at(100, 200), at(300, 200), at(300, 100), at(100, 100)]] }
    const r = forecastField({ field: withHole, satellites: nominalConstellation('gps'), startMs: Date.UTC(2026, 6, 1), hours: 1, sigmaUereM: 1 })
    expect(r.areaM2).toBeCloseTo(120_000 - 20_000, -1)
    const pl = localPlane(52.03, 5.66)
    for (const p of r.samplePoints) {
      const x = (p.lonDeg - pl.lon0Deg) * pl.mPerDegLon
      const y = (p.latDeg - pl.lat0Deg) * pl.mPerDegLat
      expect(x > 100 && x < 300 && y > 100 && y < 200).toBe(false)
    }
  })
})

describe('hour state rule (DESIGN.md)', () => {
  // Clear: thresholds hold on >= the required share and, where required, with one
  // satellite lost; Tight: they hold on >= half the share or fail only the N-1 margin;
  // Closed otherwise.
  it('follows the rule at and around the boundaries', () => {
    expect(hourState(0.96, 0.95, 0.95, true)).toBe('clear')
    expect(hourState(1.0, 0.94, 0.95, true)).toBe('tight') // fails only the N-1 margin
    expect(hourState(0.5, 0.5, 0.95, true)).toBe('tight') // >= half the share
    expect(hourState(0.47, 0.47, 0.95, true)).toBe('closed')
    expect(hourState(0.8, 0.0, 0.8, false)).toBe('clear') // margin not required
  })

  it('a GPS-only RTK levelling job changes state through the day; the tree-line edge sees fewer satellites', () => {
    const levelling: WorkType = { id: 'levelling', maxH95M: 0.05, maxV95M: 0.035, minSats: 7, maxPdop: 3, requiredShare: 0.95, requireN1: true }
    const r = forecastField({
      field: FIELD, obstructions: OBSTRUCTIONS, antennaHeightM: ANTENNA_M, satellites: nominalConstellation('gps'),
      startMs: Date.UTC(2026, 6, 14), hours: 24, sigmaUereM: 0.012, workTypes: [levelling], includeSamples: true,
    })
    const states = new Set(r.hours.map((h) => h.workTypes[0].state))
    expect(states.size).toBeGreaterThan(1) // the state changes through the day
    for (const h of r.hours) {
      const w = h.workTypes[0]
      expect(w.shareN1).toBeLessThanOrEqual(w.share)
      expect(w.state).toBe(hourState(w.share, w.shareN1, 0.95, true))
    }
    // Points near the 22 m tree line see fewer satellites on average than open ones.
    const s = r.samples!
    const mean = (p: number) => {
      let sum = 0
      for (let e = 0; e < s.epochsMs.length; e++) sum += s.satellites[e * s.points + p]
      return sum / s.epochsMs.length
    }
    const byDist = r.samplePoints.map((pt, p) => ({ d: pt.obstructionDistanceM ?? Infinity, m: mean(p) })).sort((a, b) => a.d - b.d)
    const nearest = byDist.slice(0, 8).reduce((a, x) => a + x.m, 0) / 8
    const farthest = byDist.slice(-8).reduce((a, x) => a + x.m, 0) / 8
    expect(nearest).toBeLessThan(farthest)
  })

  it('an outage removes the satellite from use', () => {
    const sats = nominalConstellation('gps')
    const startMs = Date.UTC(2026, 6, 14, 12)
    const base = forecastPoint({ point: { latDeg: 52, lonDeg: 5.6 }, satellites: sats, startMs, hours: 1, stepMin: 30 })
    const victim = base[0].ids[0]
    const out = forecastPoint({ point: { latDeg: 52, lonDeg: 5.6 }, satellites: sats, startMs, hours: 1, stepMin: 30, outages: [{ satId: victim, fromMs: startMs, toMs: startMs + 60_000 }] })
    expect(out[0].ids).not.toContain(victim)
    expect(out[0].satellites).toBe(base[0].satellites - 1)
    expect(out[1].ids).toEqual(base[1].ids) // outage over
  })
})
