/**
 * Satellites and their orbit descriptions, as plain data (structured-clone friendly,
 * so a list can be posted to a Web Worker or a worker thread).
 */
import type { OMMJsonObject } from 'satellite.js'
import type { GnssSystem } from '../systems'

/** Where a satellite's orbit came from. */
export type OrbitSource = 'tle' | 'omm' | 'almanac' | 'nominal'

/**
 * SGP4/SDP4 mean elements (from a TLE or an OMM), kept as the OMM keyword set
 * (plus the TLE lines when read from a TLE) so that they can be re-initialised anywhere.
 */
export interface Sgp4Orbit {
  kind: 'sgp4'
  /** Two-line element set, when the record was a TLE. */
  tle?: [string, string]
  /** OMM mean elements, when the record was an OMM. */
  omm?: OMMJsonObject
}

/**
 * A Keplerian orbit in earth-fixed form (IS-GPS-200, Table 20-IV, almanac terms):
 * longitude of the ascending node L(t) = lon0 + lonRate * (t - tRef),
 * mean anomaly M(t) = m0 + n * (t - tRef). Used by GPS almanacs and the nominal
 * constellations.
 */
export interface KeplerOrbit {
  kind: 'kepler'
  /** semi-major axis (m) */
  aM: number
  e: number
  iRad: number
  /** argument of perigee (rad) */
  omegaRad: number
  /** mean anomaly at tRef (rad) */
  m0Rad: number
  /** mean motion (rad/s) */
  nRadS: number
  /** earth-fixed longitude of the ascending node at tRef (rad) */
  lon0Rad: number
  /** rate of that longitude (rad/s), OmegaDot - earth rotation */
  lonRateRadS: number
  /** reference instant, UTC ms; for an almanac it is resolved from the week */
  tRefMs: number
  /**
   * Almanac only: week modulo 1024 and time of applicability (s); the full week is
   * resolved at propagation to the one nearest the requested time.
   */
  almanac?: { weekMod1024: number; toaS: number; omega0Rad: number }
}

export type Orbit = Sgp4Orbit | KeplerOrbit

/** One satellite. */
export interface Satellite {
  /** TLE/OMM catalogue number as text; almanac 'G' + PRN (two digits); nominal slot id. */
  id: string
  system: GnssSystem
  source: OrbitSource
  /** The object name when the record had one. */
  name?: string
  /** false when the almanac marks the satellite unusable; such satellites are not used. */
  healthy: boolean
  orbit: Orbit
}

/** A problem with one record of an orbit file. */
export interface OrbitRecordIssue {
  /** 1-based record number in the file */
  record: number
  /** 1-based line number where the record (or the problem) is */
  line: number
  /** satellite id or name when known */
  satellite?: string
  message: string
}

/** Result of reading one orbit file. */
export interface OrbitParseResult {
  format: 'tle' | 'omm-json' | 'omm-xml' | 'yuma'
  satellites: Satellite[]
  /** Records that were skipped, each with the reason. */
  errors: OrbitRecordIssue[]
  /** Records used, with a remark (e.g. constellation unknown -> Other, unhealthy). */
  notes: OrbitRecordIssue[]
  /** Number of records skipped (= errors.length). */
  skipped: number
}
