/**
 * The data behind the week charts of a field: series per figure and the chosen work
 * type's limits translated to the chart's quantity. Pure, so the translation of limits
 * is unit-tested.
 *
 * Limits: the engine's expected errors are horizontal 95 % = 2 (sigma_UERE HDOP + ppm_H b)
 * (2DRMS) and vertical 95 % = 1.96 (sigma_UERE VDOP + ppm_V b), b the field's baseline to
 * its RTK base or mount point (shared/precision/errorModel.ts), so a work type's maximum
 * error gives an HDOP or VDOP limit for its service level and the field's link:
 * (limit / factor - ppm b) / sigma, the engine's own test (allowedDop).
 */
import { allowedDop, H95_FACTOR, linkEffect, V95_FACTOR, type LinkReason } from '@shared/precision'
import type { UnitSystem } from '@shared/schemas'
import type { FieldCorrection } from '@shared/schemas/corrections'
import type { ServiceLevel, WorkType } from '@shared/schemas/planning'
import type { ForecastHour } from '@shared/schemas/forecast'
import { errorUnit, type ErrorUnit } from './units'

/** A field's RTK link as the field's correction route gives it; undefined: not known (a view of several fields). */
export type ChartLink = FieldCorrection['link'] | undefined

export const chartKinds = ['dop', 'sats', 'margin', 'errors'] as const
export type ChartKind = (typeof chartKinds)[number]

export const chartTitles: Record<ChartKind, string> = {
  dop: 'Dilution (HDOP, VDOP, PDOP)',
  sats: 'Satellites in use',
  margin: 'Margin with one satellite lost',
  errors: 'Expected error at 95 %',
}

export interface ChartLine {
  name: string
  /** [UTC ms, value or null for a gap] */
  points: [number, number | null][]
  dashed?: boolean
  /** thresholds drawn on this series */
  limits: { name: string; value: number }[]
}

export interface ChartData {
  kind: ChartKind
  yName: string
  lines: ChartLine[]
  unit: ErrorUnit | null
  /** the value axis starts at 0 (counts, errors) or fits the data (DOP) */
  fromZero: boolean
}

export interface DopLimits {
  /** the largest HDOP / VDOP that meets the work type on this field (0: none at this baseline); null: not known or no limit */
  hdop: number | null
  vdop: number | null
  /** set when the field's link closes the work type whatever the geometry (no DOP limit then) */
  closedReason: LinkReason | null
}

/**
 * HDOP and VDOP limits of a work type for its service level and the field's link, as the
 * engine tests its hours. A level that needs a base with the link not known has no limit
 * (the baseline part would move it); a link that closes the work type has none either.
 *
 * @example
 * dopLimits(planting, [rtk], { baselineKm: 3, farthestKm: 3.2, reachable: true, ... }) // -> { hdop: 1.83, vdop: null, closedReason: null } (1 ppm)
 */
export function dopLimits(workType: WorkType | null, serviceLevels: readonly ServiceLevel[], link?: ChartLink): DopLimits {
  const none = { hdop: null, vdop: null, closedReason: null }
  if (!workType) return none
  const level = serviceLevels.find((s) => s.id === workType.serviceLevelId)
  const sigma = level?.sigmaUereM
  if (!level || !sigma || !(sigma > 0)) return none
  if (level.needsBase && link === undefined && (level.ppmH > 0 || level.ppmV > 0)) return none
  const effect = linkEffect(level, link ?? null)
  if (level.needsBase && link !== undefined && effect.closedReason) return { ...none, closedReason: effect.closedReason }
  return {
    hdop: Math.max(0, allowedDop(workType.maxH95M, H95_FACTOR, sigma, effect.baselineHM)),
    vdop: workType.maxV95M === null ? null : Math.max(0, allowedDop(workType.maxV95M, V95_FACTOR, sigma, effect.baselineVM)),
    closedReason: null,
  }
}

const round = (v: number, digits: number) => Math.round(v * 10 ** digits) / 10 ** digits

function series(hours: readonly ForecastHour[], pick: (h: ForecastHour) => number | null, scale = 1): [number, number | null][] {
  return hours.map((h) => {
    const v = pick(h)
    return [Date.parse(h.time), v === null || !Number.isFinite(v) ? null : round(v / scale, 3)]
  })
}

/**
 * The lines of one chart.
 * @example chartData('dop', hours, planting, levels, 'metric').lines[0].limits // -> [{ name: 'HDOP limit', value: 2.08 }]
 */
export function chartData(
  kind: ChartKind,
  hours: readonly ForecastHour[],
  workType: WorkType | null,
  serviceLevels: readonly ServiceLevel[],
  units: UnitSystem,
  /** the field's RTK link, for the baseline part of the DOP limits */
  link?: ChartLink,
): ChartData {
  const limits = dopLimits(workType, serviceLevels, link)
  const limit = (name: string, value: number | null | undefined) => (value === null || value === undefined ? [] : [{ name, value: round(value, 2) }])
  switch (kind) {
    case 'dop':
      return {
        kind,
        yName: 'DOP',
        unit: null,
        fromZero: false,
        lines: [
          { name: 'HDOP worst point', points: series(hours, (h) => h.hdopMax), limits: limit('HDOP limit', limits.hdop) },
          { name: 'HDOP typical', points: series(hours, (h) => h.hdopMedian), dashed: true, limits: [] },
          { name: 'VDOP worst point', points: series(hours, (h) => h.vdopMax), limits: limit('VDOP limit', limits.vdop) },
          { name: 'PDOP worst point', points: series(hours, (h) => h.pdopMax), limits: limit('PDOP limit', workType?.maxPdop) },
        ],
      }
    case 'sats':
      return {
        kind,
        yName: 'satellites',
        unit: null,
        fromZero: true,
        lines: [
          { name: 'Fewest in use', points: series(hours, (h) => h.satsMin), limits: limit('Minimum', workType?.minSats) },
          { name: 'Typical', points: series(hours, (h) => h.satsMedian), dashed: true, limits: [] },
        ],
      }
    case 'margin':
      return {
        kind,
        yName: 'HDOP',
        unit: null,
        fromZero: false,
        lines: [
          { name: 'HDOP worst point', points: series(hours, (h) => h.hdopMax), dashed: true, limits: [] },
          {
            name: 'HDOP with one satellite lost',
            points: series(hours, (h) => h.n1HdopMax),
            limits: limit('HDOP limit', limits.hdop),
          },
        ],
      }
    case 'errors': {
      let largest = 0
      for (const h of hours) largest = Math.max(largest, h.h95MaxM ?? 0, h.v95MaxM ?? 0)
      if (workType) largest = Math.max(largest, workType.maxH95M, workType.maxV95M ?? 0)
      const unit = errorUnit(largest, units)
      const inUnit = (m: number | null | undefined) => (m === null || m === undefined ? null : m / unit.perUnitM)
      return {
        kind,
        yName: unit.label,
        unit,
        fromZero: true,
        lines: [
          {
            name: 'Horizontal, worst point',
            points: series(hours, (h) => h.h95MaxM, unit.perUnitM),
            limits: limit('Horizontal limit', inUnit(workType?.maxH95M)),
          },
          {
            name: 'Vertical, worst point',
            points: series(hours, (h) => h.v95MaxM, unit.perUnitM),
            limits: limit('Vertical limit', inUnit(workType?.maxV95M)),
          },
        ],
      }
    }
  }
}
