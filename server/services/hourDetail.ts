// An hour's detail for a field: the figures the forecast job stored for that hour, plus,
// computed now with the engine, the values at every sample point over the hour (for a map
// of the field coloured by precision) and the sky view at the worst sample point.
// The engine runs with the same inputs as the forecast jobs: the active orbit data and
// outages (orbitData service), the farm's obstructions, the field's antenna height and
// service level, the active work types, and the jobs' step, sample count and mask.
import { errorBudget, forecastField, hourSpaceWeather, skyView } from '../../shared/precision/index.ts'
import { HOUR_MS, floorHour } from '../../shared/planning/index.ts'
import type { SessionUser } from '../../shared/schemas/auth.ts'
import type { HourDetail, HourDetailPoint, StoredHourFigures } from '../../shared/schemas/passes.ts'
import { assertFarmVisible } from '../auth/access.ts'
import type { ForecastHourRow } from '../db/schema-planning.ts'
import { badRequest, notFound } from '../http/errors.ts'
import { engineSettings, inputsOfField } from '../forecast/fieldInputs.ts'
import { engineWorkTypes, obstructionCollection, outagesInWindow } from '../forecast/inputs.ts'
import { TERRAIN_SETTINGS } from '../../shared/schemas/terrain.ts'
import { boundaryGeometry, terrainGridFor } from '../terrain/store.ts'
import type { ServiceContext } from './context.ts'
import { kpFeedState } from './spaceWeather.ts'
import { toForecastHour } from '../forecast/storedHour.ts'

/** How far from now an hour's detail may be asked for (the engine can compute any hour, but pages show the week). */
const MAX_DISTANCE_MS = 60 * 24 * HOUR_MS

function storedFigures(row: ForecastHourRow, names: Map<number, string>): StoredHourFigures {
  const { time, workTypes, ...figures } = toForecastHour(row)
  return {
    hourStart: time,
    ...figures,
    workTypes: Object.entries(workTypes)
      .filter(([id]) => names.has(Number(id)))
      .map(([id, v]) => ({ workTypeId: Number(id), workTypeName: names.get(Number(id))!, share: v.share, shareN1: v.shareN1, state: v.state, ...(v.reason ? { reason: v.reason } : {}) })),
    orbitSummary: row.orbitSummary,
    computedAt: row.computedAt.toISOString(),
  }
}

/** Index of the worst sample point: no fix anywhere in the hour first, then the highest HDOP. */
export function worstPointIndex(points: ReadonlyArray<{ hdopMax: number | null; noFixShare: number }>): number {
  let worst = 0
  const badness = (p: { hdopMax: number | null; noFixShare: number }) => (p.hdopMax === null ? Infinity : p.hdopMax) + p.noFixShare * 1e6
  for (let i = 1; i < points.length; i++) if (badness(points[i]) > badness(points[worst])) worst = i
  return worst
}

export function createHourDetailService(ctx: ServiceContext) {
  const { store, config } = ctx

  return {
    async get(user: SessionUser, fieldId: number, hourIso: string, nowMs = Date.now()): Promise<HourDetail> {
      const repos = store.repos
      const field = await repos.forecasts.fieldWithSigma(fieldId)
      if (!field) throw notFound('The field')
      assertFarmVisible(user, field.farmId)
      const hourStart = floorHour(Date.parse(hourIso))
      if (Math.abs(hourStart - nowMs) > MAX_DISTANCE_MS) {
        throw badRequest('Ask for an hour within 60 days of today.', { hour: 'Choose an hour within 60 days of today.' })
      }
      const farm = await repos.farms.findById(field.farmId)
      const [{ obstructions: obstructionRows, workTypes: workTypeRows, orbits, terrain: terrainRow, correction }, storedRows, feedRecord] = await Promise.all([
        inputsOfField(store, field, { startMs: hourStart, endMs: hourStart + HOUR_MS }),
        repos.forecasts.hours([field.id], new Date(hourStart), new Date(hourStart + HOUR_MS)),
        repos.corrections.feedStatus(),
      ])
      const names = new Map(workTypeRows.map((w) => [w.id, w.name]))
      const settings = engineSettings(config)
      const obstructions = obstructionCollection(obstructionRows)
      const outages = outagesInWindow(orbits.outages, hourStart - HOUR_MS, hourStart + 2 * HOUR_MS)
      const terrainGrid = terrainRow ? await terrainGridFor(store.repos, terrainRow, boundaryGeometry(field.boundary)) : null
      const common = {
        satellites: orbits.satellites,
        outages,
        obstructions,
        antennaHeightM: field.antennaHeightM,
        maskDeg: settings.maskDeg,
        terrain: terrainGrid ? { grid: terrainGrid, options: TERRAIN_SETTINGS } : null,
      }
      const result = forecastField({
        ...common,
        field: JSON.parse(field.boundary),
        startMs: hourStart,
        hours: 1,
        stepMin: settings.stepMin,
        sampleCount: settings.sampleCount,
        sigmaUereM: field.sigmaUereM,
        baselineHM: correction.baselineHM,
        baselineVM: correction.baselineVM,
        kpBlocks: correction.kpBlocks,
        workTypes: engineWorkTypes(workTypeRows).map((w) => ({ ...w, ...correction.workTypes.get(w.id) })),
        detailHourMs: hourStart,
      })
      const detailPoints = result.detail?.points ?? []
      const points: HourDetailPoint[] = detailPoints.map((p) => ({
        ...p,
        workTypes: p.workTypes.map((w) => ({ workTypeId: Number(w.id), share: w.share, shareN1: w.shareN1 })),
      }))
      if (points.length === 0) throw new Error(`the engine returned no sample points for field ${field.id}`)
      const worst = worstPointIndex(points)
      // The sky at the middle of the hour, with the satellites' tracks over the hour around it.
      const sky = skyView({ ...common, point: { latDeg: points[worst].latDeg, lonDeg: points[worst].lonDeg }, atMs: hourStart + HOUR_MS / 2 })
      const stored = storedRows[0] ? storedFigures(storedRows[0], names) : null
      // The error budget at the field's worst: geometry (DOP x sigma), the baseline part, the storm flag
      // with the state of the feed it comes from.
      const hdop = stored ? stored.hdopMax : points[worst].hdopMax
      const vdop = stored ? stored.vdopMax : points[worst].vdopMax
      const budget = errorBudget({ hdop, vdop }, field.sigmaUereM, correction)
      const link = correction.link
      // The Kp feed the flag comes from: a stale or missing feed leaves storms unknown.
      const feed = kpFeedState(feedRecord, nowMs, correction.kpBlocks.length > 0)
      return {
        fieldId: field.id,
        fieldName: field.name,
        errorBudget: {
          ...budget,
          hdop,
          vdop,
          sigmaUereM: field.sigmaUereM,
          link: link
            ? { kind: link.kind, name: link.name, baselineKm: link.baselineKm, farthestKm: link.farthestKm, reachable: link.reachable, baselineKnown: link.baselineKnown }
            : null,
          spaceWeather: hourSpaceWeather(correction.kpBlocks, hourStart),
          spaceWeatherFeed: { state: feed.state, lastOkAt: feed.lastOkAt?.toISOString() ?? null },
          closedReasons: Object.fromEntries(
            [...correction.workTypes.entries()].filter(([, e]) => e.closedReason).map(([id, e]) => [id, e.closedReason!]),
          ),
        },
        timeZone: farm?.timeZone ?? 'UTC',
        hourStart: new Date(hourStart).toISOString(),
        stored,
        computed: {
          orbitSummary: orbits.summary,
          sigmaUereM: field.sigmaUereM,
          points,
          worstPoint: { latDeg: points[worst].latDeg, lonDeg: points[worst].lonDeg, index: worst },
          sky: {
            atMs: sky.atMs,
            maskDeg: sky.maskDeg,
            horizonMaskDeg: sky.horizonMaskDeg,
            terrainHorizonDeg: sky.terrainHorizonDeg,
            satellites: sky.satellites.map((s) => ({
              id: s.id,
              system: s.system,
              azimuthDeg: s.azimuthDeg,
              elevationDeg: s.elevationDeg,
              status: s.status,
              track: s.track,
            })),
            used: sky.used,
            dop: sky.dop ? { gdop: sky.dop.gdop, pdop: sky.dop.pdop, hdop: sky.dop.hdop, vdop: sky.dop.vdop, tdop: sky.dop.tdop } : null,
            n1: sky.n1 ? { lostSatId: sky.n1.lostSatId, hdop: sky.n1.dop?.hdop ?? null } : null,
          },
        },
      }
    },
  }
}
export type HourDetailService = ReturnType<typeof createHourDetailService>
