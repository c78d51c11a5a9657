/**
 * Nominal constellations built from published orbit parameters. They are the embedded
 * default for demos and offline use and are always labelled `source: 'nominal'`: they
 * show the designed geometry, not where the satellites are today.
 *
 * Sources:
 * - GPS: the baseline 24-slot constellation of the GPS SPS Performance Standard
 *   (Table 3.1-1 in the 2008 and 2020 editions), a = 26,559.7 km, i = 55 deg, slot
 *   right ascension and argument of latitude at the epoch 1993-07-01 00:00 UT. The
 *   satellites keep their ground tracks: two revolutions per nodal day, so the same
 *   geometry returns each day, about 4 minutes earlier.
 * - Galileo: Walker 24/3/1, i = 56 deg, a = 29,600 km (Galileo OS SIS ICD, issue 1.3).
 * - GLONASS: 24 satellites in 3 planes (Walker 24/3/1), i = 64.8 deg, a = 25,510 km
 *   (GLONASS ICD ed. 5.1; from memory).
 * - BeiDou: 24 MEO Walker 24/3/1, i = 55 deg, a = 27,906 km; 3 IGSO at i = 55 deg
 *   crossing the equator at 118 deg E; 3 GEO at 80, 110.5 and 140 deg E (BDS Open
 *   Service Performance Standard; from memory).
 * - Secular node regression from J2: dOmega/dt = -3/2 n J2 (Re/a)^2 cos i (Vallado,
 *   Fundamentals of Astrodynamics, secular J2 effects).
 * The Walker sets have no published phase: their first plane's node is placed at
 * right ascension 0 at 2000-01-01 12:00 UTC (an arbitrary, documented choice).
 */
import { DEG, EARTH_J2, EARTH_ROTATION_RAD_S, GPS_MU_M3_S2, WGS84_A_M } from '../constants'
import { gmstRad } from '../time'
import type { GnssSystem } from '../systems'
import type { KeplerOrbit, Satellite } from './types'

/** Names accepted by `nominalConstellation`. */
export const NOMINAL_NAMES = ['gps', 'glonass', 'galileo', 'beidou', 'all'] as const
export type NominalName = (typeof NOMINAL_NAMES)[number]

const GPS_EPOCH_1993_MS = Date.UTC(1993, 6, 1)
const WALKER_EPOCH_MS = Date.UTC(2000, 0, 1, 12)

/** Plane right ascensions (deg) and slot arguments of latitude (deg), SPS PS Table 3.1-1. */
export const GPS_BASELINE_SLOTS: ReadonlyArray<{ plane: string; raanDeg: number; slots: readonly number[] }> = [
  { plane: 'A', raanDeg: 272.847, slots: [268.126, 161.786, 11.676, 41.806] },
  { plane: 'B', raanDeg: 332.847, slots: [80.956, 173.336, 309.976, 204.376] },
  { plane: 'C', raanDeg: 32.847, slots: [111.876, 11.796, 339.666, 241.556] },
  { plane: 'D', raanDeg: 92.847, slots: [135.226, 265.446, 35.156, 167.356] },
  { plane: 'E', raanDeg: 152.847, slots: [197.046, 302.596, 66.066, 333.686] },
  { plane: 'F', raanDeg: 212.847, slots: [238.886, 345.226, 105.206, 135.346] },
]

function nodeRateJ2(aM: number, iRad: number): number {
  const n = Math.sqrt(GPS_MU_M3_S2 / (aM * aM * aM))
  const k = WGS84_A_M / aM
  return -1.5 * n * EARTH_J2 * k * k * Math.cos(iRad)
}

function circular(
  aM: number,
  iRad: number,
  raanRad: number,
  uRad: number,
  tRefMs: number,
  argLatRateRadS: number,
  nodeRateRadS: number,
): KeplerOrbit {
  return {
    kind: 'kepler',
    aM,
    e: 0,
    iRad,
    omegaRad: 0,
    m0Rad: uRad,
    nRadS: argLatRateRadS,
    lon0Rad: raanRad - gmstRad(tRefMs),
    lonRateRadS: nodeRateRadS - EARTH_ROTATION_RAD_S,
    tRefMs,
  }
}

function nominal(id: string, system: GnssSystem, name: string, orbit: KeplerOrbit): Satellite {
  return { id, system, source: 'nominal', name, healthy: true, orbit }
}

function gps(): Satellite[] {
  const a = 26_559_700
  const i = 55 * DEG
  const nodeRate = nodeRateJ2(a, i)
  // Two revolutions per nodal day keep the ground tracks (repeat-track design).
  const argLatRate = 2 * (EARTH_ROTATION_RAD_S - nodeRate)
  const out: Satellite[] = []
  for (const p of GPS_BASELINE_SLOTS) {
    p.slots.forEach((u, k) => {
      const id = `G${p.plane}${k + 1}`
      out.push(nominal(id, 'GPS', `GPS nominal slot ${p.plane}${k + 1}`, circular(a, i, p.raanDeg * DEG, u * DEG, GPS_EPOCH_1993_MS, argLatRate, nodeRate)))
    })
  }
  return out
}

function walker(prefix: string, system: GnssSystem, aM: number, iDeg: number): Satellite[] {
  const total = 24
  const planes = 3
  const phasing = 1
  const perPlane = total / planes
  const i = iDeg * DEG
  const n = Math.sqrt(GPS_MU_M3_S2 / (aM * aM * aM))
  const nodeRate = nodeRateJ2(aM, i)
  const out: Satellite[] = []
  for (let p = 0; p < planes; p++) {
    for (let s = 0; s < perPlane; s++) {
      const raan = (p * 360) / planes
      const u = (s * 360) / perPlane + (p * phasing * 360) / total
      const plane = String.fromCharCode(65 + p)
      out.push(
        nominal(`${prefix}${plane}${s + 1}`, system, `${system} nominal plane ${plane} slot ${s + 1}`, circular(aM, i, raan * DEG, u * DEG, WALKER_EPOCH_MS, n, nodeRate)),
      )
    }
  }
  return out
}

function beidou(): Satellite[] {
  const out = walker('C', 'BeiDou', 27_906_000, 55)
  // Geosynchronous radius: one revolution per sidereal day.
  const aGeo = Math.cbrt(GPS_MU_M3_S2 / (EARTH_ROTATION_RAD_S * EARTH_ROTATION_RAD_S))
  const gmst0 = gmstRad(WALKER_EPOCH_MS)
  ;[80, 110.5, 140].forEach((lonDeg, k) => {
    // i = 0: the earth-fixed longitude is lon0 + u, held constant.
    const orbit = circular(aGeo, 0, gmst0, lonDeg * DEG, WALKER_EPOCH_MS, EARTH_ROTATION_RAD_S, 0)
    out.push(nominal(`CG${k + 1}`, 'BeiDou', `BeiDou nominal GEO ${lonDeg} E`, orbit))
  })
  const iIgso = 55 * DEG
  const nodeRate = nodeRateJ2(aGeo, iIgso)
  for (let k = 0; k < 3; k++) {
    // Same figure-eight ground track crossing 118 E, the three satellites 8 h apart:
    // satellite k reaches its node after k/3 of a nodal day, when the node is at 118 E.
    const orbit = circular(aGeo, iIgso, 0, (-k * 120) * DEG, WALKER_EPOCH_MS, EARTH_ROTATION_RAD_S - nodeRate, nodeRate)
    orbit.lon0Rad = (118 + k * 120) * DEG
    out.push(nominal(`CI${k + 1}`, 'BeiDou', `BeiDou nominal IGSO ${k + 1} (118 E)`, orbit))
  }
  return out
}

/**
 * The satellites of a nominal constellation ('gps', 'glonass', 'galileo', 'beidou', or
 * 'all' for the four together).
 *
 * @example
 * nominalConstellation('gps').length // -> 24
 * nominalConstellation('all').length // -> 102
 */
export function nominalConstellation(name: NominalName): Satellite[] {
  switch (name) {
    case 'gps':
      return gps()
    case 'glonass':
      return walker('R', 'GLONASS', 25_510_000, 64.8)
    case 'galileo':
      return walker('E', 'Galileo', 29_600_000, 56)
    case 'beidou':
      return beidou()
    case 'all':
      return [...gps(), ...walker('R', 'GLONASS', 25_510_000, 64.8), ...walker('E', 'Galileo', 29_600_000, 56), ...beidou()]
    default:
      throw new Error(`unknown nominal constellation "${String(name)}" (use ${NOMINAL_NAMES.join(', ')})`)
  }
}
