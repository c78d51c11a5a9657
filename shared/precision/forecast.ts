/**
 * Field forecast (ENGINE.md step 9): sample points across the field, positions of all
 * satellites once per epoch (propagation.ts), a horizon mask per point from the
 * obstructions (horizon.ts), the hot loop of visibility, DOP and N-1 margin (kernel.ts)
 * and the hourly aggregates with the work-type shares and states (aggregate.ts).
 * Point forecasts and the sky view are in sky.ts.
 */
import type { FeatureCollection } from 'geojson'
import { aggregateHour, pointDetails, workTests, type Aggregation } from './aggregate'
import { applyHourCorrections } from './correction'
import { DEG } from './constants'
import type { DopWeights } from './dop'
import { enuBasis, geodeticToEcef } from './geodesy'
import { horizonMaskInto, isLeafless, readObstructions, type ObstructionShape } from './horizon'
import { evaluateSamples, type SampleResults } from './kernel'
import type { Satellite } from './orbits/types'
import { satellitePositions, type PropagationOptions } from './propagation'
import { fieldSamplePoints, type FieldGeometry, type SamplePoint } from './sampling'
import { GNSS_SYSTEMS, type GnssSystem } from './systems'
import type { HourReason } from './correction'
import type { LinkReason } from './errorModel'
import type { KpBlock, StormAction } from './spaceWeather'

export { hourState } from './aggregate'

/** A satellite out of service over [fromMs, toMs). */
export interface Outage {
  satId: string
  fromMs: number
  toMs: number
}

/** Thresholds of a kind of work. */
export interface WorkType {
  id: string
  /** maximum horizontal error at 95 % (m) */
  maxH95M: number
  /** maximum vertical error at 95 % (m); null when the work has no vertical need */
  maxV95M: number | null
  minSats: number
  maxPdop: number
  /** share of the field (0..1) that must meet the thresholds */
  requiredShare: number
  /** whether the thresholds must also hold with one satellite lost */
  requireN1: boolean
  /** sigma_UERE of this work's correction service (m); defaults to the forecast's */
  sigmaUereM?: number
  /** baseline part ppm_H b of this work's service on this field (m, errorModel.ts); default 0 */
  baselineHM?: number
  /** baseline part ppm_V b (m); default 0 */
  baselineVM?: number
  /** set when the field's correction link rules the work out (out of range, past the baseline limit) */
  closedReason?: LinkReason | null
  /** what a G3-or-worse hour does to this work (spaceWeather.ts); default 'none' */
  stormAction?: StormAction
}

/** The state of an hour for a work type. */
export type HourState = 'clear' | 'tight' | 'closed'

/** Settings shared by the forecasts. */
export interface SkySettings {
  /** satellites (from parseOrbitFile and/or nominalConstellation) */
  satellites: readonly Satellite[]
  /** elevation mask (deg), default 10 */
  maskDeg?: number
  /** constellations to use; default all present */
  systems?: readonly GnssSystem[]
  /** observation weights, default 'none' */
  weights?: DopWeights
  outages?: readonly Outage[]
  /** obstructions: LineString/Polygon features with properties heightM, kind, leaflessFrom/To */
  obstructions?: FeatureCollection | null
  /** antenna height above ground (m), default 0 */
  antennaHeightM?: number
  /** how to propagate SGP4 satellites */
  propagation?: PropagationOptions
}

/** Input of `forecastField`. */
export interface FieldForecastInput extends SkySettings {
  /** field boundary: Polygon / MultiPolygon (holes respected) or a Feature of one */
  field: FieldGeometry
  /** first epoch, UTC ms */
  startMs: number
  hours: number
  /** minutes between epochs, default 5 */
  stepMin?: number
  /** ellipsoidal height of the ground (m), default 0 */
  heightM?: number
  /** ranging sigma of the field's correction service (m) */
  sigmaUereM: number
  /** baseline parts ppm b of the field's own service (m) for the hours' expected errors; default 0 */
  baselineHM?: number
  baselineVM?: number
  /** Kp forecast blocks; hours they cover carry their space weather */
  kpBlocks?: readonly KpBlock[]
  workTypes?: readonly WorkType[]
  /** about this many sample points, default 64 */
  sampleCount?: number
  /** also return per-sample-point values for the clock hour starting at this UTC ms */
  detailHourMs?: number
  /** also return the raw per-sample values (typed arrays, transferable) */
  includeSamples?: boolean
}

/**
 * Raw per-sample values, index epoch * points + point. hdop/vdop/pdop are NaN without
 * a fix; n1* are the worst values with one satellite lost, Infinity when that can
 * lose the fix, NaN without a fix.
 */
export interface SampleArrays {
  epochsMs: Float64Array
  points: number
  satellites: Uint16Array
  hdop: Float64Array
  vdop: Float64Array
  pdop: Float64Array
  n1Hdop: Float64Array
  n1Vdop: Float64Array
  n1Pdop: Float64Array
}

/** A median and a maximum. */
export interface MedianMax {
  median: number | null
  max: number | null
}

/** Aggregates of one clock hour (UTC). */
export interface HourAggregate {
  /** start of the clock hour, ISO 8601 UTC */
  time: string
  startMs: number
  /** point-epoch samples in the hour */
  samples: number
  /** area-and-time-weighted share of samples without a fix */
  noFixShare: number
  /** satellites in use */
  satellites: { min: number; median: number }
  /** over samples with a fix; the median counts no-fix samples as worst (null if they are half or more) */
  hdop: MedianMax
  vdop: MedianMax
  pdopMax: number | null
  /** worst HDOP with the most damaging satellite lost; null when losing one satellite loses the fix somewhere */
  n1HdopMax: number | null
  /** expected horizontal / vertical error at 95 % for sigmaUereM (m) */
  h95M: MedianMax
  v95M: MedianMax
  workTypes: Array<{ id: string; share: number; shareN1: number; state: HourState; reason?: HourReason }>
  /** highest Kp over the hour and its G level; null when no Kp block covers it (absent when no Kp data was given) */
  spaceWeather?: { kpMax: number; g: number } | null
}

/** Per-sample-point values over one hour (for a map of the field). */
export interface PointHourDetail extends SamplePoint {
  satellitesMin: number
  hdopMax: number | null
  vdopMax: number | null
  pdopMax: number | null
  n1HdopMax: number | null
  h95MaxM: number | null
  v95MaxM: number | null
  noFixShare: number
  /** highest elevation the obstructions block around this point (deg) */
  horizonMaxDeg: number
  workTypes: Array<{ id: string; share: number; shareN1: number }>
}

/** Wall time of each stage (ms), measured only when a clock is passed in. */
export interface StageTimes {
  propagationMs: number
  masksMs: number
  dopMs: number
  aggregationMs: number
}

/** Result of `forecastField`: plain data, structured-clone friendly. */
export interface FieldForecast {
  hours: HourAggregate[]
  samplePoints: SamplePoint[]
  areaM2: number
  epochs: number
  satellitesUsed: number
  detail?: { hourStartMs: number; points: PointHourDetail[] }
  /** satellite-point evaluations (epochs x points x satellites) */
  evaluations: number
  samples?: SampleArrays
  stageTimes?: StageTimes
}

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

/** Per-sample results of the hot loop. */

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
    stageTimes: now ? { propagationMs: t1 - t0, masksMs: t2 - t1, dopMs: t3 - t2, aggregationMs: t4 - t3 } : undefined,
  }
}

/** Working state of the hourly aggregation. */
