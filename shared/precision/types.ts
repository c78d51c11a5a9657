/**
 * The engine's data types: the inputs of a field or sky forecast (satellites, outages,
 * work types, obstructions, settings) and the shapes of its results (hour aggregates,
 * per-point details, raw samples). Types only, so every module can use them without
 * importing another's code. The definitions follow ENGINE.md (steps 4-9); the hour
 * states are the product design's (Clear / Tight / Closed).
 */
import type { FeatureCollection } from 'geojson'
import type { DopWeights } from './dop'
import type { HourReason, LinkReason } from './errorModel'
import type { KpBlock, StormAction } from './spaceWeather'
import type { Satellite } from './orbits/types'
import type { PropagationOptions } from './propagation'
import type { FieldGeometry, SamplePoint } from './sampling'
import type { GnssSystem } from './systems'
import type { TerrainInput } from './terrain'

/** A satellite out of service over [fromMs, toMs). */
export interface Outage {
  satId: string
  fromMs: number
  toMs: number
}

/** Thresholds of a kind of work. */
export interface WorkType {
  id: string
  /** maximum horizontal error at 95 % (m) */
  maxH95M: number
  /** maximum vertical error at 95 % (m); null when the work has no vertical need */
  maxV95M: number | null
  minSats: number
  maxPdop: number
  /** share of the field (0..1) that must meet the thresholds */
  requiredShare: number
  /** whether the thresholds must also hold with one satellite lost */
  requireN1: boolean
  /** sigma_UERE of this work's correction service (m); defaults to the forecast's */
  sigmaUereM?: number
  /** baseline part ppm_H b of this work's service on this field (m, errorModel.ts); default 0 */
  baselineHM?: number
  /** baseline part ppm_V b (m); default 0 */
  baselineVM?: number
  /** set when the field's correction link rules the work out (out of range, past the baseline limit) */
  closedReason?: LinkReason | null
  /** what a G3-or-worse hour does to this work (spaceWeather.ts); default 'none' */
  stormAction?: StormAction
}

/** The state of an hour for a work type. */
export type HourState = 'clear' | 'tight' | 'closed'

/** Settings shared by the forecasts. */
export interface SkySettings {
  /** satellites (from parseOrbitFile and/or nominalConstellation) */
  satellites: readonly Satellite[]
  /** elevation mask (deg), default 10 */
  maskDeg?: number
  /** constellations to use; default all present */
  systems?: readonly GnssSystem[]
  /** observation weights, default 'none' */
  weights?: DopWeights
  outages?: readonly Outage[]
  /** obstructions: LineString/Polygon features with properties heightM, kind, leaflessFrom/To */
  obstructions?: FeatureCollection | null
  /** antenna height above ground (m), default 0 */
  antennaHeightM?: number
  /** how to propagate SGP4 satellites */
  propagation?: PropagationOptions
  /** terrain from an elevation model (terrain.ts); combined with the obstructions by the maximum per direction */
  terrain?: TerrainInput | null
}

/** Input of `forecastField`. */
export interface FieldForecastInput extends SkySettings {
  /** field boundary: Polygon / MultiPolygon (holes respected) or a Feature of one */
  field: FieldGeometry
  /** first epoch, UTC ms */
  startMs: number
  hours: number
  /** minutes between epochs, default 5 */
  stepMin?: number
  /** ellipsoidal height of the ground (m), default 0 */
  heightM?: number
  /** ranging sigma of the field's correction service (m) */
  sigmaUereM: number
  /** baseline parts ppm b of the field's own service (m) for the hours' expected errors; default 0 */
  baselineHM?: number
  baselineVM?: number
  /** Kp forecast blocks; hours they cover carry their space weather */
  kpBlocks?: readonly KpBlock[]
  workTypes?: readonly WorkType[]
  /** about this many sample points, default 64 */
  sampleCount?: number
  /** also return per-sample-point values for the clock hour starting at this UTC ms */
  detailHourMs?: number
  /** also return the raw per-sample values (typed arrays, transferable) */
  includeSamples?: boolean
}

/**
 * Raw per-sample values, index epoch * points + point. hdop/vdop/pdop are NaN without
 * a fix; n1* are the worst values with one satellite lost, Infinity when that can
 * lose the fix, NaN without a fix.
 */
export interface SampleArrays {
  epochsMs: Float64Array
  points: number
  satellites: Uint16Array
  hdop: Float64Array
  vdop: Float64Array
  pdop: Float64Array
  n1Hdop: Float64Array
  n1Vdop: Float64Array
  n1Pdop: Float64Array
}

/** A median and a maximum. */
export interface MedianMax {
  median: number | null
  max: number | null
}

/** Aggregates of one clock hour (UTC). */
export interface HourAggregate {
  /** start of the clock hour, ISO 8601 UTC */
  time: string
  startMs: number
  /** point-epoch samples in the hour */
  samples: number
  /** area-and-time-weighted share of samples without a fix */
  noFixShare: number
  /** satellites in use */
  satellites: { min: number; median: number }
  /** over samples with a fix; the median counts no-fix samples as worst (null if they are half or more) */
  hdop: MedianMax
  vdop: MedianMax
  pdopMax: number | null
  /** worst HDOP with the most damaging satellite lost; null when losing one satellite loses the fix somewhere */
  n1HdopMax: number | null
  /** expected horizontal / vertical error at 95 % for sigmaUereM (m) */
  h95M: MedianMax
  v95M: MedianMax
  workTypes: Array<{ id: string; share: number; shareN1: number; state: HourState; reason?: HourReason }>
  /** highest Kp over the hour and its G level; null when no Kp block covers it (absent when no Kp data was given) */
  spaceWeather?: { kpMax: number; g: number } | null
}

/**
 * Per-sample-point values over one hour (for a map of the field). The hour detail's API
 * type (HourDetailPoint in shared/schemas/passes.ts) is this one with work types by id.
 */
export interface PointHourDetail extends SamplePoint {
  satellitesMin: number
  hdopMax: number | null
  vdopMax: number | null
  pdopMax: number | null
  n1HdopMax: number | null
  h95MaxM: number | null
  v95MaxM: number | null
  noFixShare: number
  /** highest elevation the obstructions block around this point (deg) */
  horizonMaxDeg: number
  /** share (0..1) of the hour's epochs at this point meeting each work type, without and with one satellite lost */
  workTypes: Array<{ id: string; share: number; shareN1: number }>
}

/** Wall time of each stage (ms), measured only when a clock is passed in. */
export interface StageTimes {
  propagationMs: number
  masksMs: number
  dopMs: number
  aggregationMs: number
  /** part of masksMs spent on the terrain horizon */
  terrainMs?: number
}

/** Result of `forecastField`: plain data, structured-clone friendly. */
export interface FieldForecast {
  hours: HourAggregate[]
  samplePoints: SamplePoint[]
  areaM2: number
  epochs: number
  satellitesUsed: number
  detail?: { hourStartMs: number; points: PointHourDetail[] }
  /** satellite-point evaluations (epochs x points x satellites) */
  evaluations: number
  samples?: SampleArrays
  stageTimes?: StageTimes
}
