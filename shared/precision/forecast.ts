/**
 * Field forecast, point forecast and sky view.
 *
 * Pipeline (ENGINE.md): positions of all satellites once per epoch (propagation.ts);
 * per sample point a horizon mask from the obstructions (horizon.ts); per point and
 * epoch the visible satellites (elevation mask, horizon mask, outages), the DOP with
 * one clock per constellation in view and its N-1 margin; hourly aggregates.
 *
 * The hot loop works on typed arrays and allocates nothing per sample:
 * - visibility: dot products with the point's up/east/north vectors; sin(el) is
 *   compared with sin(mask) before any trigonometry, and the azimuth (atan2) is only
 *   computed when the satellite is low enough for the point's horizon mask to matter;
 * - DOP: the normal matrix G^T W G is accumulated in place. Its clock block is
 *   diagonal (each satellite has one clock), so the clocks are eliminated exactly
 *   (Schur complement): S = A - sum_s b_s b_s^T / D_s, a 3x3 matrix inverted by
 *   Cholesky; Q_pos = S^-1 equals the position block of (G^T W G)^-1 (Golub & Van
 *   Loan, Matrix Computations, block inverse / Schur complement);
 * - N-1 margin: removing satellite j of system s lowers S by the rank-one term
 *   alpha v v^T with v = g_j - c_s (c_s the weighted mean direction of system s) and
 *   alpha = w_j D_s / (D_s - w_j) (weighted scatter downdate); Sherman-Morrison then
 *   gives Q' = Q + alpha Q v v^T Q / (1 - alpha v^T Q v). A satellite alone in its
 *   system leaves the position block unchanged (its clock absorbs it).
 * Work types: a sample meets a work type when it has a fix, at least minSats
 * satellites, PDOP <= maxPdop, 2 sigma HDOP <= maxH95M and, when given,
 * 1.96 sigma VDOP <= maxV95M; with the N-1 margin the same must hold with the most
 * damaging satellite lost (each figure's worst case over single removals).
 * State of an hour (DESIGN.md): Clear when the share meeting it (with N-1 where
 * required) is >= the required share; Tight when the share meeting it is >= half the
 * required share (this includes failing only the N-1 margin); Closed otherwise.
 */
import type { FeatureCollection } from 'geojson'
import { DEG, RAD } from './constants'
import { dopFromDirections, elevationWeight, type DopValues, type DopWeights } from './dop'
import { ecefToGeodetic, enuBasis, geodeticToEcef, type GeodeticPoint } from './geodesy'
import { horizonMaskInto, isLeafless, readObstructions, type ObstructionShape } from './horizon'
import type { Satellite } from './orbits/types'
import { satellitePositions, type PropagationOptions } from './propagation'
import { fieldSamplePoints, type FieldGeometry, type SamplePoint } from './sampling'
import { GNSS_SYSTEMS, type GnssSystem } from './systems'

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
  workTypes: Array<{ id: string; share: number; shareN1: number; state: HourState }>
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

const HOUR_MS = 3_600_000

function selectSatellites(s: SkySettings): Satellite[] {
  const systems = s.systems && s.systems.length > 0 ? new Set(s.systems) : null
  return s.satellites.filter((x) => x.healthy && (!systems || systems.has(x.system)))
}

function checkCommon(maskDeg: number, stepMin: number, hours: number, startMs: number): void {
  if (!Number.isFinite(startMs)) throw new Error('start must be a UTC time in ms')
  if (!(hours > 0) || hours > 24 * 31) throw new Error('hours must be > 0 and at most 744')
  if (!(stepMin > 0) || stepMin > 60) throw new Error('step must be > 0 and at most 60 minutes')
  if (!(maskDeg >= 0 && maskDeg < 90)) throw new Error('elevation mask must be in [0, 90) degrees')
}

function epochList(startMs: number, hours: number, stepMin: number): Float64Array {
  const stepMs = stepMin * 60_000
  const n = Math.max(1, Math.floor((hours * HOUR_MS - 1e-6) / stepMs) + 1)
  const out = new Float64Array(n)
  for (let i = 0; i < n; i++) out[i] = startMs + i * stepMs
  return out
}

/** Per-epoch 0/1 flags of satellites under an outage: index e * nSat + s. */
function outageFlags(sats: readonly Satellite[], epochs: Float64Array, outages: readonly Outage[] | undefined): Uint8Array {
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
interface SampleResults {
  nSats: Uint16Array
  hdop: Float64Array
  vdop: Float64Array
  pdop: Float64Array
  n1h: Float64Array
  n1v: Float64Array
  n1p: Float64Array
}

/**
 * The hot loop: for each epoch and point, visibility, DOP and N-1 margin.
 * Samples are indexed e * nPts + p. No-fix: hdop = NaN. N-1 losing the fix: Infinity.
 */
function evaluateSamples(
  positions: Float64Array,
  nSat: number,
  sysOf: Uint8Array,
  offFlags: Uint8Array,
  nEp: number,
  pointEcef: Float64Array,
  basis: Float64Array,
  maskSin: Float64Array[],
  maskMaxSin: Float64Array[],
  setOfEpoch: Uint16Array,
  maskDeg: number,
  weighted: boolean,
  out: SampleResults,
): void {
  const nPts = pointEcef.length / 3
  const sinMask = Math.sin(maskDeg * DEG)
  const sinMask2 = sinMask * sinMask
  const ge = new Float64Array(nSat)
  const gn = new Float64Array(nSat)
  const gu = new Float64Array(nSat)
  const gw = new Float64Array(nSat)
  const gs = new Uint8Array(nSat)
  const NS = GNSS_SYSTEMS.length
  const bx = new Float64Array(NS)
  const by = new Float64Array(NS)
  const bz = new Float64Array(NS)
  const dw = new Float64Array(NS)
  const cnt = new Int32Array(NS)
  const cx = new Float64Array(NS)
  const cy = new Float64Array(NS)
  const cz = new Float64Array(NS)
  // Prefilter per epoch at the centre of the points: a satellite more than `slackRad`
  // below the mask there is below it at every point (the direction to a satellite
  // turns by at most spread/range + spread/R_earth across the points).
  let mx = 0, my = 0, mz = 0
  for (let p = 0; p < nPts; p++) {
    mx += pointEcef[3 * p] / nPts
    my += pointEcef[3 * p + 1] / nPts
    mz += pointEcef[3 * p + 2] / nPts
  }
  let spread = 0
  for (let p = 0; p < nPts; p++) {
    spread = Math.max(spread, Math.hypot(pointEcef[3 * p] - mx, pointEcef[3 * p + 1] - my, pointEcef[3 * p + 2] - mz))
  }
  // Geodetic (not geocentric) up at the centre.
  const centre = ecefToGeodetic([mx, my, mz])
  const cb = enuBasis(centre.latDeg, centre.lonDeg)
  const cux = cb[6], cuy = cb[7], cuz = cb[8]
  // Any satellite above the horizon is more than 300 km away (even a low orbiter from
  // an uploaded element set); the bound is doubled and 1e-6 rad added for safety.
  const slackRad = 2 * (spread / 6.3e6 + spread / 3.0e5) + 1e-6
  const sinPre = Math.sin(Math.max(maskDeg * DEG - slackRad, -Math.PI / 2))
  const candidates = new Int32Array(nSat)
  const oSats = out.nSats
  const oH = out.hdop
  const oV = out.vdop
  const oP = out.pdop
  const oN1h = out.n1h
  const oN1v = out.n1v
  const oN1p = out.n1p
  const kernel: Kernel = { positions, nSat, sysOf, offFlags, nPts, basis, pointEcef, maskSin, maskMaxSin, setOfEpoch, weighted, sinMask2, ge, gn, gu, gw, gs, bx, by, bz, dw, cnt, cx, cy, cz, mx, my, mz, cux, cuy, cuz, sinPre, candidates, oSats, oH, oV, oP, oN1h, oN1v, oN1p, NS }
  // One call per epoch: the function gets optimised after a few epochs instead of
  // waiting for on-stack replacement of one long loop.
  for (let e = 0; e < nEp; e++) evaluateEpoch(kernel, e)
}

/** Working state of the hot loop (typed arrays and constants), built once per forecast. */
interface Kernel {
  positions: Float64Array
  nSat: number
  sysOf: Uint8Array
  offFlags: Uint8Array
  nPts: number
  basis: Float64Array
  pointEcef: Float64Array
  maskSin: Float64Array[]
  maskMaxSin: Float64Array[]
  setOfEpoch: Uint16Array
  weighted: boolean
  sinMask2: number
  ge: Float64Array
  gn: Float64Array
  gu: Float64Array
  gw: Float64Array
  gs: Uint8Array
  bx: Float64Array
  by: Float64Array
  bz: Float64Array
  dw: Float64Array
  cnt: Int32Array
  cx: Float64Array
  cy: Float64Array
  cz: Float64Array
  mx: number
  my: number
  mz: number
  cux: number
  cuy: number
  cuz: number
  sinPre: number
  candidates: Int32Array
  oSats: Uint16Array
  oH: Float64Array
  oV: Float64Array
  oP: Float64Array
  oN1h: Float64Array
  oN1v: Float64Array
  oN1p: Float64Array
  NS: number
}

/** Visibility, DOP and N-1 margin of every point at epoch e. */
function evaluateEpoch(k0: Kernel, e: number): void {
  const { positions, nSat, sysOf, offFlags, nPts, basis, pointEcef, maskSin, maskMaxSin, setOfEpoch, weighted, sinMask2, ge, gn, gu, gw, gs, bx, by, bz, dw, cnt, cx, cy, cz, mx, my, mz, cux, cuy, cuz, sinPre, candidates, oSats, oH, oV, oP, oN1h, oN1v, oN1p, NS } = k0
  const pos0 = e * nSat * 3
  const off0 = e * nSat
  const set = setOfEpoch[e]
  const mSin = maskSin[set]
  const mMax = maskMaxSin[set]
  let nCand = 0
  for (let s = 0; s < nSat; s++) {
    if (offFlags[off0 + s] !== 0) continue
    const o = pos0 + 3 * s
    const dx = positions[o] - mx
    const dy = positions[o + 1] - my
    const dz = positions[o + 2] - mz
    const up = cux * dx + cuy * dy + cuz * dz
    const r = Math.sqrt(dx * dx + dy * dy + dz * dz)
    if (up >= sinPre * r) candidates[nCand++] = s
  }
  for (let p = 0; p < nPts; p++) {
    const px = pointEcef[3 * p]
    const py = pointEcef[3 * p + 1]
    const pz = pointEcef[3 * p + 2]
    const b9 = 9 * p
    const ex = basis[b9]
    const ey = basis[b9 + 1]
    const nx = basis[b9 + 3]
    const ny = basis[b9 + 4]
    const nz = basis[b9 + 5]
    const ux = basis[b9 + 6]
    const uy = basis[b9 + 7]
    const uz = basis[b9 + 8]
    const maxSinH = mMax[p]
    const maskBase = p * 360
    let a00 = 0, a01 = 0, a02 = 0, a11 = 0, a12 = 0, a22 = 0
    cnt.fill(0)
    let nv = 0
    for (let c = 0; c < nCand; c++) {
      const s = candidates[c]
      const o = pos0 + 3 * s
      const dx = positions[o] - px
      const dy = positions[o + 1] - py
      const dz = positions[o + 2] - pz
      const up = ux * dx + uy * dy + uz * dz
      if (!(up > 0)) continue
      const r2 = dx * dx + dy * dy + dz * dz
      if (up * up < sinMask2 * r2) continue
      const inv = 1 / Math.sqrt(r2)
      const su = up * inv
      const le = (ex * dx + ey * dy) * inv
      const ln = (nx * dx + ny * dy + nz * dz) * inv
      if (su < maxSinH) {
        let az = Math.atan2(le, ln) * RAD
        if (az < 0) az += 360
        let bin = az | 0
        if (bin >= 360) bin = 359
        if (su < mSin[maskBase + bin]) continue
      }
      const w = weighted ? elevationWeight(su) : 1
      const sys = sysOf[s]
      ge[nv] = le
      gn[nv] = ln
      gu[nv] = su
      gw[nv] = w
      gs[nv] = sys
      nv++
      const we = w * le
      const wn = w * ln
      const wu = w * su
      a00 += we * le
      a01 += we * ln
      a02 += we * su
      a11 += wn * ln
      a12 += wn * su
      a22 += wu * su
      if (cnt[sys] === 0) {
        bx[sys] = 0
        by[sys] = 0
        bz[sys] = 0
        dw[sys] = 0
      }
      cnt[sys]++
      bx[sys] += we
      by[sys] += wn
      bz[sys] += wu
      dw[sys] += w
    }
    const idx = e * nPts + p
    oSats[idx] = nv
    let k = 0
    for (let s = 0; s < NS; s++) {
      if (cnt[s] === 0) continue
      k++
      const inv = 1 / dw[s]
      cx[s] = bx[s] * inv
      cy[s] = by[s] * inv
      cz[s] = bz[s] * inv
      a00 -= bx[s] * cx[s]
      a01 -= bx[s] * cy[s]
      a02 -= bx[s] * cz[s]
      a11 -= by[s] * cy[s]
      a12 -= by[s] * cz[s]
      a22 -= bz[s] * cz[s]
    }
    if (nv < 3 + k) {
      oH[idx] = oV[idx] = oP[idx] = NaN
      oN1h[idx] = oN1v[idx] = oN1p[idx] = NaN
      continue
    }
    // Cholesky of the 3x3 Schur complement, then its inverse.
    const tol = 1e-10 * Math.max(a00, a11, a22, 1e-300)
    const l00s = a00
    if (!(l00s > tol)) {
      oH[idx] = oV[idx] = oP[idx] = NaN
      oN1h[idx] = oN1v[idx] = oN1p[idx] = NaN
      continue
    }
    const l00 = Math.sqrt(l00s)
    const l10 = a01 / l00
    const l20 = a02 / l00
    const d11 = a11 - l10 * l10
    if (!(d11 > tol)) {
      oH[idx] = oV[idx] = oP[idx] = NaN
      oN1h[idx] = oN1v[idx] = oN1p[idx] = NaN
      continue
    }
    const l11 = Math.sqrt(d11)
    const l21 = (a12 - l20 * l10) / l11
    const d22 = a22 - l20 * l20 - l21 * l21
    if (!(d22 > tol)) {
      oH[idx] = oV[idx] = oP[idx] = NaN
      oN1h[idx] = oN1v[idx] = oN1p[idx] = NaN
      continue
    }
    const l22 = Math.sqrt(d22)
    const m00 = 1 / l00
    const m11 = 1 / l11
    const m22 = 1 / l22
    const m10 = (-l10 * m00) / l11
    const m21 = (-l21 * m11) / l22
    const m20 = -(l20 * m00 + l21 * m10) / l22
    const q00 = m00 * m00 + m10 * m10 + m20 * m20
    const q11 = m11 * m11 + m21 * m21
    const q22 = m22 * m22
    const q01 = m10 * m11 + m20 * m21
    const q02 = m20 * m22
    const q12 = m21 * m22
    const h2 = q00 + q11
    oH[idx] = Math.sqrt(h2)
    oV[idx] = Math.sqrt(q22)
    oP[idx] = Math.sqrt(h2 + q22)
    // N-1: worst case over single removals.
    let worstH2 = h2
    let worstV2 = q22
    let worstP2 = h2 + q22
    let lost = false
    for (let j = 0; j < nv; j++) {
      const s = gs[j]
      if (cnt[s] === 1) continue // position block unchanged
      if (nv - 1 < 3 + k) {
        lost = true
        break
      }
      const w = gw[j]
      const alpha = (w * dw[s]) / (dw[s] - w)
      const v0 = ge[j] - cx[s]
      const v1 = gn[j] - cy[s]
      const v2 = gu[j] - cz[s]
      const t0 = q00 * v0 + q01 * v1 + q02 * v2
      const t1 = q01 * v0 + q11 * v1 + q12 * v2
      const t2 = q02 * v0 + q12 * v1 + q22 * v2
      const den = 1 - alpha * (v0 * t0 + v1 * t1 + v2 * t2)
      if (!(den > 1e-9)) {
        lost = true
        break
      }
      const f = alpha / den
      const hh = h2 + f * (t0 * t0 + t1 * t1)
      const vv = q22 + f * t2 * t2
      if (hh > worstH2) worstH2 = hh
      if (vv > worstV2) worstV2 = vv
      if (hh + vv > worstP2) worstP2 = hh + vv
    }
    if (lost) {
      oN1h[idx] = oN1v[idx] = oN1p[idx] = Infinity
    } else {
      oN1h[idx] = Math.sqrt(worstH2)
      oN1v[idx] = Math.sqrt(worstV2)
      oN1p[idx] = Math.sqrt(worstP2)
    }
  }
}

/**
 * Weighted median: the smallest value whose cumulative weight reaches half the total.
 * NaN values count as +Infinity. Quickselect with a three-way partition on the first n
 * entries of `values` / `weights` (both reordered in place): O(n), no allocation.
 */
function weightedMedian(values: Float64Array, weights: Float64Array, n: number): number {
  let total = 0
  for (let i = 0; i < n; i++) {
    if (Number.isNaN(values[i])) values[i] = Infinity
    total += weights[i]
  }
  let target = total / 2
  let lo = 0
  let hi = n - 1
  while (lo <= hi) {
    const pivot = values[(lo + hi) >> 1]
    // Dutch-flag partition: [lo, lt) < pivot, [lt, i) == pivot, (gt, hi] > pivot.
    let lt = lo
    let i = lo
    let gt = hi
    let wLess = 0
    let wEq = 0
    while (i <= gt) {
      const v = values[i]
      if (v < pivot) {
        wLess += weights[i]
        swap(values, weights, lt++, i++)
      } else if (v > pivot) {
        swap(values, weights, i, gt--)
      } else {
        wEq += weights[i]
        i++
      }
    }
    if (wLess >= target && lt > lo) {
      hi = lt - 1
    } else if (wLess + wEq >= target) {
      return pivot
    } else {
      target -= wLess + wEq
      lo = gt + 1
    }
  }
  return Infinity
}

function swap(v: Float64Array, w: Float64Array, a: number, b: number): void {
  const tv = v[a]
  v[a] = v[b]
  v[b] = tv
  const tw = w[a]
  w[a] = w[b]
  w[b] = tw
}

function finiteOrNull(v: number): number | null {
  return Number.isFinite(v) ? v : null
}

function round(v: number | null, digits = 4): number | null {
  if (v === null) return null
  const f = 10 ** digits
  return Math.round(v * f) / f
}

interface WorkTest {
  id: string
  minSats: number
  maxPdop: number
  maxH: number
  maxV: number
  required: number
  requireN1: boolean
}

function workTests(workTypes: readonly WorkType[] | undefined, sigmaUereM: number): WorkTest[] {
  return (workTypes ?? []).map((w) => {
    const sigma = w.sigmaUereM ?? sigmaUereM
    return {
      id: w.id,
      minSats: w.minSats,
      maxPdop: w.maxPdop,
      // Compare DOPs directly: 2 sigma HDOP <= maxH95  <=>  HDOP <= maxH95 / (2 sigma).
      maxH: w.maxH95M / (2 * sigma),
      maxV: w.maxV95M === null || w.maxV95M === undefined ? Infinity : w.maxV95M / (1.96 * sigma),
      required: w.requiredShare,
      requireN1: w.requireN1,
    }
  })
}

/** 0 = fails, 1 = meets without the margin, 2 = meets with the N-1 margin too. */
function testSample(t: WorkTest, r: SampleResults, i: number): number {
  const h = r.hdop[i]
  if (!(h <= t.maxH)) return 0 // also NaN (no fix)
  const n = r.nSats[i]
  if (n < t.minSats || !(r.pdop[i] <= t.maxPdop) || !(r.vdop[i] <= t.maxV)) return 0
  if (n - 1 < t.minSats || !(r.n1h[i] <= t.maxH) || !(r.n1p[i] <= t.maxPdop) || !(r.n1v[i] <= t.maxV)) return 1
  return 2
}

/** The state of an hour for a work type (DESIGN.md state rule). */
export function hourState(share: number, shareN1: number, requiredShare: number, requireN1: boolean): HourState {
  if ((requireN1 ? shareN1 : share) >= requiredShare) return 'clear'
  if (share >= requiredShare / 2) return 'tight'
  return 'closed'
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
  const agg: Aggregation = { nPts, areaW, rSats, rH, rV, rP, rN1h, rN1v, rN1p, tests, nTests, tMaxH, tMaxV, tMaxP, tMinSats, vals, wts, satHist, met, metN1, sigma, stats: new Float64Array(7) }
  let e0 = 0
  while (e0 < nEp) {
    const hourStart = Math.floor(epochs[e0] / HOUR_MS) * HOUR_MS
    let e1 = e0
    while (e1 < nEp && epochs[e1] < hourStart + HOUR_MS) e1++
    hours.push(aggregateHour(agg, e0, e1, hourStart))
    if (input.detailHourMs !== undefined && Math.floor(input.detailHourMs / HOUR_MS) * HOUR_MS === hourStart) {
      detail = { hourStartMs: hourStart, points: pointDetails(points, r, e0, e1, nPts, tests, sigma, horizonMax[setOfEpoch[e0]]) }
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
interface Aggregation {
  nPts: number
  areaW: Float64Array
  rSats: Uint16Array
  rH: Float64Array
  rV: Float64Array
  rP: Float64Array
  rN1h: Float64Array
  rN1v: Float64Array
  rN1p: Float64Array
  tests: WorkTest[]
  nTests: number
  tMaxH: Float64Array
  tMaxV: Float64Array
  tMaxP: Float64Array
  tMinSats: Float64Array
  vals: Float64Array
  wts: Float64Array
  satHist: Float64Array
  met: Float64Array
  metN1: Float64Array
  sigma: number
  /** scratch for accumulateHour */
  stats: Float64Array
}

/**
 * The per-sample pass of an hour: weights, no-fix share, minima/maxima, satellite
 * histogram and work-type shares. Results in st: [totalW, noFixW, minSats, hMax, vMax,
 * pMax, n1Max]; satHist, met and metN1 are filled. Kept small so it compiles quickly.
 */
function accumulateHour(a: Aggregation, e0: number, e1: number, st: Float64Array): void {
  const { nPts, areaW, rSats, rH, rV, rP, rN1h, rN1v, rN1p, nTests, tMaxH, tMaxV, tMaxP, tMinSats, satHist, met, metN1 } = a
  let totalW = 0
  let noFixW = 0
  let minSats = Infinity
  let hMax = -Infinity
  let vMax = -Infinity
  let pMax = -Infinity
  let n1Max = -Infinity
  satHist.fill(0)
  met.fill(0)
  metN1.fill(0)
  for (let e = e0; e < e1; e++) {
    for (let p = 0; p < nPts; p++) {
      const i = e * nPts + p
      const w = areaW[p]
      totalW += w
      const ns = rSats[i]
      if (ns < minSats) minSats = ns
      satHist[ns] += w
      const h = rH[i]
      if (h !== h) {
        noFixW += w // no fix: meets no work type
        continue
      }
      const v = rV[i]
      const pd = rP[i]
      const nh = rN1h[i]
      const nvv = rN1v[i]
      const np = rN1p[i]
      if (h > hMax) hMax = h
      if (v > vMax) vMax = v
      if (pd > pMax) pMax = pd
      if (nh > n1Max) n1Max = nh
      for (let t = 0; t < nTests; t++) {
        // Same rule as testSample(), inlined for the hot loop.
        if (h > tMaxH[t] || ns < tMinSats[t] || pd > tMaxP[t] || v > tMaxV[t]) continue
        met[t] += w
        if (ns - 1 >= tMinSats[t] && nh <= tMaxH[t] && np <= tMaxP[t] && nvv <= tMaxV[t]) metN1[t] += w
      }
    }
  }
  st[0] = totalW
  st[1] = noFixW
  st[2] = minSats
  st[3] = hMax
  st[4] = vMax
  st[5] = pMax
  st[6] = n1Max
}

/** Aggregates of the epochs [e0, e1) forming the clock hour starting at hourStart. */
function aggregateHour(a: Aggregation, e0: number, e1: number, hourStart: number): HourAggregate {
  const { nPts, areaW, rH, rV, tests, vals, wts, satHist, met, metN1, sigma } = a
  const n = (e1 - e0) * nPts
  const st = a.stats
  accumulateHour(a, e0, e1, st)
  const totalW = st[0]
  const noFixW = st[1]
  const minSats = st[2]
  const hMax = st[3]
  const vMax = st[4]
  const pMax = st[5]
  const n1Max = st[6]
  // Weighted medians.
  let half = 0
  let satMedian = 0
  for (let s = 0; s < satHist.length; s++) {
    half += satHist[s]
    if (half >= totalW / 2) {
      satMedian = s
      break
    }
  }
  for (let k = 0; k < n; k++) {
    vals[k] = rH[e0 * nPts + k]
    wts[k] = areaW[k % nPts]
  }
  const hMed = weightedMedian(vals, wts, n)
  for (let k = 0; k < n; k++) {
    vals[k] = rV[e0 * nPts + k]
    wts[k] = areaW[k % nPts]
  }
  const vMed = weightedMedian(vals, wts, n)
  const anyFix = hMax > -Infinity
  const hMedN = finiteOrNull(hMed)
  const vMedN = finiteOrNull(vMed)
  return {
    time: new Date(hourStart).toISOString(),
    startMs: hourStart,
    samples: n,
    noFixShare: round(noFixW / totalW, 6)!,
    satellites: { min: minSats, median: satMedian },
    hdop: { median: round(hMedN), max: anyFix ? round(hMax) : null },
    vdop: { median: round(vMedN), max: anyFix ? round(vMax) : null },
    pdopMax: anyFix ? round(pMax) : null,
    n1HdopMax: anyFix ? round(finiteOrNull(n1Max)) : null,
    h95M: {
      median: hMedN === null ? null : round(2 * sigma * hMedN, 6),
      max: anyFix ? round(2 * sigma * hMax, 6) : null,
    },
    v95M: {
      median: vMedN === null ? null : round(1.96 * sigma * vMedN, 6),
      max: anyFix ? round(1.96 * sigma * vMax, 6) : null,
    },
    workTypes: tests.map((t, k) => {
      const share = met[k] / totalW
      const shareN1 = metN1[k] / totalW
      return { id: t.id, share: round(share, 6)!, shareN1: round(shareN1, 6)!, state: hourState(share, shareN1, t.required, t.requireN1) }
    }),
  }
}

function pointDetails(
  points: SamplePoint[],
  r: SampleResults,
  e0: number,
  e1: number,
  nPts: number,
  tests: WorkTest[],
  sigma: number,
  horizonMaxDeg: Float64Array,
): PointHourDetail[] {
  return points.map((pt, p) => {
    let minSats = Infinity
    let hMax = -Infinity
    let vMax = -Infinity
    let pMax = -Infinity
    let n1 = -Infinity
    let noFix = 0
    const met = new Float64Array(tests.length)
    const metN1 = new Float64Array(tests.length)
    for (let e = e0; e < e1; e++) {
      const i = e * nPts + p
      minSats = Math.min(minSats, r.nSats[i])
      if (Number.isNaN(r.hdop[i])) noFix++
      else {
        hMax = Math.max(hMax, r.hdop[i])
        vMax = Math.max(vMax, r.vdop[i])
        pMax = Math.max(pMax, r.pdop[i])
        n1 = Math.max(n1, r.n1h[i])
      }
      tests.forEach((t, k) => {
        const res = testSample(t, r, i)
        if (res >= 1) met[k]++
        if (res === 2) metN1[k]++
      })
    }
    const n = e1 - e0
    const any = hMax > -Infinity
    return {
      ...pt,
      satellitesMin: minSats,
      hdopMax: any ? round(hMax) : null,
      vdopMax: any ? round(vMax) : null,
      pdopMax: any ? round(pMax) : null,
      n1HdopMax: any ? round(finiteOrNull(n1)) : null,
      h95MaxM: any ? round(2 * sigma * hMax, 6) : null,
      v95MaxM: any ? round(1.96 * sigma * vMax, 6) : null,
      noFixShare: noFix / n,
      horizonMaxDeg: round(horizonMaxDeg[p], 3)!,
      workTypes: tests.map((t, k) => ({ id: t.id, share: round(met[k] / n, 6)!, shareN1: round(metN1[k] / n, 6)! })),
    }
  })
}

// ---------------------------------------------------------------------------------
// Point forecast and sky view (not hot: clarity first).

interface PointContext {
  ecef: [number, number, number]
  basis: Float64Array
  maskBins: Float64Array | null
}

function pointContext(point: GeodeticPoint, shapes: readonly ObstructionShape[], antennaHeightM: number, atMs?: number): PointContext {
  const ecef = geodeticToEcef({ ...point, heightM: point.heightM + antennaHeightM })
  const basis = enuBasis(point.latDeg, point.lonDeg)
  let maskBins: Float64Array | null = null
  if (shapes.length > 0) maskBins = horizonMaskInto(new Float64Array(360), point, shapes, antennaHeightM, atMs)
  return { ecef, basis, maskBins }
}

function azElAt(ctx: PointContext, positions: Float64Array, o: number): { azimuthDeg: number; elevationDeg: number } {
  const dx = positions[o] - ctx.ecef[0]
  const dy = positions[o + 1] - ctx.ecef[1]
  const dz = positions[o + 2] - ctx.ecef[2]
  const b = ctx.basis
  const e = b[0] * dx + b[1] * dy + b[2] * dz
  const n = b[3] * dx + b[4] * dy + b[5] * dz
  const u = b[6] * dx + b[7] * dy + b[8] * dz
  let az = Math.atan2(e, n) * RAD
  if (az < 0) az += 360
  if (az >= 360) az -= 360
  return { azimuthDeg: az, elevationDeg: Math.atan2(u, Math.hypot(e, n)) * RAD }
}

/** Why a satellite is or is not used at a point. */
export type SatStatus = 'used' | 'below-mask' | 'behind-obstruction' | 'outage' | 'unknown-position'

function statusOf(el: number, az: number, maskDeg: number, ctx: PointContext, out: boolean): SatStatus {
  if (!Number.isFinite(el)) return 'unknown-position'
  if (out) return 'outage'
  if (el < maskDeg) return 'below-mask'
  if (ctx.maskBins) {
    const bin = Math.min(359, Math.floor(az))
    if (el < ctx.maskBins[bin]) return 'behind-obstruction'
  }
  return 'used'
}

/** One epoch of a point forecast (the CLI's point-mode record). */
export interface PointEpoch {
  time: string
  satellites: number
  ids: string[]
  gdop: number | null
  pdop: number | null
  hdop: number | null
  vdop: number | null
  tdop: number | null
}

/** Input of `forecastPoint`. */
export interface PointForecastInput extends SkySettings {
  point: { latDeg: number; lonDeg: number; heightM?: number }
  startMs: number
  hours: number
  stepMin?: number
}

/**
 * DOP at one point for every epoch (what `npm run -s forecast` prints in point mode).
 * TDOP is the clock of the first constellation in the satellite list's order.
 *
 * @example
 * forecastPoint({ point: { latDeg: 52, lonDeg: 5 }, satellites: nominalConstellation('gps'),
 *   startMs: Date.UTC(2026, 11, 2), hours: 1, stepMin: 5 })[0]
 * // -> { time: '2026-12-02T00:00:00.000Z', satellites: 8, ids: [...], gdop: 2.1, ... }
 */
export function forecastPoint(input: PointForecastInput): PointEpoch[] {
  const maskDeg = input.maskDeg ?? 10
  const stepMin = input.stepMin ?? 5
  checkCommon(maskDeg, stepMin, input.hours, input.startMs)
  const sats = selectSatellites(input)
  const epochs = epochList(input.startMs, input.hours, stepMin)
  const positions = satellitePositions(sats, epochs, input.propagation)
  const shapes = readObstructions(input.obstructions)
  const antenna = input.antennaHeightM ?? 0
  const point: GeodeticPoint = { latDeg: input.point.latDeg, lonDeg: input.point.lonDeg, heightM: input.point.heightM ?? 0 }
  const flags = outageFlags(sats, epochs, input.outages)
  const out: PointEpoch[] = []
  let ctx = pointContext(point, shapes, antenna, epochs[0])
  let ctxDay = Math.floor(epochs[0] / 86_400_000)
  for (let e = 0; e < epochs.length; e++) {
    const day = Math.floor(epochs[e] / 86_400_000)
    if (day !== ctxDay && shapes.length > 0) {
      ctx = pointContext(point, shapes, antenna, epochs[e])
      ctxDay = day
    }
    const dirs: Array<{ azimuthDeg: number; elevationDeg: number; system: string }> = []
    const ids: string[] = []
    for (let s = 0; s < sats.length; s++) {
      const ae = azElAt(ctx, positions, (e * sats.length + s) * 3)
      if (statusOf(ae.elevationDeg, ae.azimuthDeg, maskDeg, ctx, flags[e * sats.length + s] === 1) !== 'used') continue
      dirs.push({ ...ae, system: sats[s].system })
      ids.push(sats[s].id)
    }
    const dop = dopFromDirections(dirs, { weights: input.weights })
    out.push({
      time: new Date(epochs[e]).toISOString(),
      satellites: dirs.length,
      ids,
      gdop: dop ? round(dop.gdop) : null,
      pdop: dop ? round(dop.pdop) : null,
      hdop: dop ? round(dop.hdop) : null,
      vdop: dop ? round(dop.vdop) : null,
      tdop: dop ? round(dop.tdop) : null,
    })
  }
  return out
}

/** Input of `skyView`. */
export interface SkyViewInput extends SkySettings {
  point: { latDeg: number; lonDeg: number; heightM?: number }
  atMs: number
  /** half-length of the tracks (h), default 1 */
  trackHours?: number
  /** minutes between track points, default 5 */
  trackStepMin?: number
}

/** One satellite in a sky view. */
export interface SkySatellite {
  id: string
  system: GnssSystem
  name?: string
  source: Satellite['source']
  azimuthDeg: number
  elevationDeg: number
  status: SatStatus
  /** positions from atMs - trackHours to atMs + trackHours (only satellites above the horizon at some point) */
  track: Array<{ tMs: number; azimuthDeg: number; elevationDeg: number }>
}

/** A single-point sky view. */
export interface SkyView {
  atMs: number
  /** 360 entries: highest blocked elevation (deg) over azimuths [k, k+1) */
  horizonMaskDeg: number[]
  maskDeg: number
  satellites: SkySatellite[]
  /** ids of the satellites in use */
  used: string[]
  dop: DopValues | null
  /** DOP with the most damaging satellite (by HDOP) lost; null if that loses the fix */
  n1: { lostSatId: string; dop: DopValues | null } | null
}

/**
 * Sky view at one point and instant: satellites with azimuth/elevation and status,
 * their tracks +-1 h, the horizon mask cut by the obstructions, and the DOP values.
 * Cheap enough to rerun while a tree line's height is dragged (a Web Worker can call it).
 *
 * @example
 * const view = skyView({ point: { latDeg: 52, lonDeg: 5 }, atMs: Date.UTC(2026, 11, 2, 9),
 *   satellites: nominalConstellation('all'), obstructions: treeLines, antennaHeightM: 3 })
 * view.dop?.hdop // -> 0.7
 */
export function skyView(input: SkyViewInput): SkyView {
  const maskDeg = input.maskDeg ?? 10
  if (!(maskDeg >= 0 && maskDeg < 90)) throw new Error('elevation mask must be in [0, 90) degrees')
  const sats = selectSatellites(input)
  const trackHours = input.trackHours ?? 1
  const trackStep = (input.trackStepMin ?? 5) * 60_000
  const nTrack = Math.floor((2 * trackHours * HOUR_MS) / trackStep) + 1
  const epochs = new Float64Array(nTrack + 1)
  epochs[0] = input.atMs
  for (let k = 0; k < nTrack; k++) epochs[k + 1] = input.atMs - trackHours * HOUR_MS + k * trackStep
  const positions = satellitePositions(sats, epochs, input.propagation)
  const shapes = readObstructions(input.obstructions)
  const antenna = input.antennaHeightM ?? 0
  const point: GeodeticPoint = { latDeg: input.point.latDeg, lonDeg: input.point.lonDeg, heightM: input.point.heightM ?? 0 }
  const ctx = pointContext(point, shapes, antenna, input.atMs)
  const flags = outageFlags(sats, epochs, input.outages)
  const list: SkySatellite[] = []
  const dirs: Array<{ azimuthDeg: number; elevationDeg: number; system: string; id: string }> = []
  sats.forEach((s, i) => {
    const now = azElAt(ctx, positions, i * 3)
    const track: SkySatellite['track'] = []
    let above = now.elevationDeg > 0
    for (let k = 1; k <= nTrack; k++) {
      const ae = azElAt(ctx, positions, (k * sats.length + i) * 3)
      if (ae.elevationDeg > 0) above = true
      track.push({ tMs: epochs[k], azimuthDeg: round(ae.azimuthDeg, 3)!, elevationDeg: round(ae.elevationDeg, 3)! })
    }
    const status = statusOf(now.elevationDeg, now.azimuthDeg, maskDeg, ctx, flags[i] === 1)
    if (status === 'used') dirs.push({ ...now, system: s.system, id: s.id })
    if (!above) return
    list.push({
      id: s.id,
      system: s.system,
      name: s.name,
      source: s.source,
      azimuthDeg: round(now.azimuthDeg, 3)!,
      elevationDeg: round(now.elevationDeg, 3)!,
      status,
      track,
    })
  })
  const dop = dopFromDirections(dirs, { weights: input.weights })
  let n1: SkyView['n1'] = null
  if (dop) {
    let worst: { lostSatId: string; dop: DopValues | null } | null = null
    for (let j = 0; j < dirs.length; j++) {
      const d = dopFromDirections(dirs.filter((_, k) => k !== j), { weights: input.weights })
      if (!d) {
        worst = { lostSatId: dirs[j].id, dop: null }
        break
      }
      if (!worst || (worst.dop && d.hdop > worst.dop.hdop)) worst = { lostSatId: dirs[j].id, dop: d }
    }
    n1 = worst
  }
  return {
    atMs: input.atMs,
    horizonMaskDeg: ctx.maskBins ? Array.from(ctx.maskBins, (v) => round(v, 3)!) : new Array<number>(360).fill(0),
    maskDeg,
    satellites: list,
    used: dirs.map((d) => d.id),
    dop,
    n1,
  }
}
