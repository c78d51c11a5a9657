/**
 * The benchmark scenario of ENGINE.md: a 7-day field forecast at 5-minute steps, 64
 * sample points, all four nominal constellations, four obstructions. The field and its
 * obstructions are invented (farmland south of Ede, NL).
 */
import type { FeatureCollection, Polygon } from 'geojson'
import { gmstRad, nominalConstellation, type KeplerOrbit, type Satellite } from '../../shared/precision/index'

export const START_MS = Date.UTC(2026, 11, 7) // Monday 2026-12-07 00:00 UTC
export const HOURS = 168
export const STEP_MIN = 5
export const SAMPLE_COUNT = 64
export const MASK_DEG = 10
export const ANTENNA_M = 3.5
export const SIGMA_UERE_M = 0.012

export const FIELD: Polygon = {
  type: 'Polygon',
  coordinates: [[[5.652, 52.012], [5.6585, 52.0118], [5.6592, 52.0153], [5.6555, 52.0165], [5.6518, 52.0157], [5.652, 52.012]]],
}

export const OBSTRUCTIONS: FeatureCollection = {
  type: 'FeatureCollection',
  features: [
    { type: 'Feature', id: 'poplar row', properties: { heightM: 24, kind: 'deciduous', leaflessFrom: '11-25', leaflessTo: '04-01' }, geometry: { type: 'LineString', coordinates: [[5.6515, 52.0159], [5.6555, 52.0168], [5.6594, 52.0156]] } },
    { type: 'Feature', id: 'spruce shelterbelt', properties: { heightM: 18, kind: 'evergreen' }, geometry: { type: 'LineString', coordinates: [[5.6596, 52.0117], [5.6603, 52.0155]] } },
    { type: 'Feature', id: 'oak woodlot', properties: { heightM: 21, kind: 'deciduous' }, geometry: { type: 'Polygon', coordinates: [[[5.6505, 52.0118], [5.6516, 52.0118], [5.6516, 52.0135], [5.6505, 52.0135], [5.6505, 52.0118]]] } },
    { type: 'Feature', id: 'machine shed', properties: { heightM: 8, kind: 'structure' }, geometry: { type: 'Polygon', coordinates: [[[5.6545, 52.0113], [5.6553, 52.0113], [5.6553, 52.0116], [5.6545, 52.0116], [5.6545, 52.0113]]] } },
  ],
}

/** The nominal constellations (Keplerian, as the engine embeds them). */
export function nominalSatellites(): Satellite[] {
  return nominalConstellation('all')
}

/**
 * The same constellations as SGP4 element sets (OMM mean elements at the start),
 * so that satellite.js's propagators and the yardstick can run on them.
 */
export function nominalAsOmm(): Satellite[] {
  return nominalConstellation('all').map((s) => {
    const o = s.orbit as KeplerOrbit
    const tk = (START_MS - o.tRefMs) / 1000
    const wrap = (r: number) => ((((r * 180) / Math.PI) % 360) + 360) % 360
    const raan = wrap(o.lon0Rad + o.lonRateRadS * tk + gmstRad(START_MS))
    const u = wrap(o.m0Rad + o.nRadS * tk)
    return {
      ...s,
      source: 'omm' as const,
      orbit: {
        kind: 'sgp4' as const,
        omm: {
          OBJECT_NAME: s.name ?? s.id,
          OBJECT_ID: s.id,
          EPOCH: new Date(START_MS).toISOString().replace('Z', ''),
          MEAN_MOTION: (o.nRadS * 86400) / (2 * Math.PI),
          ECCENTRICITY: 0.0001,
          INCLINATION: (o.iRad * 180) / Math.PI,
          RA_OF_ASC_NODE: raan,
          ARG_OF_PERICENTER: 0,
          MEAN_ANOMALY: u,
          NORAD_CAT_ID: 80000 + Number.parseInt(s.id.replace(/\D/g, '') || '0', 10) + 100 * s.id.charCodeAt(0) + s.id.charCodeAt(1),
          ELEMENT_SET_NO: 999,
          BSTAR: 0,
          MEAN_MOTION_DOT: 0,
          MEAN_MOTION_DDOT: 0,
        },
      },
    }
  })
}
