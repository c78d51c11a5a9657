/**
 * Hourly aggregation of the per-sample results and the work-type rules.
 *
 * Work types: a sample meets a work type when it has a fix, at least minSats
 * satellites, PDOP <= maxPdop, 2 sigma HDOP <= maxH95M and, when given,
 * 1.96 sigma VDOP <= maxV95M (ENGINE.md step 8); with the N-1 margin the same must hold
 * with the most damaging satellite lost (each figure's worst case over single removals).
 * Shares are weighted by the area each sample point stands for and by time (equal
 * epochs). State of an hour (DESIGN.md): Clear when the share meeting it (with N-1
 * where required) is >= the required share; Tight when the share meeting it is >= half
 * the required share (this includes failing only the N-1 margin); Closed otherwise.
 * Medians are area-weighted; no-fix samples count as the worst value.
 * With a baseline (errorModel.ts) the expected errors add 2 ppm_H b and 1.96 ppm_V b and
 * the DOP limits shrink accordingly; link closures and storm hours are applied after the
 * aggregation (correction.ts).
 *
 * Sources: 2DRMS = 2 sigma HDOP as the horizontal 95 % figure and 1.96 sigma VDOP (the
 * normal distribution's two-sided 95 % point) as the vertical one, as in Kaplan & Hegarty,
 * Understanding GPS/GNSS, 3rd ed., performance chapter (2DRMS is 95-98 % depending on the
 * error ellipse). The Clear / Tight / Closed rule and the area-and-time weighting are
 * the product's own (DESIGN.md), not a published method.
 */
import { allowedDop, H95_FACTOR, V95_FACTOR } from './errorModel'
import type { HourAggregate, HourState, PointHourDetail, WorkType } from './types'
import type { SampleResults } from './kernel'
import type { SamplePoint } from './sampling'

/**
 * Weighted median: the smallest value whose cumulative weight reaches half the total.
 * NaN values count as +Infinity. Quickselect with a three-way partition on the first n
 * entries of `values` / `weights` (both reordered in place): O(n), no allocation.
 */
export function weightedMedian(values: Float64Array, weights: Float64Array, n: number): number {
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

export function finiteOrNull(v: number): number | null {
  return Number.isFinite(v) ? v : null
}

export function round(v: number | null, digits = 4): number | null {
  if (v === null) return null
  const f = 10 ** digits
  return Math.round(v * f) / f
}

export interface WorkTest {
  id: string
  minSats: number
  maxPdop: number
  maxH: number
  maxV: number
  required: number
  requireN1: boolean
}

export function workTests(workTypes: readonly WorkType[] | undefined, sigmaUereM: number): WorkTest[] {
  return (workTypes ?? []).map((w) => {
    const sigma = w.sigmaUereM ?? sigmaUereM
    const bH = w.baselineHM ?? 0
    const bV = w.baselineVM ?? 0
    return {
      id: w.id,
      minSats: w.minSats,
      maxPdop: w.maxPdop,
      // Compare DOPs directly: 2 sigma HDOP <= maxH95  <=>  HDOP <= maxH95 / (2 sigma); with
      // the baseline part (errorModel.ts): 2 (sigma HDOP + bH) <= maxH95  <=>  HDOP <= (maxH95 / 2 - bH) / sigma.
      maxH: allowedDop(w.maxH95M, H95_FACTOR, sigma, bH),
      maxV: w.maxV95M === null || w.maxV95M === undefined ? Infinity : allowedDop(w.maxV95M, V95_FACTOR, sigma, bV),
      required: w.requiredShare,
      requireN1: w.requireN1,
    }
  })
}

/** 0 = fails, 1 = meets without the margin, 2 = meets with the N-1 margin too. */
export function testSample(t: WorkTest, r: SampleResults, i: number): number {
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

/** Working state of the hourly aggregation. */
export interface Aggregation {
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
  /** baseline parts ppm b of the field's service (m, errorModel.ts), added to the expected errors */
  baselineHM: number
  baselineVM: number
  /** scratch for accumulateHour */
  stats: Float64Array
}

/**
 * The per-sample pass of an hour: weights, no-fix share, minima/maxima, satellite
 * histogram and work-type shares. Results in st: [totalW, noFixW, minSats, hMax, vMax,
 * pMax, n1Max]; satHist, met and metN1 are filled. Kept small so it compiles quickly.
 */
export function accumulateHour(a: Aggregation, e0: number, e1: number, st: Float64Array): void {
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
export function aggregateHour(a: Aggregation, e0: number, e1: number, hourStart: number): HourAggregate {
  const { nPts, areaW, rH, rV, tests, vals, wts, satHist, met, metN1, sigma } = a
  const bH = 2 * a.baselineHM
  const bV = 1.96 * a.baselineVM
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
      median: hMedN === null ? null : round(2 * sigma * hMedN + bH, 6),
      max: anyFix ? round(2 * sigma * hMax + bH, 6) : null,
    },
    v95M: {
      median: vMedN === null ? null : round(1.96 * sigma * vMedN + bV, 6),
      max: anyFix ? round(1.96 * sigma * vMax + bV, 6) : null,
    },
    workTypes: tests.map((t, k) => {
      const share = met[k] / totalW
      const shareN1 = metN1[k] / totalW
      return { id: t.id, share: round(share, 6)!, shareN1: round(shareN1, 6)!, state: hourState(share, shareN1, t.required, t.requireN1) }
    }),
  }
}

export function pointDetails(
  points: SamplePoint[],
  r: SampleResults,
  e0: number,
  e1: number,
  nPts: number,
  tests: WorkTest[],
  sigma: number,
  horizonMaxDeg: Float64Array,
  baseline: { baselineHM: number; baselineVM: number } = { baselineHM: 0, baselineVM: 0 },
): PointHourDetail[] {
  const bH = 2 * baseline.baselineHM
  const bV = 1.96 * baseline.baselineVM
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
      h95MaxM: any ? round(2 * sigma * hMax + bH, 6) : null,
      v95MaxM: any ? round(1.96 * sigma * vMax + bV, 6) : null,
      noFixShare: noFix / n,
      horizonMaxDeg: round(horizonMaxDeg[p], 3)!,
      workTypes: tests.map((t, k) => ({ id: t.id, share: round(met[k] / n, 6)!, shareN1: round(metN1[k] / n, 6)! })),
    }
  })
}
