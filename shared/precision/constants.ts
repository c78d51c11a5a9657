/**
 * Physical and geodetic constants used by the engine.
 *
 * Sources:
 * - WGS-84 ellipsoid: NIMA TR8350.2, 3rd ed. 1997, Amendment 1 2000, Table 3.1
 *   (a = 6378137.0 m, 1/f = 298.257223563); J2 from the same document's normalised
 *   C20 (J2 = -sqrt(5) C20 = 1.08263e-3, rounded).
 * - GPS orbit constants: IS-GPS-200, Table 20-IV (mu = 3.986005e14 m^3/s^2,
 *   earth rotation rate 7.2921151467e-5 rad/s).
 */

/** WGS-84 semi-major axis (m). */
export const WGS84_A_M = 6378137.0
/** WGS-84 flattening. */
export const WGS84_F = 1 / 298.257223563
/** WGS-84 first eccentricity squared. */
export const WGS84_E2 = WGS84_F * (2 - WGS84_F)
/** WGS-84 semi-minor axis (m). */
export const WGS84_B_M = WGS84_A_M * (1 - WGS84_F)
/** Second zonal harmonic J2 (dimensionless). */
export const EARTH_J2 = 1.08263e-3

/** Earth gravitational parameter used in GPS orbit computations (m^3/s^2). */
export const GPS_MU_M3_S2 = 3.986005e14
/** Earth rotation rate used in GPS orbit computations (rad/s). */
export const EARTH_ROTATION_RAD_S = 7.2921151467e-5

export const DEG = Math.PI / 180
export const RAD = 180 / Math.PI
export const TWO_PI = 2 * Math.PI

/** Milliseconds per day. */
export const DAY_MS = 86_400_000
/** Seconds per GPS week. */
export const WEEK_S = 604_800
