/**
 * The hot loop of the field forecast: for every epoch and sample point, the visible
 * satellites, the DOP and the N-1 margin, on typed arrays with no allocation per sample.
 *
 * - Visibility: dot products with the point's up/east/north vectors; sin(el) is
 *   compared with sin(mask) before any trigonometry, and the azimuth (atan2) is only
 *   computed when the satellite is low enough for the point's horizon mask to matter.
 *   A per-epoch prefilter at the centre of the points drops satellites that are below
 *   the mask everywhere.
 * - DOP: the normal matrix G^T W G (rows [-e, -n, -u, clock columns], ENGINE.md step 6)
 *   is accumulated in place. Its clock block is diagonal (each satellite has one clock),
 *   so the clocks are eliminated exactly (Schur complement): S = A - sum_s b_s b_s^T / D_s,
 *   a 3x3 matrix inverted by Cholesky; Q_pos = S^-1 equals the position block of
 *   (G^T W G)^-1 (Golub & Van Loan, Matrix Computations, block inverse / Schur complement).
 * - N-1 margin: removing satellite j of system s lowers S by the rank-one term
 *   alpha v v^T with v = g_j - c_s (c_s the weighted mean direction of system s) and
 *   alpha = w_j D_s / (D_s - w_j) (weighted scatter downdate); Sherman-Morrison then
 *   gives Q' = Q + alpha Q v v^T Q / (1 - alpha v^T Q v). A satellite alone in its
 *   system leaves the position block unchanged (its clock absorbs it).
 * The tests check every sample against dopFromDirections with brute-force removal.
 */
import { DEG, RAD } from './constants'
import { elevationWeight } from './dop'
import { ecefToGeodetic, enuBasis } from './geodesy'
import { GNSS_SYSTEMS } from './systems'

/** Per-sample results of the hot loop. */
export interface SampleResults {
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
export function evaluateSamples(
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
  const kernel: Kernel = { positions, nSat, sysOf, offFlags, nPts, basis, pointEcef, maskSin, maskMaxSin, setOfEpoch, weighted, sinMask2, ge, gn, gu, gw, gs, bx, by, bz, dw, cnt, cx, cy, cz, mx, my, mz, cux, cuy, cuz, sinPre, candidates, oSats, oH, oV, oP, oN1h, oN1v, oN1p, NS, normal: new Float64Array(6), q: new Float64Array(6), worst: new Float64Array(3) }
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
  /** position block of the normal matrix, then its Schur complement: 00, 01, 02, 11, 12, 22 */
  normal: Float64Array
  /** its inverse, the position cofactor matrix Q: 00, 01, 02, 11, 12, 22 */
  q: Float64Array
  /** worst squared HDOP, VDOP, PDOP with one satellite lost */
  worst: Float64Array
}

/** Visibility, DOP and N-1 margin of every point at epoch e. */
function evaluateEpoch(k: Kernel, e: number): void {
  const nCand = epochCandidates(k, e)
  const { nPts, oSats, oH, oV, oP, oN1h, oN1v, oN1p, q } = k
  for (let p = 0; p < nPts; p++) {
    const idx = e * nPts + p
    const nv = accumulatePoint(k, e, p, nCand)
    oSats[idx] = nv
    const nClocks = eliminateClocks(k)
    if (nv < 3 + nClocks || !invertPositionBlock(k)) {
      oH[idx] = oV[idx] = oP[idx] = NaN
      oN1h[idx] = oN1v[idx] = oN1p[idx] = NaN
      continue
    }
    const h2 = q[0] + q[3]
    const v2 = q[5]
    oH[idx] = Math.sqrt(h2)
    oV[idx] = Math.sqrt(v2)
    oP[idx] = Math.sqrt(h2 + v2)
    if (worstWithOneLost(k, nv, nClocks)) {
      const w = k.worst
      oN1h[idx] = Math.sqrt(w[0])
      oN1v[idx] = Math.sqrt(w[1])
      oN1p[idx] = Math.sqrt(w[2])
    } else {
      oN1h[idx] = oN1v[idx] = oN1p[idx] = Infinity
    }
  }
}

/**
 * Step 1, once per epoch: the satellites in service that are above the mask less the
 * slack at the centre of the points (the others are below it everywhere); their indices
 * go to k.candidates, their count is returned.
 */
function epochCandidates(k: Kernel, e: number): number {
  const { positions, nSat, offFlags, mx, my, mz, cux, cuy, cuz, sinPre, candidates } = k
  const pos0 = e * nSat * 3
  const off0 = e * nSat
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
  return nCand
}

/**
 * Step 2, per point: the candidates visible there (above the elevation mask and the
 * point's horizon mask), their unit line-of-sight rows and weights (k.ge, gn, gu, gw, gs),
 * the position block of G^T W G (k.normal: 00, 01, 02, 11, 12, 22) and per system the
 * weighted sums of the rows (k.bx, by, bz), of the weights (k.dw) and the count (k.cnt).
 * Returns the number of satellites in view.
 */
function accumulatePoint(k: Kernel, e: number, p: number, nCand: number): number {
  const { positions, nSat, basis, pointEcef, weighted, sinMask2, ge, gn, gu, gw, gs, sysOf, bx, by, bz, dw, cnt, candidates, normal } = k
  const set = k.setOfEpoch[e]
  const mSin = k.maskSin[set]
  const maxSinH = k.maskMaxSin[set][p]
  const pos0 = e * nSat * 3
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
  normal[0] = a00
  normal[1] = a01
  normal[2] = a02
  normal[3] = a11
  normal[4] = a12
  normal[5] = a22
  return nv
}

/**
 * Step 3: eliminates the clock columns (Schur complement S = A - sum_s b_s b_s^T / D_s,
 * in place in k.normal) and keeps each system's weighted mean direction (k.cx, cy, cz).
 * Returns the number of clocks (systems in view).
 */
function eliminateClocks(k: Kernel): number {
  const { NS, cnt, dw, bx, by, bz, cx, cy, cz, normal } = k
  let nClocks = 0
  for (let s = 0; s < NS; s++) {
    if (cnt[s] === 0) continue
    nClocks++
    const inv = 1 / dw[s]
    cx[s] = bx[s] * inv
    cy[s] = by[s] * inv
    cz[s] = bz[s] * inv
    normal[0] -= bx[s] * cx[s]
    normal[1] -= bx[s] * cy[s]
    normal[2] -= bx[s] * cz[s]
    normal[3] -= by[s] * cy[s]
    normal[4] -= by[s] * cz[s]
    normal[5] -= bz[s] * cz[s]
  }
  return nClocks
}

/**
 * Step 4: Q = S^-1 by Cholesky of the 3x3 Schur complement (k.normal), into k.q
 * (00, 01, 02, 11, 12, 22). False when S is singular or nearly so (no fix).
 */
function invertPositionBlock(k: Kernel): boolean {
  const { normal, q } = k
  const a00 = normal[0], a01 = normal[1], a02 = normal[2], a11 = normal[3], a12 = normal[4], a22 = normal[5]
  const tol = 1e-10 * Math.max(a00, a11, a22, 1e-300)
  const l00s = a00
  if (!(l00s > tol)) return false
  const l00 = Math.sqrt(l00s)
  const l10 = a01 / l00
  const l20 = a02 / l00
  const d11 = a11 - l10 * l10
  if (!(d11 > tol)) return false
  const l11 = Math.sqrt(d11)
  const l21 = (a12 - l20 * l10) / l11
  const d22 = a22 - l20 * l20 - l21 * l21
  if (!(d22 > tol)) return false
  const l22 = Math.sqrt(d22)
  const m00 = 1 / l00
  const m11 = 1 / l11
  const m22 = 1 / l22
  const m10 = (-l10 * m00) / l11
  const m21 = (-l21 * m11) / l22
  const m20 = -(l20 * m00 + l21 * m10) / l22
  q[0] = m00 * m00 + m10 * m10 + m20 * m20
  q[1] = m10 * m11 + m20 * m21
  q[2] = m20 * m22
  q[3] = m11 * m11 + m21 * m21
  q[4] = m21 * m22
  q[5] = m22 * m22
  return true
}

/**
 * Step 5, the N-1 margin: the worst squared HDOP, VDOP and PDOP over the removal of each
 * satellite in view (rank-one downdate and Sherman-Morrison, see the file header), into
 * k.worst. False when losing one satellite can lose the fix.
 */
function worstWithOneLost(k: Kernel, nv: number, nClocks: number): boolean {
  const { ge, gn, gu, gw, gs, cnt, dw, cx, cy, cz, q, worst } = k
  const q00 = q[0], q01 = q[1], q02 = q[2], q11 = q[3], q12 = q[4], q22 = q[5]
  const h2 = q00 + q11
  let worstH2 = h2
  let worstV2 = q22
  let worstP2 = h2 + q22
  for (let j = 0; j < nv; j++) {
    const s = gs[j]
    if (cnt[s] === 1) continue // position block unchanged
    if (nv - 1 < 3 + nClocks) return false
    const w = gw[j]
    const alpha = (w * dw[s]) / (dw[s] - w)
    const v0 = ge[j] - cx[s]
    const v1 = gn[j] - cy[s]
    const v2 = gu[j] - cz[s]
    const t0 = q00 * v0 + q01 * v1 + q02 * v2
    const t1 = q01 * v0 + q11 * v1 + q12 * v2
    const t2 = q02 * v0 + q12 * v1 + q22 * v2
    const den = 1 - alpha * (v0 * t0 + v1 * t1 + v2 * t2)
    if (!(den > 1e-9)) return false
    const f = alpha / den
    const hh = h2 + f * (t0 * t0 + t1 * t1)
    const vv = q22 + f * t2 * t2
    if (hh > worstH2) worstH2 = hh
    if (vv > worstV2) worstV2 = vv
    if (hh + vv > worstP2) worstP2 = hh + vv
  }
  worst[0] = worstH2
  worst[1] = worstV2
  worst[2] = worstP2
  return true
}
