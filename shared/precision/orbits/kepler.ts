/**
 * Positions from Keplerian elements in earth-fixed form: the IS-GPS-200 almanac
 * algorithm (Table 20-IV, almanac terms not sent set to zero):
 *   M = M0 + n tk;  E - e sin E = M;  nu = atan2(sqrt(1-e^2) sin E, cos E - e);
 *   u = nu + omega;  r = A (1 - e cos E);  Omega = Omega0 + (OmegaDot - OmegaE) tk - OmegaE toa;
 *   x = r cos u cos Omega - r sin u cos i sin Omega
 *   y = r cos u sin Omega + r sin u cos i cos Omega
 *   z = r sin u sin i
 * With absolute times tk = t - t_ref is the true time since the reference (no
 * wrapping at week ends is needed once the week has been resolved).
 */
import type { KeplerOrbit } from './types'
import { EARTH_ROTATION_RAD_S, WEEK_S } from '../constants'
import { gpsSecondsToUtcMs, resolveGpsWeek } from '../time'

/** Returns the orbit with tRefMs/lon0Rad resolved for an almanac near a UTC instant. */
export function resolveKeplerOrbit(orbit: KeplerOrbit, nearUtcMs: number): KeplerOrbit {
  const alm = orbit.almanac
  if (!alm) return orbit
  const week = resolveGpsWeek(alm.weekMod1024, alm.toaS, nearUtcMs)
  return {
    ...orbit,
    tRefMs: gpsSecondsToUtcMs(week * WEEK_S + alm.toaS),
    lon0Rad: alm.omega0Rad - EARTH_ROTATION_RAD_S * alm.toaS,
  }
}

/** Solves Kepler's equation E - e sin E = M (Newton, to 1e-13 rad). */
export function eccentricAnomaly(m: number, e: number): number {
  let E = e < 0.8 ? m : Math.PI
  for (let i = 0; i < 20; i++) {
    const f = E - e * Math.sin(E) - m
    const d = f / (1 - e * Math.cos(E))
    E -= d
    if (Math.abs(d) < 1e-13) break
  }
  return E
}

/**
 * ECEF position (m) of a Keplerian orbit at a UTC instant, written to out[offset..+2].
 * The orbit must be resolved (see resolveKeplerOrbit).
 */
export function keplerPositionInto(o: KeplerOrbit, utcMs: number, out: Float64Array, offset: number): void {
  const tk = (utcMs - o.tRefMs) / 1000
  const m = o.m0Rad + o.nRadS * tk
  let cu: number
  let su: number
  let r: number
  if (o.e === 0) {
    r = o.aM
    const u = m + o.omegaRad
    cu = Math.cos(u)
    su = Math.sin(u)
  } else {
    const E = eccentricAnomaly(m % (2 * Math.PI), o.e)
    const cE = Math.cos(E)
    const sE = Math.sin(E)
    const nu = Math.atan2(Math.sqrt(1 - o.e * o.e) * sE, cE - o.e)
    const u = nu + o.omegaRad
    r = o.aM * (1 - o.e * cE)
    cu = Math.cos(u)
    su = Math.sin(u)
  }
  const L = o.lon0Rad + o.lonRateRadS * tk
  const cL = Math.cos(L)
  const sL = Math.sin(L)
  const ci = Math.cos(o.iRad)
  const si = Math.sin(o.iRad)
  const xp = r * cu
  const yp = r * su
  out[offset] = xp * cL - yp * ci * sL
  out[offset + 1] = xp * sL + yp * ci * cL
  out[offset + 2] = yp * si
}

/**
 * Positions of a circular Keplerian orbit (e = 0) at `count` evenly spaced instants,
 * by rotating the (cos, sin) pairs of the argument of latitude and of the node
 * longitude by their fixed step (angle addition) instead of calling sin/cos at every
 * epoch; re-anchored with direct sin/cos every 64 steps so rounding stays below 1e-13
 * rad. Writes x, y, z of epoch k to out[offset + k * stride + 0..2].
 */
export function keplerCircularSeriesInto(
  o: KeplerOrbit,
  startMs: number,
  stepMs: number,
  count: number,
  out: Float64Array,
  offset: number,
  stride: number,
): void {
  const r = o.aM
  const ci = Math.cos(o.iRad)
  const si = Math.sin(o.iRad)
  const stepS = stepMs / 1000
  const cdu = Math.cos(o.nRadS * stepS)
  const sdu = Math.sin(o.nRadS * stepS)
  const cdl = Math.cos(o.lonRateRadS * stepS)
  const sdl = Math.sin(o.lonRateRadS * stepS)
  for (let k0 = 0; k0 < count; k0 += 64) {
    const tk = (startMs + k0 * stepMs - o.tRefMs) / 1000
    const u = o.m0Rad + o.nRadS * tk + o.omegaRad
    const L = o.lon0Rad + o.lonRateRadS * tk
    let cu = Math.cos(u)
    let su = Math.sin(u)
    let cL = Math.cos(L)
    let sL = Math.sin(L)
    const kEnd = Math.min(count, k0 + 64)
    for (let k = k0; k < kEnd; k++) {
      const xp = r * cu
      const yp = r * su
      const j = offset + k * stride
      out[j] = xp * cL - yp * ci * sL
      out[j + 1] = xp * sL + yp * ci * cL
      out[j + 2] = yp * si
      const cu2 = cu * cdu - su * sdu
      su = su * cdu + cu * sdu
      cu = cu2
      const cL2 = cL * cdl - sL * sdl
      sL = sL * cdl + cL * sdl
      cL = cL2
    }
  }
}
