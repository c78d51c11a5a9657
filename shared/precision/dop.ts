/**
 * Dilution of precision from line-of-sight directions.
 *
 * Model (Kaplan & Hegarty, Understanding GPS/GNSS, 3rd ed., performance chapter;
 * Misra & Enge, Global Positioning System, 2nd ed., sec. 6.1): rows of the geometry
 * matrix G are [-e, -n, -u, clock columns], with one clock column per constellation
 * that has a satellite in view (multi-GNSS inter-system bias). Q = (G^T W G)^-1;
 * EDOP, NDOP, VDOP = sqrt(Q_EE), sqrt(Q_NN), sqrt(Q_UU); HDOP = sqrt(Q_EE + Q_NN);
 * PDOP = sqrt(Q_EE + Q_NN + Q_UU); TDOP = sqrt(Q_tt) of the first system's clock;
 * GDOP = sqrt(PDOP^2 + TDOP^2).
 *
 * Weights: W = identity (classic DOP) or elevation weights 1/sigma^2 with
 * sigma^2 = a^2 + b^2 / sin^2(el) (the usual elevation-dependent model, e.g. the RTKLIB
 * 2.4.3 manual's error model appendix; from memory for the appendix number). The
 * engine uses a = b and normalises so that a satellite at the zenith has weight 1:
 * w = 2 sin^2(el) / (1 + sin^2(el)). Weighted DOPs then scale the zenith ranging sigma.
 *
 * Expected errors at 95 %: horizontal 2 * sigma_UERE * HDOP (2DRMS), vertical
 * 1.96 * sigma_UERE * VDOP (common practice; Kaplan & Hegarty, same chapter).
 */
import { DEG } from './constants'
import type { GnssSystem } from './systems'

/** The DOP values of one geometry. */
export interface DopValues {
  gdop: number
  pdop: number
  hdop: number
  vdop: number
  tdop: number
  edop: number
  ndop: number
}

/** Weighting of the observations: none (classic DOP) or by elevation. */
export type DopWeights = 'none' | 'elevation'

/** A satellite direction seen from the receiver. */
export interface SatDirection {
  azimuthDeg: number
  elevationDeg: number
  /** Constellation; missing means GPS. */
  system?: GnssSystem | string
}

/** Relative weight of an observation at elevation with sin(el) = s (zenith = 1). */
export function elevationWeight(sinEl: number): number {
  const s2 = sinEl * sinEl
  return (2 * s2) / (1 + s2)
}

/** Relative pivot below which the normal matrix is treated as singular. */
export const SINGULAR_TOLERANCE = 1e-10

/**
 * In-place Cholesky inversion of a symmetric positive-definite matrix stored row-major
 * in `m` (size k x k). Returns false when a pivot falls below the relative tolerance
 * (singular geometry). On success `m` holds the inverse.
 */
export function invertSpdInPlace(m: Float64Array, k: number): boolean {
  let scale = 0
  for (let i = 0; i < k; i++) scale = Math.max(scale, m[i * k + i])
  if (!(scale > 0)) return false
  const tol = SINGULAR_TOLERANCE * scale
  // Factor: lower triangle of m becomes L (m = L L^T).
  for (let j = 0; j < k; j++) {
    let d = m[j * k + j]
    for (let p = 0; p < j; p++) d -= m[j * k + p] * m[j * k + p]
    if (!(d > tol)) return false
    const ljj = Math.sqrt(d)
    m[j * k + j] = ljj
    for (let i = j + 1; i < k; i++) {
      let s = m[i * k + j]
      for (let p = 0; p < j; p++) s -= m[i * k + p] * m[j * k + p]
      m[i * k + j] = s / ljj
    }
  }
  // Invert L in place (lower triangle).
  for (let j = 0; j < k; j++) {
    m[j * k + j] = 1 / m[j * k + j]
    for (let i = j + 1; i < k; i++) {
      let s = 0
      for (let p = j; p < i; p++) s -= m[i * k + p] * m[p * k + j]
      m[i * k + j] = s / m[i * k + i]
    }
  }
  // inverse = L^-T L^-1, written to the full matrix.
  for (let i = 0; i < k; i++) {
    for (let j = 0; j <= i; j++) {
      let s = 0
      for (let p = i; p < k; p++) s += m[p * k + i] * m[p * k + j]
      // rows p >= i of column i and column j (p >= i >= j) are in the lower triangle
      m[j * k + i] = s // upper triangle holds the result for now
    }
  }
  for (let i = 0; i < k; i++) for (let j = 0; j < i; j++) m[i * k + j] = m[j * k + i]
  return true
}

/**
 * DOP of a set of satellite directions.
 *
 * One clock column per constellation present (in order of first appearance); TDOP is
 * the clock of the first system in the input order. Returns null (no fix) when there
 * are fewer satellites than unknowns or the geometry is singular.
 *
 * @example
 * // One satellite at the zenith and three at the horizon, 120 deg apart:
 * dopFromDirections([
 *   { azimuthDeg: 0, elevationDeg: 90 },
 *   { azimuthDeg: 0, elevationDeg: 0 },
 *   { azimuthDeg: 120, elevationDeg: 0 },
 *   { azimuthDeg: 240, elevationDeg: 0 },
 * ]) // -> { hdop: 1.1547, vdop: 1.1547, tdop: 0.5774, gdop: 1.7321, ... }
 */
export function dopFromDirections(
  sats: { azimuthDeg: number; elevationDeg: number; system?: string }[],
  options?: { weights?: DopWeights },
): DopValues | null {
  const weighted = options?.weights === 'elevation'
  const systems: string[] = []
  const sysIndex = new Int32Array(sats.length)
  for (let i = 0; i < sats.length; i++) {
    const s = sats[i].system ?? 'GPS'
    let idx = systems.indexOf(s)
    if (idx < 0) {
      idx = systems.length
      systems.push(s)
    }
    sysIndex[i] = idx
  }
  const k = 3 + systems.length
  if (sats.length < k || systems.length === 0) return null
  const m = new Float64Array(k * k)
  const g = new Float64Array(k)
  for (let i = 0; i < sats.length; i++) {
    const az = sats[i].azimuthDeg * DEG
    const el = sats[i].elevationDeg * DEG
    const ce = Math.cos(el)
    const se = Math.sin(el)
    g.fill(0)
    g[0] = -ce * Math.sin(az)
    g[1] = -ce * Math.cos(az)
    g[2] = -se
    g[3 + sysIndex[i]] = 1
    const w = weighted ? elevationWeight(se) : 1
    for (let r = 0; r < k; r++) {
      const gr = g[r] * w
      if (gr === 0) continue
      for (let c = 0; c < k; c++) m[r * k + c] += gr * g[c]
    }
  }
  if (!invertSpdInPlace(m, k)) return null
  const qe = m[0]
  const qn = m[k + 1]
  const qu = m[2 * k + 2]
  const qt = m[3 * k + 3]
  const pdop = Math.sqrt(qe + qn + qu)
  const tdop = Math.sqrt(qt)
  return {
    gdop: Math.sqrt(qe + qn + qu + qt),
    pdop,
    hdop: Math.sqrt(qe + qn),
    vdop: Math.sqrt(qu),
    tdop,
    edop: Math.sqrt(qe),
    ndop: Math.sqrt(qn),
  }
}

/**
 * Expected horizontal error at 95 % (m): 2 * sigma_UERE * HDOP (2DRMS).
 * @example expectedHorizontal95M(1.0, 0.012) // -> 0.024
 */
export function expectedHorizontal95M(hdop: number, sigmaUereM: number): number {
  return 2 * sigmaUereM * hdop
}

/**
 * Expected vertical error at 95 % (m): 1.96 * sigma_UERE * VDOP.
 * @example expectedVertical95M(1.5, 0.012) // -> 0.03528
 */
export function expectedVertical95M(vdop: number, sigmaUereM: number): number {
  return 1.96 * sigmaUereM * vdop
}
