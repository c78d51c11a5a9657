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
