/**
 * What a cell of the outlook grid can show besides the hour's state: one continuous
 * figure per hour, drawn on the cividis ramp. Position 0 of the ramp (dark blue) is
 * always the better end, as Clear is dark blue: low DOP and small errors, many
 * satellites and a large share of the field.
 */
import type { UnitSystem } from '@shared/schemas'
import type { ServiceLevel, WorkType } from '@shared/schemas/planning'
import { dopLimits, type ChartLink } from './chartSeries'
import type { ForecastHour } from '@shared/schemas/forecast'
import { errorUnit, formatDop, formatErrorM, formatShare, type ErrorUnit } from './units'

export const figureKeys = ['hdop', 'vdop', 'h95', 'v95', 'sats', 'share'] as const
export type FigureKey = (typeof figureKeys)[number]

/** What the cells show: the state for the chosen work type, or a figure. */
export type CellShow = 'state' | FigureKey

export interface FigureDef {
  key: FigureKey
  /** for the picker */
  label: string
  /** for legends and axis names */
  short: string
  higherIsBetter: boolean
  /** errors are shown in cm/in (or m/ft); the rest are plain numbers */
  isError: boolean
  value: (hour: ForecastHour, workTypeId: number | null) => number | null
}

export const figures: Record<FigureKey, FigureDef> = {
  hdop: {
    key: 'hdop',
    label: 'HDOP at the worst point',
    short: 'HDOP',
    higherIsBetter: false,
    isError: false,
    value: (h) => h.hdopMax,
  },
  vdop: {
    key: 'vdop',
    label: 'VDOP at the worst point',
    short: 'VDOP',
    higherIsBetter: false,
    isError: false,
    value: (h) => h.vdopMax,
  },
  h95: {
    key: 'h95',
    label: 'Horizontal error at 95 % (worst point)',
    short: 'Horizontal error 95 %',
    higherIsBetter: false,
    isError: true,
    value: (h) => h.h95MaxM,
  },
  v95: {
    key: 'v95',
    label: 'Vertical error at 95 % (worst point)',
    short: 'Vertical error 95 %',
    higherIsBetter: false,
    isError: true,
    value: (h) => h.v95MaxM,
  },
  sats: {
    key: 'sats',
    label: 'Satellites in use (fewest)',
    short: 'Satellites',
    higherIsBetter: true,
    isError: false,
    value: (h) => h.satsMin,
  },
  share: {
    key: 'share',
    label: 'Share of the field meeting the work type',
    short: 'Share of field',
    higherIsBetter: true,
    isError: false,
    value: (h, workTypeId) => (workTypeId === null ? null : (h.workTypes[String(workTypeId)]?.share ?? null)),
  },
}

/** The range of a figure drawn on the ramp. */
export interface FigureScale {
  figure: FigureDef
  min: number
  max: number
  /** for error figures: the unit of the legend */
  unit: ErrorUnit | null
}

/**
 * The scale of a figure over the hours shown: from the smallest to the largest value,
 * widened a little when they are all equal. Shares always span 0..1.
 * @example figureScale(figures.hdop, hours, null, 'metric') // -> { min: 0.6, max: 2.9, ... }
 */
export function figureScale(figure: FigureDef, hours: Iterable<ForecastHour>, workTypeId: number | null, units: UnitSystem): FigureScale {
  const values: (number | null)[] = []
  for (const h of hours) values.push(figure.value(h, workTypeId))
  return scaleOfValues(figure, values, units)
}

/**
 * The smallest range a scale spans: 0.05 in DOP, 2 mm in expected error, 2 satellites
 * (a judgement of what is worth a colour step, not a published figure).
 */
const minimumSpan: Record<FigureKey, number> = { hdop: 0.05, vdop: 0.05, h95: 0.002, v95: 0.002, sats: 2, share: 1 }

/** The scale of a figure over any list of values (nulls and non-finite values are skipped). */
export function scaleOfValues(figure: FigureDef, values: Iterable<number | null>, units: UnitSystem): FigureScale {
  let min = Infinity
  let max = -Infinity
  for (const v of values) {
    if (v === null || !Number.isFinite(v)) continue
    if (v < min) min = v
    if (v > max) max = v
  }
  if (figure.key === 'share') {
    min = 0
    max = 1
  }
  if (!Number.isFinite(min)) {
    min = 0
    max = 1
  } else if (max - min < minimumSpan[figure.key]) {
    // Differences below what matters in the field are not spread over the whole ramp:
    // nearly equal values get nearly equal (middle) colours.
    const mid = (max + min) / 2
    min = Math.max(0, mid - minimumSpan[figure.key] / 2)
    max = min + minimumSpan[figure.key]
  }
  return { figure, min, max, unit: figure.isError ? errorUnit(max, units) : null }
}

/**
 * Where a value sits on the ramp, 0 (better, dark blue) to 1 (worse, yellow); null for
 * an hour without a value (no fix).
 */
export function rampPosition(scale: FigureScale, value: number | null): number | null {
  if (value === null || !Number.isFinite(value)) return null
  const t = (value - scale.min) / (scale.max - scale.min)
  const clamped = Math.min(1, Math.max(0, t))
  return scale.figure.higherIsBetter ? 1 - clamped : clamped
}

/**
 * A figure's value as text in the user's units; `extraDigits` adds decimals where a
 * legend's neighbouring ticks would otherwise read the same.
 */
export function formatFigure(figure: FigureDef, value: number | null, units: UnitSystem, unit?: ErrorUnit | null, extraDigits = 0): string {
  if (value === null || !Number.isFinite(value)) return figure.key === 'share' ? '—' : 'no fix'
  if (figure.isError) {
    const u = unit ?? errorUnit(value, units)
    return formatErrorM(value, units, { ...u, digits: u.digits + extraDigits })
  }
  if (figure.key === 'share') return formatShare(value)
  if (figure.key === 'sats') return String(Math.round(value))
  return extraDigits > 0 ? value.toFixed(2 + extraDigits) : formatDop(value)
}

/** What the chosen work type asks of a figure, and how many of the hours shown fall short. */
export interface FigureLimit {
  /** e.g. "HDOP at most 2.08" */
  need: string
  failing: number
  total: number
}

/**
 * The work type's limit on a figure (translated to DOP for DOP figures) and the hours
 * shown whose value misses it (no fix counts as missing it).
 * @example figureLimit(figures.hdop, hours, stripTill, levels, 'metric') // -> { need: 'HDOP at most 2.08', failing: 0, total: 160 }
 */
export function figureLimit(
  figure: FigureDef,
  hours: readonly ForecastHour[],
  workType: WorkType | null,
  serviceLevels: readonly ServiceLevel[],
  units: UnitSystem,
  /** the field's RTK link, for the baseline part of the DOP limits; undefined: not known */
  link?: ChartLink,
): FigureLimit | null {
  if (!workType) return null
  const dop = dopLimits(workType, serviceLevels, link)
  let limit: number | null = null
  let need = ''
  switch (figure.key) {
    case 'hdop':
      limit = dop.hdop
      need = limit === null ? '' : `HDOP at most ${limit.toFixed(2)}`
      break
    case 'vdop':
      limit = dop.vdop
      need = limit === null ? '' : `VDOP at most ${limit.toFixed(2)}`
      break
    case 'h95':
      limit = workType.maxH95M
      need = `a horizontal error at 95 % of at most ${formatErrorM(limit, units)}`
      break
    case 'v95':
      limit = workType.maxV95M
      need = limit === null ? '' : `a vertical error at 95 % of at most ${formatErrorM(limit, units)}`
      break
    case 'sats':
      limit = workType.minSats
      need = `at least ${limit} satellites`
      break
    case 'share':
      limit = workType.requiredShare
      need = `at least ${formatShare(limit)} of the field`
      break
  }
  if (limit === null) return null
  let failing = 0
  for (const h of hours) {
    const v = figure.value(h, workType.id)
    const ok = v !== null && Number.isFinite(v) && (figure.higherIsBetter ? v >= limit : v <= limit)
    if (!ok) failing++
  }
  return { need, failing, total: hours.length }
}

/** Evenly spaced legend ticks (values) from min to max. */
export function legendTicks(scale: FigureScale, count = 5): number[] {
  const out: number[] = []
  for (let i = 0; i < count; i++) out.push(scale.min + ((scale.max - scale.min) * i) / (count - 1))
  return out
}
