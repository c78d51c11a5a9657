// The precision engine: pure functions from orbit data and field geometry to DOP and
// expected errors (see ENGINE.md). No I/O, no clock, no Node-only imports: usable in
// Node (jobs, CLI) and in a browser Web Worker. Inputs and outputs are plain data.
//
// Typical use:
//   const { satellites, errors } = parseOrbitFile(text)            // or nominalConstellation('all')
//   const result = forecastField({ field, obstructions, antennaHeightM: 3.5, satellites,
//     startMs, hours: 168, stepMin: 5, maskDeg: 10, sigmaUereM: 0.012, workTypes })
//   const view = skyView({ point, atMs, satellites, obstructions, antennaHeightM: 3.5 })

export { dopFromDirections, elevationWeight, expectedHorizontal95M, expectedVertical95M, invertSpdInPlace } from './dop'
export type { DopValues, DopWeights, SatDirection } from './dop'
export { geodeticToEcef, ecefToGeodetic, ecefToEnu, enuBasis, enuToAzEl, lookAngles, localPlane, toPlane, fromPlane } from './geodesy'
export type { GeodeticPoint, Ecef, LocalPlane } from './geodesy'
export { horizonMask, horizonMaskInto, readObstructions, isLeafless } from './horizon'
export type { ObstructionShape, ObstructionKind } from './horizon'
export { GNSS_SYSTEMS, parseSystemName, systemFromObjectName } from './systems'
export type { GnssSystem } from './systems'
export { parseOrbitFile, detectOrbitFormat, formatOrbitIssue } from './orbits/parse'
export { parseTle, tleChecksum } from './orbits/tle'
export { parseOmmJson, parseOmmXml } from './orbits/omm'
export { parseYuma } from './orbits/yuma'
export { nominalConstellation, NOMINAL_NAMES, GPS_BASELINE_SLOTS } from './orbits/nominal'
export type { NominalName } from './orbits/nominal'
export { keplerPositionInto, resolveKeplerOrbit, eccentricAnomaly } from './orbits/kepler'
export type { Satellite, Orbit, KeplerOrbit, Sgp4Orbit, OrbitSource, OrbitParseResult, OrbitRecordIssue } from './orbits/types'
export { satellitePositions, satrecOf, temeToEcef } from './propagation'
export type { BulkRuntime, PropagationOptions } from './propagation'
export { gmstRad, gpsMinusUtcS, utcMsToGpsSeconds, gpsSecondsToUtcMs, resolveGpsWeek, GPS_EPOCH_MS } from './time'
export { fieldSamplePoints, fieldPolygons } from './sampling'
export type { SamplePoint, FieldGeometry } from './sampling'
export { forecastField, hourState } from './forecast'
export type {
  FieldForecastInput,
  FieldForecast,
  HourAggregate,
  HourState,
  MedianMax,
  Outage,
  PointHourDetail,
  SampleArrays,
  SkySettings,
  StageTimes,
  WorkType,
} from './forecast'
export { fieldTerrainHorizons } from './forecast'
export { terrainHorizonInto, terrainHorizons, terrainGroundM, gridHeightAt, gridMaxHeight, checkTerrainGrid, combineHorizonInto, EARTH_MEAN_RADIUS_M, TERRAIN_MAX_DISTANCE_M, TERRAIN_REFRACTION_K } from './terrain'
export type { TerrainGrid, TerrainInput, TerrainOptions } from './terrain'
export { forecastPoint, skyView } from './sky'
export type { PointEpoch, PointForecastInput, SatStatus, SkyViewInput, SkyView, SkySatellite } from './sky'
export { DEMO_SERVICE_LEVELS, DEMO_WORK_TYPES } from './defaults'
export * as constants from './constants'
export { geodesicDistanceKm, linkTo, chooseLink, fieldVertices, insideRing } from './baseline'
export type { LatLon, BaseSource, NetworkSource, CorrectionSource, CorrectionLink } from './baseline'
export { linkEffect, errorBudget, baselinePartM, allowedDop, H95_FACTOR, V95_FACTOR } from './errorModel'
export type { ErrorModel, ErrorBudget, LinkEffect, LinkReason } from './errorModel'
export { gScaleOfKp, hourSpaceWeather, stormState, STORM_G } from './spaceWeather'
export type { KpBlock, StormAction } from './spaceWeather'
export { applyHourCorrections } from './correction'
export type { HourReason } from './correction'
