/**
 * Field forecast (ENGINE.md step 9): sample points across the field, positions of all
 * satellites once per epoch (propagation.ts), a horizon mask per point from the
 * obstructions (horizon.ts), the hot loop of visibility, DOP and N-1 margin (kernel.ts)
 * and the hourly aggregates with the work-type shares and states (aggregate.ts).
 * Point forecasts and the sky view are in sky.ts.
 *
 * Sources: each stage names its own in its module (propagation: satellite.js SGP4 and
 * IS-GPS-200 Table 20-IV; geometry: IOGP 373-7-2; DOP: Kaplan & Hegarty; foliage: Vogel &
 * Goldhirsh 1986). Grouping the epochs by the set of obstructions in leaf (one mask per
 * set and point, not per epoch) and the hourly clock-hour bins are the engine's own.
 */
import { aggregateHour, pointDetails, workTests, type Aggregation } from './aggregate'
import { applyHourCorrections } from './correction'
import { DEG } from './constants'
import { enuBasis, geodeticToEcef } from './geodesy'
import { horizonMaskInto, isLeafless, readObstructions, type ObstructionShape } from './horizon'
import { evaluateSamples, type SampleResults } from './kernel'
import type { Satellite } from './orbits/types'
import { satellitePositions } from './propagation'
import { fieldSamplePoints } from './sampling'
import { GNSS_SYSTEMS } from './systems'
import { combineHorizonInto, terrainHorizons } from './terrain'
import type { FieldForecast, FieldForecastInput, HourAggregate, Outage, SkySettings } from './types'
import type { SamplePoint } from './sampling'

export { hourState } from './aggregate'
export type * from './types'

export const HOUR_MS = 3_600_000

export function selectSatellites(s: SkySettings): Satellite[] {
  const systems = s.systems && s.systems.length > 0 ? new Set(s.systems) : null
  return s.satellites.filter((x) => x.healthy && (!systems || systems.has(x.system)))
}

export function checkCommon(maskDeg: number, stepMin: number, hours: number, startMs: number): void {
  if (!Number.isFinite(startMs)) throw new Error('start must be a UTC time in ms')
  if (!(hours > 0) || hours > 24 * 31) throw new Error('hours must be > 0 and at most 744')
  if (!(stepMin > 0) || stepMin > 60) throw new Error('step must be > 0 and at most 60 minutes')
  if (!(maskDeg >= 0 && maskDeg < 90)) throw new Error('elevation mask must be in [0, 90) degrees')
}

export function epochList(startMs: number, hours: number, stepMin: number): Float64Array {
  const stepMs = stepMin * 60_000
  const n = Math.max(1, Math.floor((hours * HOUR_MS - 1e-6) / stepMs) + 1)
  const out = new Float64Array(n)
  for (let i = 0; i < n; i++) out[i] = startMs + i * stepMs
  return out
}

/** Per-epoch 0/1 flags of satellites under an outage: index e * nSat + s. */
export function outageFlags(sats: readonly Satellite[], epochs: Float64Array, outages: readonly Outage[] | undefined): Uint8Array {
  const nSat = sats.length
  const flags = new Uint8Array(epochs.length * nSat)
  if (!outages || outages.length === 0) return flags
  const index = new Map<string, number[]>()
  sats.forEach((s, i) => index.set(s.id, [...(index.get(s.id) ?? []), i]))
  for (const o of outages) {
    const list = index.get(o.satId)
    if (!list) continue
    for (let e = 0; e < epochs.length; e++) {
      if (epochs[e] >= o.fromMs && epochs[e] < o.toMs) for (const i of list) flags[e * nSat + i] = 1
    }
  }
  return flags
}

/** Groups epochs by the set of obstructions in leaf; returns set index per epoch and the sets. */
function foliageSets(shapes: readonly ObstructionShape[], epochs: Float64Array): { setOfEpoch: Uint16Array; sets: number[][] } {
  const setOfEpoch = new Uint16Array(epochs.length)
  const keys = new Map<string, number>()
  const sets: number[][] = []
  let lastDay = NaN
  let lastSet = 0
  for (let e = 0; e < epochs.length; e++) {
    const day = Math.floor(epochs[e] / 86_400_000)
    if (day !== lastDay) {
      const active = shapes.filter((o) => !isLeafless(o, epochs[e])).map((o) => o.index)
      const key = active.join(',')
      let k = keys.get(key)
      if (k === undefined) {
        k = sets.length
        keys.set(key, k)
        sets.push(active)
      }
      lastSet = k
      lastDay = day
    }
    setOfEpoch[e] = lastSet
  }
  return { setOfEpoch, sets }
}

/** Terrain horizons of the sample points (index point * 360 + k): the precomputed ones when they fit, else from the grid. */
function fieldTerrain(input: SkySettings, points: readonly SamplePoint[], antennaHeightM: number): Float64Array | null {
  const t = input.terrain
  if (!t) return null
  if (t.pointHorizonsDeg && t.pointHorizonsDeg.length === points.length * 360) return Float64Array.from(t.pointHorizonsDeg)
  if (!t.grid) return null
  return terrainHorizons(t.grid, points, antennaHeightM, t.options)
}

/**
 * The terrain horizons of a field's sample points, computed once so that a forecast run in
 * chunks of hours (the job worker) reuses them: pass the result as terrain.pointHorizonsDeg.
 * Null without a terrain grid.
 *
 * @example
 * const pointHorizonsDeg = fieldTerrainHorizons(input)
 * forecastField({ ...input, terrain: { ...input.terrain, pointHorizonsDeg } })
 */
export function fieldTerrainHorizons(input: FieldForecastInput): Float64Array | null {
  if (!input.terrain?.grid) return null
  const antennaHeightM = input.antennaHeightM ?? 0
  const { points } = fieldSamplePoints(input.field, readObstructions(input.obstructions), {
    count: input.sampleCount ?? 64,
    antennaHeightM,
    maskDeg: input.maskDeg ?? 10,
  })
  return terrainHorizons(input.terrain.grid, points, antennaHeightM, input.terrain.options)
}

/**
 * Forecast of a field: sample points across the polygon, epochs every `stepMin`
 * minutes, aggregated per clock hour (UTC), with the share of the field meeting each
 * work type and the hour's state. Pure: all inputs are data, the result is plain data.
 * `now` is only used to time the stages (pass `performance.now`), never for results.
 *
 * @example
 * const result = forecastField({
 *   field: { type: 'Polygon', coordinates: [[[5.0, 52.0], [5.006, 52.0], [5.006, 52.004], [5.0, 52.004], [5.0, 52.0]]] },
 *   obstructions: treeLines,             // FeatureCollection, properties.heightM
 *   antennaHeightM: 3.5,
 *   satellites: nominalConstellation('all'),
 *   startMs: Date.UTC(2026, 11, 7), hours: 168, stepMin: 5, maskDeg: 10,
 *   sigmaUereM: 0.012, workTypes: DEMO_WORK_TYPES,
 * })
 * result.hours[0].workTypes // -> [{ id: 'planting', share: 1, shareN1: 0.97, state: 'clear' }, ...]
 */
export function forecastField(input: FieldForecastInput, now?: () => number): FieldForecast {
  const clock = now ?? (() => 0)
  const maskDeg = input.maskDeg ?? 10
  const stepMin = input.stepMin ?? 5
  checkCommon(maskDeg, stepMin, input.hours, input.startMs)
  if (!(input.sigmaUereM > 0)) throw new Error('sigmaUereM must be > 0')
  const antennaHeightM = input.antennaHeightM ?? 0
  const sats = selectSatellites(input)
  const nSat = sats.length
  const epochs = epochList(input.startMs, input.hours, stepMin)
  const nEp = epochs.length

  const t0 = clock()
  const positions = satellitePositions(sats, epochs, input.propagation)
  const t1 = clock()

  const shapes = readObstructions(input.obstructions)
  const { points, areaM2 } = fieldSamplePoints(input.field, shapes, {
    count: input.sampleCount ?? 64,
    antennaHeightM,
    maskDeg,
  })
  const nPts = points.length
  const pointEcef = new Float64Array(nPts * 3)
  const basis = new Float64Array(nPts * 9)
  const heightM = (input.heightM ?? 0) + antennaHeightM
  points.forEach((p, i) => {
    pointEcef.set(geodeticToEcef({ latDeg: p.latDeg, lonDeg: p.lonDeg, heightM }), 3 * i)
    basis.set(enuBasis(p.latDeg, p.lonDeg), 9 * i)
  })
  const tTerrain = clock()
  const terrainDeg = fieldTerrain(input, points, antennaHeightM)
  const terrainMs = clock() - tTerrain
  const { setOfEpoch, sets } = foliageSets(shapes, epochs)
  const maskSin: Float64Array[] = []
  const maskMaxSin: Float64Array[] = []
  const maskDegBuf = new Float64Array(360)
  const horizonMax: Float64Array[] = []
  for (const set of sets) {
    const active = shapes.filter((o) => set.includes(o.index))
    const sinArr = new Float64Array(nPts * 360)
    const maxArr = new Float64Array(nPts)
    const maxDeg = new Float64Array(nPts)
    for (let p = 0; p < nPts; p++) {
      horizonMaskInto(maskDegBuf, points[p], active, antennaHeightM)
      if (terrainDeg) combineHorizonInto(maskDegBuf, terrainDeg, p * 360)
      let mx = 0
      for (let k = 0; k < 360; k++) {
        sinArr[p * 360 + k] = Math.sin(maskDegBuf[k] * DEG)
        if (maskDegBuf[k] > mx) mx = maskDegBuf[k]
      }
      maxDeg[p] = mx
      maxArr[p] = Math.sin(mx * DEG)
    }
    maskSin.push(sinArr)
    maskMaxSin.push(maxArr)
    horizonMax.push(maxDeg)
  }
  const t2 = clock()

  const sysOf = new Uint8Array(nSat)
  sats.forEach((s, i) => (sysOf[i] = GNSS_SYSTEMS.indexOf(s.system)))
  const offFlags = outageFlags(sats, epochs, input.outages)
  const nSamples = nEp * nPts
  const r: SampleResults = {
    nSats: new Uint16Array(nSamples),
    hdop: new Float64Array(nSamples),
    vdop: new Float64Array(nSamples),
    pdop: new Float64Array(nSamples),
    n1h: new Float64Array(nSamples),
    n1v: new Float64Array(nSamples),
    n1p: new Float64Array(nSamples),
  }
  evaluateSamples(positions, nSat, sysOf, offFlags, nEp, pointEcef, basis, maskSin, maskMaxSin, setOfEpoch, maskDeg, input.weights === 'elevation', r)
  const t3 = clock()

  // Hourly aggregation.
  const tests = workTests(input.workTypes, input.sigmaUereM)
  const sigma = input.sigmaUereM
  const areaW = new Float64Array(nPts)
  const totalArea = points.reduce((a, p) => a + p.weightM2, 0)
  points.forEach((p, i) => (areaW[i] = p.weightM2 / totalArea))
  const hours: HourAggregate[] = []
  const maxPerHour = Math.ceil(60 / stepMin + 1) * nPts
  const vals = new Float64Array(maxPerHour)
  const wts = new Float64Array(maxPerHour)
  const satHist = new Float64Array(nSat + 2)
  const met = new Float64Array(tests.length)
  const metN1 = new Float64Array(tests.length)
  let detail: FieldForecast['detail']
  const rSats = r.nSats
  const rH = r.hdop
  const rV = r.vdop
  const rP = r.pdop
  const rN1h = r.n1h
  const rN1v = r.n1v
  const rN1p = r.n1p
  const nTests = tests.length
  const tMaxH = Float64Array.from(tests, (t) => t.maxH)
  const tMaxV = Float64Array.from(tests, (t) => t.maxV)
  const tMaxP = Float64Array.from(tests, (t) => t.maxPdop)
  const tMinSats = Float64Array.from(tests, (t) => t.minSats)
  const agg: Aggregation = { nPts, areaW, rSats, rH, rV, rP, rN1h, rN1v, rN1p, tests, nTests, tMaxH, tMaxV, tMaxP, tMinSats, vals, wts, satHist, met, metN1, sigma, baselineHM: input.baselineHM ?? 0, baselineVM: input.baselineVM ?? 0, stats: new Float64Array(7) }
  let e0 = 0
  while (e0 < nEp) {
    const hourStart = Math.floor(epochs[e0] / HOUR_MS) * HOUR_MS
    let e1 = e0
    while (e1 < nEp && epochs[e1] < hourStart + HOUR_MS) e1++
    hours.push(applyHourCorrections(aggregateHour(agg, e0, e1, hourStart), input.workTypes, input.kpBlocks))
    if (input.detailHourMs !== undefined && Math.floor(input.detailHourMs / HOUR_MS) * HOUR_MS === hourStart) {
      detail = { hourStartMs: hourStart, points: pointDetails(points, r, e0, e1, nPts, tests, sigma, horizonMax[setOfEpoch[e0]], agg) }
    }
    e0 = e1
  }
  const t4 = clock()
  return {
    hours,
    samplePoints: points,
    areaM2,
    epochs: nEp,
    satellitesUsed: nSat,
    detail,
    evaluations: nEp * nPts * nSat,
    samples: input.includeSamples
      ? { epochsMs: epochs, points: nPts, satellites: r.nSats, hdop: r.hdop, vdop: r.vdop, pdop: r.pdop, n1Hdop: r.n1h, n1Vdop: r.n1v, n1Pdop: r.n1p }
      : undefined,
    stageTimes: now ? { propagationMs: t1 - t0, masksMs: t2 - t1, dopMs: t3 - t2, aggregationMs: t4 - t3, terrainMs } : undefined,
  }
}
