// The satellite positions shared by the fields of a run (server/jobs/positionCache.ts):
// a field computed with positions another field propagated gets exactly the hours it gets
// when it propagates its own, and another orbit data set or window never reuses them.
import { describe, expect, it } from 'vitest'
import { nominalConstellation } from '../../../shared/precision/index.ts'
import { satellitePositions } from '../../../shared/precision/propagation.ts'
import { engineTask } from '../../../server/forecast/inputs.ts'
import { runEngineTask } from '../../../server/jobs/engineWorker.ts'
import { PositionMemo } from '../../../server/jobs/positionCache.ts'

const H = 3_600_000
const start = Date.UTC(2026, 11, 7)

function field(id: number, lon: number, lat: number) {
  const boundary = JSON.stringify({
    type: 'Polygon',
    coordinates: [[[lon, lat], [lon + 0.005, lat], [lon + 0.005, lat + 0.0027], [lon, lat + 0.0027], [lon, lat]]],
  })
  return { id, revision: 1, boundary, antennaHeightM: 3.5, sigmaUereM: 0.012 }
}

function task(f: ReturnType<typeof field>, satellites = [...nominalConstellation('gps'), ...nominalConstellation('galileo')], windowStartMs = start) {
  const t = engineTask({
    field: f,
    obstructions: [
      { id: 1, kind: 'evergreen', heightM: 14, geometry: JSON.stringify({ type: 'LineString', coordinates: [[-93.62, 42.033], [-93.6, 42.033]] }), leaflessFrom: null, leaflessTo: null },
    ],
    satellites,
    outages: [],
    workTypes: [{ id: 1, maxH95M: 0.05, maxV95M: null, minSats: 5, maxPdop: 4, requiredShare: 0.9, requireN1: true, sigmaUereM: 0.012 }],
    windowStartMs,
    windowHours: 24,
    settings: { stepMin: 10, sampleCount: 16, maskDeg: 10 },
  })
  t.chunkHours = 12
  return t
}

describe('shared satellite positions', () => {
  it('give a second field exactly the hours it gets propagating on its own, without propagating again', () => {
    const memo = new PositionMemo()
    const a = field(1, -93.62, 42.03)
    const b = field(2, -96.1, 41.2) // about 230 km away: another sky, the same satellites
    const first = runEngineTask(task(a), () => {}, memo)
    expect(memo.misses).toBe(2) // two 12-hour chunks propagated
    const second = runEngineTask(task(b), () => {}, memo)
    expect(memo.hits).toBe(2) // both chunks reused
    expect(memo.misses).toBe(2)
    expect(second.hours).toEqual(runEngineTask(task(b), () => {}, null).hours)
    expect(first.hours).toEqual(runEngineTask(task(a), () => {}, null).hours)
  })

  it('are not reused for other satellites or another window', () => {
    const memo = new PositionMemo()
    const a = field(1, -93.62, 42.03)
    runEngineTask(task(a), () => {}, memo)
    runEngineTask(task(a, nominalConstellation('gps')), () => {}, memo)
    runEngineTask(task(a, undefined, start + 24 * H), () => {}, memo)
    expect(memo.hits).toBe(0)
    expect(memo.misses).toBe(6)
  })

  it('hand back the positions computed for the same satellites and epochs, and keep at most the set size', () => {
    const memo = new PositionMemo(2)
    const sats = nominalConstellation('gps')
    const grids = [0, 1, 2].map((d) => Float64Array.from({ length: 12 }, (_, i) => start + d * 24 * H + i * 300_000))
    const direct = satellitePositions(sats, grids[0])
    const cached = satellitePositions(sats, grids[0], { cache: memo })
    expect(cached).toEqual(direct)
    expect(satellitePositions(sats, grids[0], { cache: memo })).toBe(cached)
    satellitePositions(sats, grids[1], { cache: memo })
    satellitePositions(sats, grids[2], { cache: memo })
    expect(memo.size).toBe(2)
  })
})
