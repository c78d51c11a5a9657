/**
 * WGS-84 geodesy: geodetic <-> earth-centred earth-fixed (ECEF), the local
 * East-North-Up frame, azimuth and elevation, and a local metric plane.
 *
 * Sources:
 * - Geodetic -> ECEF and back: IOGP Publication 373-7-2 (EPSG Guidance Note 7-2),
 *   method 9602 (the inverse by Bowring's formula iterated to convergence).
 * - Topocentric ENU: IOGP 373-7-2, method 9836.
 * - Ellipsoid: NIMA TR8350.2 Table 3.1 (see constants.ts).
 */
import { DEG, RAD, WGS84_A_M, WGS84_E2 } from './constants'

/** A position on the WGS-84 ellipsoid. */
export interface GeodeticPoint {
  latDeg: number
  lonDeg: number
  heightM: number
}

/** ECEF coordinates in metres. */
export type Ecef = [number, number, number]

/**
 * Geodetic latitude, longitude and ellipsoidal height to ECEF (metres).
 *
 * @example
 * geodeticToEcef({ latDeg: 52, lonDeg: 5, heightM: 0 }) // -> [3919999.3, 342952.3, 5002803.3] (approx.)
 */
export function geodeticToEcef(p: GeodeticPoint): Ecef {
  const lat = p.latDeg * DEG
  const lon = p.lonDeg * DEG
  const sinLat = Math.sin(lat)
  const cosLat = Math.cos(lat)
  const n = WGS84_A_M / Math.sqrt(1 - WGS84_E2 * sinLat * sinLat)
  const h = p.heightM
  return [
    (n + h) * cosLat * Math.cos(lon),
    (n + h) * cosLat * Math.sin(lon),
    (n * (1 - WGS84_E2) + h) * sinLat,
  ]
}

/**
 * ECEF (metres) to geodetic latitude, longitude and ellipsoidal height.
 * Iterates latitude to 1e-14 rad (a few iterations); valid everywhere except the
 * earth's centre.
 *
 * @example
 * ecefToGeodetic([3771793.968, 140253.342, 5124304.349]) // -> { latDeg: 53.80939, lonDeg: 2.12955, heightM: 73.0 }
 */
export function ecefToGeodetic(xyz: Ecef): GeodeticPoint {
  const [x, y, z] = xyz
  const p = Math.hypot(x, y)
  const lon = Math.atan2(y, x)
  if (p < 1e-9) {
    // On the polar axis.
    const b = WGS84_A_M * Math.sqrt(1 - WGS84_E2)
    return { latDeg: z >= 0 ? 90 : -90, lonDeg: 0, heightM: Math.abs(z) - b }
  }
  let lat = Math.atan2(z, p * (1 - WGS84_E2))
  let n = WGS84_A_M
  let h = 0
  for (let i = 0; i < 10; i++) {
    const sinLat = Math.sin(lat)
    n = WGS84_A_M / Math.sqrt(1 - WGS84_E2 * sinLat * sinLat)
    h = p / Math.cos(lat) - n
    const next = Math.atan2(z, p * (1 - (WGS84_E2 * n) / (n + h)))
    if (Math.abs(next - lat) < 1e-14) {
      lat = next
      break
    }
    lat = next
  }
  const sinLat = Math.sin(lat)
  const cosLat = Math.cos(lat)
  n = WGS84_A_M / Math.sqrt(1 - WGS84_E2 * sinLat * sinLat)
  // Height formula that stays accurate near the poles.
  h = p * cosLat + z * sinLat - (WGS84_A_M * WGS84_A_M) / n
  return { latDeg: lat * RAD, lonDeg: lon * RAD, heightM: h }
}

/**
 * Unit vectors of the local East-North-Up frame at a geodetic latitude/longitude,
 * expressed in ECEF: [ex, ey, ez, nx, ny, nz, ux, uy, uz].
 */
export function enuBasis(latDeg: number, lonDeg: number): Float64Array {
  const lat = latDeg * DEG
  const lon = lonDeg * DEG
  const sl = Math.sin(lat)
  const cl = Math.cos(lat)
  const so = Math.sin(lon)
  const co = Math.cos(lon)
  return Float64Array.of(-so, co, 0, -sl * co, -sl * so, cl, cl * co, cl * so, sl)
}

/**
 * Topocentric East-North-Up coordinates (metres) of an ECEF point as seen from an
 * origin (IOGP 373-7-2 method 9836).
 *
 * @example
 * ecefToEnu([3771793.968, 140253.342, 5124304.349], { latDeg: 55, lonDeg: 5, heightM: 200 })
 * // -> [-189013.869, -128642.040, -4220.171]
 */
export function ecefToEnu(xyz: Ecef, origin: GeodeticPoint): [number, number, number] {
  const o = geodeticToEcef(origin)
  const b = enuBasis(origin.latDeg, origin.lonDeg)
  const dx = xyz[0] - o[0]
  const dy = xyz[1] - o[1]
  const dz = xyz[2] - o[2]
  return [
    b[0] * dx + b[1] * dy + b[2] * dz,
    b[3] * dx + b[4] * dy + b[5] * dz,
    b[6] * dx + b[7] * dy + b[8] * dz,
  ]
}

/** Azimuth (deg from north, clockwise, [0, 360)) and elevation (deg) of an ENU vector. */
export function enuToAzEl(e: number, n: number, u: number): { azimuthDeg: number; elevationDeg: number } {
  let az = Math.atan2(e, n) * RAD
  if (az < 0) az += 360
  if (az >= 360) az -= 360
  return { azimuthDeg: az, elevationDeg: Math.atan2(u, Math.hypot(e, n)) * RAD }
}

/**
 * Azimuth, elevation and range of an ECEF target (metres) seen from a geodetic point.
 *
 * @example
 * lookAngles({ latDeg: 52, lonDeg: 5, heightM: 0 }, [0, 0, 26_000_000]).elevationDeg // about 45
 */
export function lookAngles(
  from: GeodeticPoint,
  target: Ecef,
): { azimuthDeg: number; elevationDeg: number; rangeM: number } {
  const [e, n, u] = ecefToEnu(target, from)
  return { ...enuToAzEl(e, n, u), rangeM: Math.hypot(e, n, u) }
}

/**
 * A local metric plane (x east, y north, metres) tangent at an origin, built from the
 * ellipsoid's radii of curvature. Good to well under a metre across a farm (a few km).
 */
export interface LocalPlane {
  lat0Deg: number
  lon0Deg: number
  /** metres per degree of longitude */
  mPerDegLon: number
  /** metres per degree of latitude */
  mPerDegLat: number
}

/** Builds the local plane at an origin. */
export function localPlane(lat0Deg: number, lon0Deg: number): LocalPlane {
  const s = Math.sin(lat0Deg * DEG)
  const w = Math.sqrt(1 - WGS84_E2 * s * s)
  const nRadius = WGS84_A_M / w
  const mRadius = (WGS84_A_M * (1 - WGS84_E2)) / (w * w * w)
  return {
    lat0Deg,
    lon0Deg,
    mPerDegLon: nRadius * Math.cos(lat0Deg * DEG) * DEG,
    mPerDegLat: mRadius * DEG,
  }
}

/** Longitude/latitude (deg) to plane metres [x east, y north]. */
export function toPlane(plane: LocalPlane, lonDeg: number, latDeg: number): [number, number] {
  let dLon = lonDeg - plane.lon0Deg
  if (dLon > 180) dLon -= 360
  else if (dLon < -180) dLon += 360
  return [dLon * plane.mPerDegLon, (latDeg - plane.lat0Deg) * plane.mPerDegLat]
}

/** Plane metres back to longitude/latitude (deg). */
export function fromPlane(plane: LocalPlane, x: number, y: number): { lonDeg: number; latDeg: number } {
  return { lonDeg: plane.lon0Deg + x / plane.mPerDegLon, latDeg: plane.lat0Deg + y / plane.mPerDegLat }
}
